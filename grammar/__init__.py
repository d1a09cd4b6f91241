"""The conelang grammar, shipped as package data (``conelang.lark``)."""
