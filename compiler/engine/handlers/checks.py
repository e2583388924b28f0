"""The check handler: a claim decided proven, sampled, failed or error (see ``compiler.checks``)."""
from __future__ import annotations

from ...checks import claim
from ...results import Step
from ...statements import nodes as n


def _check(scope, s: n.Check, step: Step) -> None:
    lhs = scope.read(s.lhs)
    rhs = scope.read(s.rhs)
    text = s.source.split(None, 1)[1] if " " in s.source else s.source
    step.checks.append(claim(lhs, s.op, rhs, scope.points(s.clauses), scope.context(s.line), text))


HANDLERS = {n.Check: _check}
