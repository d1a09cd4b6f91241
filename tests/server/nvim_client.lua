-- Drives Neovim's built-in LSP client against `conelang serve` (used by test_neovim.py).
-- Works with Neovim 0.7+ (vim.lsp.start_client + vim.lsp.buf_attach_client).
-- Inputs come from environment variables; the results are written as JSON to CONE_OUT.
local env = function(k) return os.getenv(k) end
local results = { diagnostics = {}, hover = "", cleared = false, times = {} }
local t0 = vim.loop.now()
local function mark(what) results.times[what] = vim.loop.now() - t0 end

local function finish(ok, message)
  results.ok = ok
  results.message = message
  local f = io.open(env("CONE_OUT"), "w")
  f:write(vim.fn.json_encode(results))
  f:close()
  vim.cmd("qall!")
end

local function run()
  local file = env("CONE_FILE")
  vim.cmd("edit " .. vim.fn.fnameescape(file))
  local buf = vim.api.nvim_get_current_buf()
  local id = vim.lsp.start_client({
    name = "conelang",
    cmd = vim.fn.json_decode(env("CONE_SERVER")),
    root_dir = vim.fn.fnamemodify(file, ":p:h"),
  })
  assert(id, "the language server did not start")
  vim.lsp.buf_attach_client(buf, id)

  -- 1. the mistake is reported
  assert(vim.wait(60000, function() return #vim.diagnostic.get(buf) > 0 end, 50), "no diagnostics arrived")
  mark("diagnostics")
  for _, d in ipairs(vim.diagnostic.get(buf)) do
    table.insert(results.diagnostics, { lnum = d.lnum, col = d.col, message = d.message,
                                        code = d.code or (d.user_data and d.user_data.lsp and d.user_data.lsp.code) })
  end

  -- 2. hover a cone until the heavy part (generators, equations) is there
  local params = { textDocument = { uri = vim.uri_from_bufnr(buf) },
                   position = { line = tonumber(env("CONE_HOVER_LINE")), character = tonumber(env("CONE_HOVER_COL")) } }
  local deadline = vim.loop.now() + 60000
  while vim.loop.now() < deadline do
    local responses = vim.lsp.buf_request_sync(buf, "textDocument/hover", params, 20000) or {}
    for _, r in pairs(responses) do
      if r.result and r.result.contents then
        local c = r.result.contents
        results.hover = type(c) == "table" and (c.value or "") or tostring(c)
      end
    end
    if results.hover ~= "" and not results.hover:find("computing") then break end
    vim.wait(200)
  end

  mark("hover")
  -- 3. fix the mistake: the diagnostic goes away
  local line = tonumber(env("CONE_FIX_LINE"))
  vim.api.nvim_buf_set_lines(buf, line, line + 1, false, { env("CONE_FIX_TEXT") })
  results.cleared = vim.wait(60000, function() return #vim.diagnostic.get(buf) == 0 end, 50)
  mark("cleared")
  vim.lsp.stop_client(id)
end

local ok, err = pcall(run)
finish(ok, err and tostring(err) or vim.NIL)
