"""Built-ins on gauge bundles and constructions: ch(G, rep), tr(G, rep, k),
tr(G, k), pf(G), and c, c_k, p, p_k, e of a bundle construction.

Each is a small function ``(evaluator, call node) -> value`` that the
expression evaluator's table chooses; the group theory is in
``algebra/gauge.py``.  A ``GroupError`` (an unknown representation, labels
of the wrong length, a symbolic rank where only numeric ones are defined)
becomes a located error with the group module's suggestion.
"""
from __future__ import annotations

from functools import wraps

from . import constructions
from .algebra import gauge, newton
from .algebra.weights import GroupError
from .statements import expr_nodes as en

_HOW = ("give a representation: a name such as adjoint, fundamental, vector, spinor+, "
        "antisymmetric(3), or Dynkin labels such as [1, 0, 0]")


def _located(rule):
    @wraps(rule)
    def checked(ev, node):
        try:
            return rule(ev, node)
        except GroupError as exc:
            raise ev.fail(node, str(exc)) from None
    return checked


def gauge_arg(ev, node: en.Call) -> gauge.GaugeBundle:
    arg = node.args[0]
    if not isinstance(arg, en.Name):
        raise ev.fail(arg, f"{node.func}() takes a gauge bundle first")
    kind, value = ev.lookup(arg.id, arg.line, arg.column)
    if kind != "gauge":
        raise ev.fail(arg, f"{node.func}() with a representation takes a gauge bundle, "
                           f"and '{arg.id}' is a {kind}")
    return value


def _rep(ev, node):
    if not isinstance(node, en.RepSpec):
        raise ev.fail(node, _HOW)
    return (node.name or node.labels, node.power)


@_located
def character(ev, node: en.Call):
    """ch(G, rep) = tr_rep exp(F)."""
    bundle = gauge_arg(ev, node)
    return gauge.character(ev.scope.ring, bundle, _rep(ev, node.args[1]))


@_located
def trace(ev, node: en.Call):
    """tr(G, k): the trace in force; tr(G, rep, k): the trace in a representation."""
    bundle = gauge_arg(ev, node)
    if isinstance(node.args[-1], en.RepSpec):
        raise ev.fail(node, f"give the power too, as in tr({node.args[0].id}, adjoint, 2)")
    degree = ev.integer_arg(node.args[-1])
    if len(node.args) == 2:
        return gauge.trace_in_force(ev.scope.ring, bundle, degree)
    return gauge.trace(ev.scope.ring, bundle, _rep(ev, node.args[1]), degree)


@_located
def pfaffian(ev, node: en.Call):
    return gauge.pfaffian(ev.scope.ring, gauge_arg(ev, node))


# ---------------------------------------------------------------- classes of constructions

def or_built(declared, built):
    """A class rule that takes a declared bundle (``c2(V)``) to ``declared`` and a
    construction (``c2(wedge(V, 2))``) to ``built``."""
    @wraps(declared)
    def rule(ev, node: en.Call, *index):
        if len(node.args) == 1 and not isinstance(node.args[0], en.Name):
            return built(ev, node, *index)
        return declared(ev, node, *index)
    return rule


_COMPLEX_ONLY = frozenset({"S", "S+", "S-"})


def _real(ev, node) -> bool:
    """A construction from real bundles by sums, products, duals and powers is real;
    spinors and complex bundles make it complex."""
    if isinstance(node, en.Name):
        return ev.scope.bundles.kind(node.id) == "real"
    if isinstance(node, en.Binary):
        return _real(ev, node.left) and _real(ev, node.right)
    return node.func not in _COMPLEX_ONLY and _real(ev, node.args[0])


def _construction(ev, node: en.Call):
    ev.arity(node, 1)
    value = constructions.construction(ev, node.args[0])
    return value, _real(ev, node.args[0])


def chern_of(ev, node: en.Call, index: int | None = None):
    """c(X) or c_k(X) of a construction X (of its complexification when X is real)."""
    value, _ = _construction(ev, node)
    classes = newton.chern_classes(value.ch, value.rank)
    if index is None:
        return sum(classes, ev.scope.ring.zero())
    return classes[index] if index < len(classes) else ev.scope.ring.zero()


def pontryagin_of(ev, node: en.Call, index: int | None = None):
    """p(X) or p_k(X): of X itself when real, of its underlying real bundle when complex."""
    value, real = _construction(ev, node)
    classes = newton.pontryagin_classes(value.ch, value.rank, real)
    if index is None:
        return sum(classes, ev.scope.ring.zero())
    return classes[index] if index < len(classes) else ev.scope.ring.zero()


def euler_of(ev, node: en.Call):
    value, real = _construction(ev, node)
    return newton.euler_class(value.ch, value.rank, real)
