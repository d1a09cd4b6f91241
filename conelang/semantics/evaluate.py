"""Evaluation of the definitions of one file: each is evaluated on first use and memoised,
problems are reported on the analysis's sink at the right span, and heavy facts go through
:mod:`conelang.semantics.engine` (cached by mathematical value).

:meth:`Evaluator.cone_expr` evaluates a cone expression that is not a definition (the right
side of ``expect a == …``).  The helpers ``fail``, ``need``, ``space`` and ``vectors`` are
public for the evaluators of other statement kinds (:mod:`conelang.semantics.polytopes`).

>>> from conelang.semantics.analysis import Analysis
>>> ev = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }").evaluator
>>> ev.value("c").cone.rays, ev.value("nothing")
(((1, 0), (1, 2)), None)
"""
from __future__ import annotations

import hashlib
from fractions import Fraction

from ..cache import ContentCache
from ..geometry import cone as gcone
from ..geometry import lattice as glat
from ..geometry import linalg
from ..geometry import maps as gmaps
from ..geometry.budget import BudgetExceeded, Cancelled
from ..syntax import ast as A
from . import values as V
from .diagnostics import EvalError, Fix, Related, shifted
from . import imports as I
from .forms import (budget_advice, budget_message, fan_cone_label, fan_problem_message, fmt_vec,
                    violation_message)
from .imports import Imported
from .names import KIND_ARTICLE

# Evaluations remembered across analyses (an edited file is analysed again from scratch): for a
# statement whose evaluation reads nothing but its own text and the values of the names it uses,
# the value and the diagnostics it reported (spans relative to the statement) are a function of
# its content fingerprint (see Evaluator.fingerprint: statement type and text, the budget, and
# the kinds and fingerprints of those names).  So an edit re-evaluates only the edited statement
# and what uses a definition whose content changed.
_MEMO_TYPES = (A.LatticeStmt, A.ConeDef, A.ConeLet, A.MapStmt, A.CharactersStmt, A.PolytopeDef, A.PolytopeLet)
_MEMO = ContentCache("statement evaluations", 20_000)

def clear_memo() -> None:
    """Forget the remembered evaluations (see ``_MEMO``); the next analysis evaluates all.

    >>> from conelang.semantics.analysis import Analysis
    >>> clear_memo(); Analysis("lattice N = Z^2").value("N").space.rank
    2
    """
    _MEMO.clear()



