"""The built-in functions of expressions: one small rule each, chosen from a table.

The evaluator (``expressions``) looks a call up here: ``FUNCTIONS`` by name,
``CLASS_RULES`` by prefix for indexed classes (``p2``, ``c1``, ``ch3``), with
``CLASS_DEGREE`` and ``TRUNCATED`` saying how far each result is exact.
"""
from __future__ import annotations

from typing import Callable

from . import constructions, expressions as ex, notation, representations
from .algebra import genera
from .algebra.graded import Element
from .algebra.lazysympy import sympy
from .precision import Known
from .statements import expr_nodes as en


def _pontryagin(ev: ex.Evaluator, node: en.Call, i: int) -> ex.Value:
    return ev.scope.bundles.pontryagin(ev.bundle_arg(node), i)


def _chern(ev: ex.Evaluator, node: en.Call, i: int) -> ex.Value:
    return ev.scope.bundles.chern(ev.bundle_arg(node), i)


def _ch_component(ev: ex.Evaluator, node: en.Call, k: int) -> ex.Value:
    """ch_k(X) = part(ch(X), 2k): a generator for a bundle of symbolic rank."""
    ev.arity(node, 1)
    return constructions.construction(ev, node.args[0]).ch.part(2 * k)


CLASS_RULES = {"p": representations.or_built(_pontryagin, representations.pontryagin_of),
               "c": representations.or_built(_chern, representations.chern_of),
               "ch": _ch_component}
#: The form degree of the class ``prefix + i`` is ``CLASS_DEGREE[prefix] * i``.
CLASS_DEGREE = {"p": 4, "c": 2, "ch": 2}


def _euler(ev, node):
    return ev.scope.bundles.euler(ev.bundle_arg(node))


def _total_p(ev, node):
    return ev.scope.bundles.total_pontryagin(ev.bundle_arg(node))


def _total_c(ev, node):
    return ev.scope.bundles.total_chern(ev.bundle_arg(node))


def _ahat(ev, node):
    return genera.ahat(ev.scope.bundles, ev.bundle_arg(node))


def _hirzebruch_l(ev, node):
    return genera.hirzebruch_l(ev.scope.bundles, ev.bundle_arg(node))


def _todd(ev, node):
    return genera.todd(ev.scope.bundles, ev.bundle_arg(node))


def _ch(ev, node):
    if len(node.args) == 2:
        return representations.character(ev, node)
    return constructions.construction(ev, node.args[0]).ch


def _part(ev, node):
    ev.arity(node, 2)
    k = ev.integer_arg(node.args[1])
    value = ev.read(node.args[0], k).value
    if isinstance(value, Element):
        return value.part(k)
    return value if k == 0 else ev.scope.ring.zero()


def _degree(ev, node):
    ev.arity(node, 1)
    value = ev.read(node.args[0]).value
    if not isinstance(value, Element):
        return ev.scope.ring.zero()
    degrees = value.degrees()
    if len(degrees) > 1:
        raise ev.fail(node, "degree() of a value with several degrees: "
                            + ", ".join(map(str, degrees)))
    return ev.scope.ring.scalar(degrees[0] if degrees else 0)


def _sqrt(ev, node):
    ev.arity(node, 1)
    known = ev.read(node.args[0], 0)
    value, exact_to = known.value, known.exact_to
    if not ex.is_class_free(value):
        raise ev.fail(node, "sqrt() of a value with classes")
    if ex.as_expr(value).is_negative:
        raise ev.fail(node, f"sqrt() of a negative value: {notation.text(ex.as_expr(value))}")
    from .algebra.radicals import tidy  # sympy: imported for radicals only
    root = tidy(sympy.sqrt(ex.as_expr(value)), list(ev.scope.specs.values()))
    return Known(ex.from_expr(ev.scope.ring, root), exact_to)


def _not_here(ev, node):
    raise ev.fail(node, f"{node.func}() is a bundle construction: use it inside ch(...)"
                  if node.func in constructions.CONSTRUCTIONS else f"{node.func}() belongs in a split statement")


FUNCTIONS: dict[str, Callable] = {
    "e": representations.or_built(_euler, representations.euler_of),
    "p": representations.or_built(_total_p, representations.pontryagin_of),
    "c": representations.or_built(_total_c, representations.chern_of),
    "Ahat": _ahat, "L": _hirzebruch_l,
    "td": _todd, "ch": _ch, "part": _part, "degree": _degree, "sqrt": _sqrt,
    "S": _not_here, "dual": _not_here, "wedge": _not_here, "sym": _not_here,
    "trivial": _not_here, "S+": _not_here, "S-": _not_here,
    "tr": representations.trace, "pf": representations.pfaffian,
}


#: Built-ins whose value is a series cut at ``truncate``: exact only up to it.
TRUNCATED = frozenset({"p", "c", "Ahat", "L", "td", "ch"})
