"""Bundle constructions inside ``ch(...)``: names, S, S+, S-, dual, +, *, wedge, sym.

The evaluator reads ``ch(X)`` through ``construction``, which builds the
``BundleValue`` of X node by node; a construction anywhere else is refused.
"""
from __future__ import annotations

from .algebra.genera import BundleValue
from .statements import expr_nodes as en


def construction(ev, node):
    """A bundle construction inside ``ch(...)``, as a ``BundleValue``."""
    if isinstance(node, en.Name):
        kind, _ = ev.lookup(node.id, node.line, node.column)
        if kind != "bundle":
            hint = f"; give a representation, as in ch({node.id}, adjoint)" if kind == "gauge" else ""
            raise ev.fail(node, f"'{node.id}' is a {kind}, not a bundle{hint}")
        ev.scope.note_class_use(node.id, node.line)
        return BundleValue.of(ev.scope.bundles, node.id)
    if isinstance(node, en.Binary) and node.op in ("+", "*"):
        left, right = construction(ev, node.left), construction(ev, node.right)
        return left + right if node.op == "+" else left * right
    if isinstance(node, en.Call) and node.func in CONSTRUCTIONS:
        return CONSTRUCTIONS[node.func](ev, node)
    raise ev.fail(node, "ch() takes a bundle or a bundle construction: "
                        "S(B), S+(B), S-(B), dual(V), V + W, V*W, wedge(V, k), sym(V, k)")


def _spinor(ev, node):
    ev.arity(node, 1)
    return BundleValue.spinor(ev.scope.bundles, ev.bundle_arg(node))


def _dual(ev, node):
    ev.arity(node, 1)
    return construction(ev, node.args[0]).dual()


def _wedge(ev, node):
    ev.arity(node, 2)
    return construction(ev, node.args[0]).wedge(ev.integer_arg(node.args[1]))


def _sym(ev, node):
    ev.arity(node, 2)
    return construction(ev, node.args[0]).sym(ev.integer_arg(node.args[1]))


def _chiral_spinor(ev, node: en.Call) -> BundleValue:
    """S+(B) or S-(B)."""
    ev.arity(node, 1)
    return BundleValue.chiral(ev.scope.bundles, ev.bundle_arg(node), 1 if node.func == "S+" else -1)


CONSTRUCTIONS = {"S": _spinor, "dual": _dual, "wedge": _wedge, "sym": _sym,
                 "S+": _chiral_spinor, "S-": _chiral_spinor}
