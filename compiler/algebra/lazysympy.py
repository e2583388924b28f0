"""sympy, imported on first use: a build whose algebra stays on FLINT never pays for it.

Modules write ``from ..algebra.lazysympy import sympy`` and use ``sympy.X``
as usual; the first attribute read imports sympy.  ``is_sympy`` tells a
sympy object from our own values without importing anything.
"""
from __future__ import annotations


class _Sympy:
    """Stands for the sympy module; reading an attribute imports it."""

    __slots__ = ()

    def __getattr__(self, name: str):
        import sympy
        return getattr(sympy, name)


sympy = _Sympy()


def is_sympy(value) -> bool:
    """Whether ``value`` is a sympy object (then sympy is already imported)."""
    return (type(value).__module__ or "").startswith("sympy")


def sympy_symbol(symbol):
    """A ring symbol as a sympy Symbol: sympy's own as it is, the engine's
    declared symbols by their ``sympy()``."""
    return symbol if is_sympy(symbol) else symbol.sympy()