class Evaluator:
    def __init__(self, names, engine, sink, text: str):
        self.names = names
        self.engine = engine
        self.sink = sink
        self.text = text
        self.defs = names.defs
        self.expects = names.expects
        self.in_cycle = names.in_cycle
        self.kind_of = names.kind_of
        self.topological_order = names.topological_order
        self._values: dict[str, object] = {}
        self._evaluating: set[str] = set()
        self._evaluated_all = False
        self._fingerprints: dict[str, bytes] = {}
        self._fingerprinting: set[str] = set()

    def fingerprint(self, name: str) -> bytes:
        """A digest of everything the value of ``name`` is computed from: the type and text of
        its statement, the budget, and the kinds and fingerprints of the names it uses (a name
        from another file: that file's fingerprint of it).  A statement that reads more than
        that (say, a morphism reading the file's expectations) is fingerprinted with the whole
        text of the file."""
        fp = self._fingerprints.get(name)
        if fp is not None:
            return fp
        st = self.defs.get(name)
        if st is None:
            parts = ("unknown", name)
        elif isinstance(st, Imported):
            parts = ("use", st.source_uri, st.source.evaluator.fingerprint(st.source_name))
        elif name in self.in_cycle or name in self._fingerprinting or not isinstance(st, _MEMO_TYPES):
            parts = ("file", self.text, name, self.engine.budget_limit)
        else:
            self._fingerprinting.add(name)       # a guard: fingerprints follow the same edges
            try:
                used = self.names.used.get(name, ())
                parts = (type(st).__name__, self.text[st.span[0]:st.span[1]], self.engine.budget_limit,
                         tuple((n, self.kind_of(n), self.fingerprint(n)) for n in used))
            finally:
                self._fingerprinting.discard(name)
        fp = hashlib.blake2b(repr(parts).encode("utf-8", "surrogatepass"), digest_size=20).digest()
        self._fingerprints[name] = fp
        return fp

    # ------------------------------------------------------------------ evaluation
    def value(self, name: str):
        """The value of a definition, or None when it (or something it uses) is in error."""
        if name in self._values:
            return self._values[name]
        st = self.defs.get(name)
        if st is None or name in self.in_cycle or name in self._evaluating:
            return None
        if isinstance(st, I.Imported):
            val = st.source.value(st.source_name)
            if val is None:
                self.sink.warning(st.name.span, "import-has-errors",
                                  f"'{st.source_name}' has errors in {st.source_label} (see the diagnostics of that file)")
            self._values[name] = val
            return val
        self._evaluating.add(name)
        try:
            val = self._evaluate_remembered(st)
        except EvalError:
            val = None
        except (BudgetExceeded, Cancelled) as exc:
            if isinstance(exc, Cancelled):
                self._evaluating.discard(name)
                raise
            self.sink.error(st.name.span, "budget", f"{budget_message(exc)}; {budget_advice(exc)}")
            val = None
        except RecursionError:
            self.sink.error(st.name.span, "too-deep", f"the definition of '{name}' is nested too deeply")
            val = None
        except Exception as exc:  # never lose the rest of the file to one bug
            self.sink.error(st.name.span, "internal-error",
                            f"internal error while evaluating '{name}': {type(exc).__name__}: {exc}")
            val = None
        finally:
            self._evaluating.discard(name)
        self._values[name] = val
        return val
    def _evaluate_remembered(self, st):
        """``_evaluate(st)``, or its value and diagnostics remembered from an earlier analysis
        of the same statement text with the same values of the names it uses (see ``_MEMO``)."""
        if not isinstance(st, _MEMO_TYPES):
            return self._evaluate(st)
        for n in self.names.used.get(st.name.text, ()):
            self.value(n)                      # what it uses reports its own diagnostics first
        key = self.fingerprint(st.name.text)
        hit = _MEMO.get(key)
        base = st.span[0]
        if hit is not None:
            val, diags = hit
            for d in diags:
                self.sink.add_diagnostic(shifted(d, base) if base else d)
            if val is None:
                raise EvalError("remembered failure")
            return val
        outer, self.sink.recording = self.sink.recording, []
        own = self.sink.recording
        try:
            val = self._evaluate(st)
        except EvalError:
            val = None
        finally:
            self.sink.recording = outer
            if outer is not None:
                outer.extend(own)
        lo, hi = st.span
        if all(lo <= sp[0] and sp[1] <= hi for d in own
               for sp in [d.span, *(r.span for r in d.related), *(f.span for f in d.fixes)]):
            _MEMO.put(key, (val, tuple(shifted(d, -base) if base else d for d in own)))
        if val is None:
            raise EvalError("evaluation failed")
        return val
    def evaluate_all(self) -> None:
        if self._evaluated_all:
            return
        for name in self.topological_order():
            self.value(name)
        self._evaluated_all = True
    def _fail(self, span, code, message, **kw):
        self.sink.error(span, code, message, **kw)
        raise EvalError(message)
    def _need(self, name: A.Name):
        val = self.value(name.text)
        if val is None:
            raise EvalError(f"'{name.text}' has errors")
        return val
    def _evaluate(self, st):
        if isinstance(st, A.LatticeStmt):
            return V.LatticeValue(self._lattice_body(st))
        if isinstance(st, A.ConeDef):
            from .polytopes import with_grading
            return with_grading(self, st, self._cone_def(st))
        if isinstance(st, A.ConeLet):
            return self._cone_expr(st.expr)
        if isinstance(st, A.MapStmt):
            return self._map(st)
        if isinstance(st, A.MorphismDef):
            return self._morphism(st)
        if isinstance(st, A.MorphismCompose):
            return self._compose(st)
        if isinstance(st, A.CharactersStmt):
            space = self._space(st.lattice)
            chars = self._vectors(st.vectors, space.dual(), "character", allow_zero=True)
            return V.CharactersValue(space, tuple(c for _, c in chars))
        if isinstance(st, A.FanDef):
            return self._fan_def(st)
        if isinstance(st, A.FanResolve):
            return self._fan_resolve(st)
        from . import polytopes
        if isinstance(st, polytopes.PolytopeStatements):
            return polytopes.evaluate(self, st)
        if isinstance(st, A.FanSubdivide):
            return self._fan_subdivide(st)
        raise EvalError("unknown statement")
    # lattices
    def _lattice_body(self, st: A.LatticeStmt) -> V.Space:
        body = st.body
        if isinstance(body, A.Overlattice):
            d = self._rank(body.base)
            glue = []
            for g in body.glue:
                if len(g.vector.entries) != d:
                    self._fail(g.vector.span, "vector-length",
                               f"glue vector {fmt_vec(g.vector.entries)} has {len(g.vector.entries)} coordinates, "
                               f"but Z^{d} has rank {d}")
                glue.append(tuple(g.coefficient * x for x in g.vector.entries))
            return V.Space(st.name.text, glat.overlattice(d, glue))
        space = self._space(body)
        if isinstance(body, A.StandardLattice):
            return V.Space(st.name.text, space.lattice)
        return space
    def _rank(self, std: A.StandardLattice) -> int:
        if std.rank < 1:
            self._fail(std.span, "bad-lattice", "a lattice must have rank at least 1")
        if std.rank > 1000:
            self._fail(std.span, "bad-lattice", f"rank {std.rank} is too large (at most 1000)")
        return std.rank
    def _space(self, expr) -> V.Space:
        if isinstance(expr, A.StandardLattice):
            d = self._rank(expr)
            return V.Space(f"Z^{d}", glat.standard(d))
        if isinstance(expr, A.DualLattice):
            return self._space(expr.inner).dual()
        if isinstance(expr, A.LatticeName):
            if self.kind_of(expr.name.text) != "lattice":
                raise EvalError("not a lattice")
            return self._need(expr.name).space
        raise EvalError("bad lattice")
    # vectors
    def _vectors(self, vecs, space: V.Space, role: str, allow_zero=False):
        """Check lengths, zero vectors and lattice membership; return (node, coords) pairs."""
        out, bad = [], False
        for v in vecs:
            if len(v.entries) != space.rank:
                self.sink.error(v.span, "vector-length",
                                f"this {role} has {len(v.entries)} coordinates, but {space.label} has rank {space.rank}")
                bad = True
                continue
            if not allow_zero and all(x == 0 for x in v.entries):
                self.sink.error(v.span, "zero-vector", f"a {role} must be a non-zero vector")
                bad = True
                continue
            x = space.to_coords(v.entries)
            if x is None:
                self.sink.error(v.span, "not-in-lattice", f"the {role} {fmt_vec(v.entries)} is not in the lattice {space.label}"
                                + self._lattice_hint(space, v))
                bad = True
                continue
            out.append((v, x))
        if bad:
            raise EvalError("bad vectors")
        return out
    def _primitive(self, node: A.Vector, x, space: V.Space, subdivision: bool = False):
        """The primitive vector on the ray of ``x`` (lattice coordinates, non-zero); when ``x``
        is not primitive, the ``not-primitive`` warning with the fix that writes it."""
        g = linalg.gcd_vec(x)
        prim = tuple(c // g for c in x)
        if g > 1:
            pv = fmt_vec(space.from_coords(prim))
            if subdivision:
                msg = (f"the vector {fmt_vec(node.entries)} is not primitive; the subdivision is at the "
                       f"primitive vector {pv} on its ray")
            else:
                msg = f"the ray {fmt_vec(node.entries)} is not primitive; the primitive vector on this ray is {pv}"
            self.sink.warning(node.span, "not-primitive", msg, fixes=(Fix(f"replace by {pv}", node.span, pv),))
        return prim
    def _lattice_hint(self, space: V.Space, v: A.Vector) -> str:
        if space.is_standard and not space.is_dual:
            return f" (Z^{space.rank} holds only integer vectors)"
        if space.is_standard and space.is_dual:
            return f" (dual Z^{space.rank} holds only integer vectors)"
        return ""
    def _cone_def(self, st: A.ConeDef) -> V.ConeValue:
        space = self._space(st.lattice)
        seen: dict[str, A.Section] = {}
        for sec in st.sections:
            kw = sec.keyword.text
            if kw == "grading":                 # see polytopes.with_grading
                continue
            if kw in seen:
                self._fail(sec.keyword.span, "duplicate-section", f"'{kw}' is given twice in this cone")
            seen[kw] = sec
        if "rays" in seen and ("halfspaces" in seen or "equations" in seen):
            other = seen.get("halfspaces") or seen.get("equations")
            self._fail(other.keyword.span, "mixed-description",
                       "a cone is given either by rays or by halfspaces and equations, not both")
        if not seen:
            self._fail(st.name.span, "missing-description",
                       f"cone '{st.name.text}' needs 'rays …' or 'halfspaces …' (write 'rays' alone for the zero cone)")
        d = space.rank
        if "rays" in seen:
            sec = seen["rays"]
            rays = self._vectors(sec.vectors, space, "ray")
            coords = [x for _, x in rays]
            for node, x in rays:
                self._primitive(node, x, space)
            cone = self.engine.cached("cone_from_rays", gcone.cone_from_rays, tuple(coords), d)
            redundant = tuple(gcone.redundant_generators(coords, d, cone=cone))
            for i in redundant:
                node, x = rays[i]
                if cone.lineality and all(linalg.dot(u, x) == 0 for u in cone.facets):
                    self.sink.warning(node.span, "ray-in-lineality",
                                      f"the ray {fmt_vec(node.entries)} lies in the lineality space of cone '{st.name.text}' "
                                      f"(the cone contains the whole line through it), so it is not an extremal ray")
                    continue
                self.sink.warning(node.span, "redundant-ray",
                                  f"the ray {fmt_vec(node.entries)} is not extremal: it is redundant in cone '{st.name.text}'",
                                  unnecessary=True,
                                  fixes=(Fix(f"remove the redundant ray {fmt_vec(node.entries)}", node.span, ""),))
            return V.ConeValue(space, cone, redundant=redundant)
        dual_space = space.dual()
        ineqs = self._vectors(seen["halfspaces"].vectors, dual_space, "inequality") if "halfspaces" in seen else []
        eqs = self._vectors(seen["equations"].vectors, dual_space, "equation") if "equations" in seen else []
        ic = [x for _, x in ineqs]
        ec = [x for _, x in eqs]
        cone = self.engine.cached("cone_from_inequalities", gcone.cone_from_inequalities, tuple(ic), tuple(ec), d)
        redundant = tuple(gcone.redundant_inequalities(ic, ec, d, cone=cone))
        for i in redundant:
            node = ineqs[i][0]
            self.sink.warning(node.span, "redundant-inequality",
                              f"the inequality {fmt_vec(node.entries)} ≥ 0 is redundant: it does not cut out a facet",
                              unnecessary=True,
                              fixes=(Fix(f"remove the redundant inequality {fmt_vec(node.entries)}", node.span, ""),))
        return V.ConeValue(space, cone, redundant=redundant)
    def cone_expr(self, expr) -> V.ConeValue:
        """The value of a cone expression of this file (``dual c``, ``f(c) & d``, …), for
        the expectations; raises EvalError after reporting what is wrong."""
        return self._cone_expr(expr)
    def _cone_expr(self, expr) -> V.ConeValue:
        if isinstance(expr, A.ConeRef):
            return self._need(expr.name)
        if isinstance(expr, A.DualCone):
            inner = self._cone_expr(expr.inner)
            return V.ConeValue(inner.space.dual(), self.engine.dual(inner.cone))
        if isinstance(expr, A.FaceCone):
            inner = self._cone_expr(expr.inner)
            (node, u), = self._vectors([expr.functional], inner.space.dual(), "functional", allow_zero=True)
            for r in inner.cone.rays + inner.cone.lineality + tuple(tuple(-c for c in l) for l in inner.cone.lineality):
                val = linalg.dot(u, r)
                if val < 0:
                    rv = fmt_vec(inner.space.from_coords(r))
                    self._fail(node.span, "face-not-dual",
                               f"{fmt_vec(node.entries)} is not in the dual cone, so it cuts out no face: "
                               f"<{fmt_vec(node.entries)}, {rv}> = {val} < 0")
            return V.ConeValue(inner.space, gcone.face(inner.cone, u))
        if isinstance(expr, A.ConeOver):
            from .polytopes import cone_over
            return cone_over(self, expr)
        if isinstance(expr, A.MeetCone):
            left, right = self._cone_expr(expr.left), self._cone_expr(expr.right)
            if left.space != right.space:
                self._fail(expr.span, "lattice-mismatch",
                           f"cannot intersect a cone in {left.space.label} with a cone in {right.space.label}")
            return V.ConeValue(left.space, gcone.intersection(left.cone, right.cone))
        if isinstance(expr, (A.ImageCone, A.PreimageCone)):
            m = self._need(expr.map)
            inner = self._cone_expr(expr.inner)
            if isinstance(expr, A.ImageCone):
                if inner.space != m.source:
                    self._fail(expr.inner.span, "lattice-mismatch",
                               f"'{expr.map.text}' maps {m.source.label} to {m.target.label}, "
                               f"but this cone lives in {inner.space.label}")
                return V.ConeValue(m.target, gmaps.image(m.matrix, inner.cone))
            if inner.space != m.target:
                self._fail(expr.inner.span, "lattice-mismatch",
                           f"'{expr.map.text}' maps {m.source.label} to {m.target.label}, "
                           f"but this cone lives in {inner.space.label}")
            return V.ConeValue(m.source, gmaps.preimage(m.matrix, inner.cone))
        raise EvalError("bad cone expression")
    def _map(self, st: A.MapStmt) -> V.MapValue:
        """A lattice map.  ``images v1 … vn``: the images of the standard basis vectors of the
        source's ambient Q^n (n = source rank, each vector in target coordinates); ``rows r1 … rm``:
        the m rows of the matrix (each with n entries).  The map must send the source lattice into
        the target lattice: checked on a basis of the source lattice."""
        source, target = self._space(st.source), self._space(st.target)
        sec = st.section
        m, n = target.rank, source.rank
        images = sec.keyword.text == "images"
        count, length = (n, m) if images else (m, n)
        given = len(sec.vectors)
        if given != count:
            span = sec.span if given < count else (sec.vectors[count].span[0], sec.vectors[-1].span[1])
            if images:
                msg = (f"a map from {source.label} (rank {n}) needs {n} images, one per basis vector "
                       f"e1..e{n}; {given} given")
            else:
                msg = f"a map to {target.label} (rank {m}) needs {m} rows, one per coordinate; {given} given"
            self.sink.error(span, "map-shape", msg)
        bad_length = False
        for v in sec.vectors:
            if len(v.entries) != length:
                bad_length = True
                if images:
                    msg = (f"each image lies in {target.label} and needs {m} coordinates; "
                           f"this one has {len(v.entries)}")
                else:
                    msg = (f"each row has one entry per coordinate of {source.label}, so {n}; "
                           f"this one has {len(v.entries)}")
                self.sink.error(v.span, "map-shape", msg)
        if given != count or bad_length:
            raise EvalError("bad map shape")
        if images:
            rows = tuple(tuple(sec.vectors[j].entries[i] for j in range(n)) for i in range(m))
        else:
            rows = tuple(v.entries for v in sec.vectors)
        cols, bad = [], False
        for j, b in enumerate(source.coordinate_basis):
            img = tuple(sum(Fraction(r[k]) * b[k] for k in range(n)) for r in rows)
            y = target.to_coords(img)
            if y is None:
                bad = True
                standard_e = all(x == (1 if k == j else 0) for k, x in enumerate(b))
                span = sec.vectors[j].span if images and standard_e else sec.span
                self.sink.error(span, "not-in-lattice",
                                f"the map sends the lattice vector {fmt_vec(b)} of {source.label} to "
                                f"{fmt_vec(img)}, which is not in {target.label}"
                                + self._lattice_hint(target, None))
            cols.append(y)
        if bad:
            raise EvalError("map leaves the target lattice")
        matrix = tuple(tuple(cols[j][i] for j in range(n)) for i in range(m))
        return V.MapValue(source, target, matrix, tuple(tuple(Fraction(x) for x in r) for r in rows))
    def _expects_incompatible(self, name: str) -> bool:
        """True iff the file states ``expect <name> not compatible`` (see the morphism section
        of :mod:`conelang.semantics.properties`)."""
        return any(ex.subject.text == name and ex.negated and ex.prop is not None
                   and ex.prop.text == "compatible" and ex.value is None for ex in self.expects)
    def _morphism(self, st: A.MorphismDef) -> V.MorphismValue:
        m = self._need(st.map)
        src, tgt = self._need(st.source), self._need(st.target)
        bad = False
        for cone_name, val, want, role in ((st.source, src, m.source, "source"), (st.target, tgt, m.target, "target")):
            if val.space != want:
                bad = True
                self.sink.error(cone_name.span, "lattice-mismatch",
                                f"'{st.map.text}' has {role} lattice {want.label}, but '{cone_name.text}' "
                                f"lives in {val.space.label}")
        if bad:
            raise EvalError("lattice mismatch")
        for cone_name, val in ((st.source, src), (st.target, tgt)):
            line = gcone.a_line_in(val.cone)
            if line is not None:
                bad = True
                self.sink.error(cone_name.span, "not-pointed",
                                f"'{cone_name.text}' is not pointed (it contains the line through "
                                f"{fmt_vec(val.space.from_coords(line))}), so it does not define an affine toric variety")
        if bad:
            raise EvalError("not pointed")
        value = V.MorphismValue(st.map.text, m, st.source.text, st.target.text, src, tgt)
        message = violation_message(value)
        if message is not None and not self._expects_incompatible(st.name.text):
            self._fail(st.span, "incompatible-morphism", message,
                       related=(Related(self.defs[st.target.text].span, f"'{st.target.text}' is defined here"),
                                Related(self.defs[st.source.text].span, f"'{st.source.text}' is defined here")))
        return value
    def _compose(self, st: A.MorphismCompose) -> V.MorphismValue:
        parts = [self._need(p) for p in st.parts]   # g ∘ f: the last one is applied first
        for name, part in zip(st.parts, parts):
            message = violation_message(part)
            if message is not None:
                self._fail(name.span, "incompatible-morphism",
                           f"'{name.text}' is not a morphism, so it cannot be composed: {message}")
        result = parts[-1]
        for name, outer in zip(reversed(st.parts[:-1]), reversed(parts[:-1])):
            if outer.source != result.target:
                self._fail(name.span, "lattice-mismatch",
                           f"cannot compose: '{name.text}' starts at cone '{outer.source_name}', "
                           f"but the morphism before it ends at '{result.target_name}'")
            matrix = linalg.mat_mul(outer.map.matrix, result.map.matrix, result.map.source.rank)
            rows = tuple(tuple(Fraction(x) for x in r) for r in linalg.mat_mul(
                outer.map.ambient_rows, result.map.ambient_rows, result.map.source.rank))
            composite = V.MapValue(result.map.source, outer.map.target, tuple(tuple(r) for r in matrix), rows)
            result = V.MorphismValue(f"{name.text} ∘ {result.map_name}", composite, result.source_name,
                                     outer.target_name, result.source, outer.target)
        return result
    def _fan_def(self, st: A.FanDef) -> V.FanValue:
        space = self._space(st.lattice)
        rays = self._vectors(st.rays, space, "ray")
        coords = []
        for node, x in rays:
            coords.append(self._primitive(node, x, space))
        cones = []
        for il in st.cones:
            idx = []
            for i, sp in il.indices:
                if not 1 <= i <= len(coords):
                    self._fail(sp, "bad-index", f"ray index {i} is out of range: the fan has {len(coords)} rays (numbered from 1)")
                if i - 1 in idx:
                    self.sink.warning(sp, "fan-duplicate-index", f"ray {i} is already listed in this cone",
                                      unnecessary=True, fixes=(Fix(f"remove the repeated index {i}", sp, ""),))
                    continue
                idx.append(i - 1)
            cones.append(tuple(idx))
        value = V.FanValue(space, tuple(coords), tuple(cones))
        self._fan_diagnostics(st, value, [node for node, _ in rays])
        return value
    def _fan_diagnostics(self, st: A.FanDef, value: V.FanValue, ray_nodes) -> None:
        """Report the problems found by :func:`conelang.geometry.fan.check_fan` at the cone
        (or ray) concerned, with the other cone as related information.  The value is kept:
        ``expect F not valid`` and the facts (``valid: false``) still work; when the file says
        ``expect F not valid`` the errors are reported as information, so that a file showing
        an invalid fan can pass ``conelang check``."""
        check = self.engine.fan_check(value)
        space = value.space
        fmt = lambda x: fmt_vec(space.from_coords(x))
        listed = len(st.cones)

        def where(ci):
            """Span of cone ``ci`` (a listed index list, or the ray of an unused-ray cone)."""
            if ci < listed:
                return st.cones[ci].span
            return ray_nodes[check.cones[ci][0]].span

        # ``expect F not valid`` states that the cones are not a fan: say where, without failing
        demo = any(ex.subject.text == st.name.text and ex.negated and ex.prop is not None
                   and ex.prop.text == "valid" and ex.value is None for ex in self.expects)
        for p in check.problems:
            msg = fan_problem_message(p, fmt)
            related = ()
            if p.code in ("fan-duplicate-ray", "fan-unused-ray"):
                span = ray_nodes[p.ray].span
                if p.other_ray is not None:
                    related = (Related(ray_nodes[p.other_ray].span, f"ray {p.other_ray + 1} is listed here"),)
            elif p.code == "fan-not-ray":
                span = next((sp for i, sp in st.cones[p.cone].indices if i - 1 == p.ray), where(p.cone)) \
                    if p.cone < listed else where(p.cone)
            else:
                span = where(p.cone)
                if p.other is not None:
                    related = (Related(where(p.other), f"the other cone, {fan_cone_label(check.cones[p.other])}"),)
            if p.is_error and demo:
                self.sink.info(span, p.code, msg + f" (as expected: 'expect {st.name.text} not valid')",
                               related=related)
            elif p.is_error:
                self.sink.error(span, p.code, msg, related=related)
            else:
                self.sink.warning(span, p.code, msg, related=related,
                                  unnecessary=p.code == "fan-redundant-cone")
    def _fan_resolve(self, st: A.FanResolve) -> V.FanValue:
        c = self._need(st.cone)
        line = gcone.a_line_in(c.cone)
        if line is not None:
            self._fail(st.cone.span, "not-pointed",
                       f"'{st.cone.text}' is not pointed (it contains the line through "
                       f"{fmt_vec(c.space.from_coords(line))}); only pointed cones can be resolved")
        res = self.engine.resolve(c.cone)
        if st.crepant:
            if res.crepant_rays is None:
                self._fail(st.cone.span, "not-gorenstein",
                           f"'{st.cone.text}' is not Gorenstein (no m in M takes the value 1 on every ray), "
                           "so it has no crepant subdivision at height one; use 'resolve' for a smooth refinement")
            return V.FanValue(c.space, res.crepant_rays, res.crepant_cones, st.cone.text, crepant=True)
        return V.FanValue(c.space, res.rays, res.cones, st.cone.text)
    def _fan_subdivide(self, st: A.FanSubdivide) -> V.FanValue:
        """``star X at v`` / ``refine X by v1, …``: star subdivisions (geometry.subdivision) of a
        pointed cone or a valid fan X at vectors of its support (made primitive, with a warning)."""
        from ..geometry import subdivision
        base_kind = self.kind_of(st.base.text)
        if base_kind not in ("cone", "fan"):
            self._fail(st.base.span, "wrong-kind",
                       f"'{st.base.text}' is {KIND_ARTICLE[base_kind]}, but a cone or a fan is expected here")
        base = self._need(st.base)
        space = base.space
        if base_kind == "cone":
            line = gcone.a_line_in(base.cone)
            if line is not None:
                self._fail(st.base.span, "not-pointed",
                           f"'{st.base.text}' is not pointed (it contains the line through "
                           f"{fmt_vec(space.from_coords(line))}), so it is not a cone of a fan")
            rays, cones = base.cone.rays, (tuple(range(len(base.cone.rays))),)
        else:
            check = self.engine.fan_check(base)
            if not check.valid:
                self._fail(st.base.span, "invalid-fan",
                           f"'{st.base.text}' is not a fan, so it cannot be subdivided: "
                           + fan_problem_message(check.errors[0], lambda x: fmt_vec(space.from_coords(x))))
            rays, cones = base.rays, tuple(check.cones[i] for i in check.maximal)
        if not st.vectors:
            self._fail(st.span, "missing-description", "'refine' needs at least one vector after 'by'")
        d = space.rank
        vectors = []
        for node, x in self._vectors(st.vectors, space, "vector"):
            prim = self._primitive(node, x, space, subdivision=True)
            if subdivision.cone_containing(rays, cones, d, prim) is None:
                self._fail(node.span, "not-in-support", self._outside_message(node, st.base.text, base_kind, base, prim))
            if prim in rays or prim in vectors:
                self.sink.warning(node.span, "existing-ray",
                                  f"{fmt_vec(node.entries)} is already a ray, so the star subdivision at it changes nothing",
                                  unnecessary=True)
            vectors.append(prim)
            rays, cones = subdivision.star_subdivision(rays, cones, d, prim, self.engine.budget())
        return V.FanValue(space, tuple(rays), tuple(cones), subdivides=st.base.text)
    def _outside_message(self, node, name: str, kind: str, base, v) -> str:
        if kind == "cone":
            u = next(u for u in base.cone.facets if linalg.dot(u, v) < 0) if any(
                linalg.dot(u, v) < 0 for u in base.cone.facets) else None
            if u is not None:
                us = fmt_vec(base.space.dual().from_coords(u))
                return (f"{fmt_vec(node.entries)} is not in the cone '{name}': <{us}, {fmt_vec(node.entries)}> = "
                        f"{linalg.dot(u, v)} < 0")
            e = next(e for e in base.cone.equations if linalg.dot(e, v) != 0)
            es = fmt_vec(base.space.dual().from_coords(e))
            return f"{fmt_vec(node.entries)} is not in the span of the cone '{name}': <{es}, {fmt_vec(node.entries)}> ≠ 0"
        return f"{fmt_vec(node.entries)} lies in no cone of the fan '{name}' (outside its support)"

    # the helpers other statement kinds evaluate with (see the module docstring)
    fail = _fail
    need = _need
    space = _space
    vectors = _vectors
