"""Handlers for gauge bundles (a declaration) and ``factorize`` (an operation).

A gauge declaration registers the group's invariants as ring generators and
says in its summary which trace and curvature normalisation is in force.
``factorize`` looks for I = X Y with the given form degrees, multiplies the
factors back as its check, and when there is no such factorization fails
with the irreducible factors as the obstruction.
"""
from __future__ import annotations

from ...algebra import factor, gauge, groups
from ...algebra.weights import GroupError
from ...results import CheckResult, Step
from ...statements import nodes as n
from ...statements.tree import Ident
from ..scope import fraction_text
from .common import element


def _group(scope, s: n.GaugeDecl) -> tuple[groups.Group, object]:
    """The group and, at symbolic rank, the rank symbol as a ring element."""
    if s.rank_name is None:
        return groups.group(s.family, s.rank), None
    if s.family not in groups.CLASSICAL:
        groups.group(s.family)  # an unknown name gets its suggestion first
        raise GroupError(f"{s.family} has a fixed rank; a symbolic rank ({s.rank_name}) "
                         f"exists for SU(N), SO(N) and Sp(N) only")
    spec = scope.specs[s.rank_name]
    if not spec.integer:
        raise GroupError(f"the rank {s.rank_name} must be a symbol declared integer "
                         f"(symbol {s.rank_name}: integer, {s.rank_name} >= 2)")
    return groups.group(s.family), scope.ring.symbol(scope.symbols[s.rank_name])


def _gauge(scope, s: n.GaugeDecl, step: Step) -> None:
    index, curvature = (scope.conventions[x] if isinstance(x, Ident) else x
                        for x in (s.index, s.curvature))
    try:
        g, rank = _group(scope, s)
        declared = [gauge.declare(scope.ring, name, g, index, rank, curvature) for name in s.names]
    except GroupError as exc:
        raise scope.fail(s, str(exc)) from None
    for name, bundle in zip(s.names, declared):
        scope.bind(name, "gauge", bundle, s.line)
    origin = "".join(f" (convention {x} = {fraction_text(scope.conventions[x])})"
                     for x in (s.index, s.curvature) if isinstance(x, Ident))
    step.summary = "; ".join(b.describe() for b in declared) + origin
    if rank is not None:
        step.summary += f"; traces exact for every {s.rank_name}, as identities of invariant polynomials"


def _factorize(scope, s: n.Factorize, step: Step) -> None:
    target = element(scope, s.target, "factorize")
    result = factor.factorize(target, s.degrees)
    asked = f"factors of degrees {' and '.join(map(str, s.degrees))}"
    if result.factors is None:
        pieces = "; ".join(f"({f.to_text()})" + (f"^{m}" if m > 1 else "") + f" of degree {d}"
                           for f, d, m in result.irreducible)
        step.checks.append(CheckResult(asked, "failed",
                                       f"no product of the irreducible factors has degree "
                                       f"{s.degrees[0]}: {result.content.to_text()} * {pieces}"))
        scope.bind_missing(s.outputs, s.line)
        return
    product = result.factors[0] * result.factors[1]
    ok = product == target
    step.checks.append(CheckResult(f"{asked}: {s.outputs[0]}*{s.outputs[1]} multiplied back "
                                   "gives the class", "proven" if ok else "failed",
                                   "" if ok else f"the difference is {(product - target).to_text()}"))
    for name, value in zip(s.outputs, result.factors):
        scope.output(step, name, value, s.line)


DECLARATIONS = {n.GaugeDecl: _gauge}
OPERATIONS = {n.Factorize: _factorize}
