"""The ``matter`` handler: an anomaly polynomial formed from field content.

Each body line becomes the Chern character of its representation (gauge
representations, constructions and line-bundle charges multiplied), its
density from ``algebra/anomalies.py`` and its multiplicity; the step shows
every line's contribution and binds the sum.
"""
from __future__ import annotations

from ...algebra import anomalies, gauge, genera
from ...algebra.errors import AlgebraError
from ...algebra.weights import GroupError
from ... import constructions
from ...expressions import is_class_free
from ...results import Step
from ...statements import matter, nodes as n
from ..scope import record
from .common import degree_check


def _is_line(bundles, name: str) -> bool:
    """A complex bundle of rank 1: charges are taken under it."""
    return bundles.kind(name) == "complex" and bundles.rank(name) == 1


def _background(scope, s: n.MatterDecl) -> anomalies.Background:
    bundles = scope.bundles
    scope.note_class_use(s.tangent, s.line)
    bg = dict(ahat=genera.ahat(bundles, s.tangent), ch_tangent=genera.chern_character(bundles, s.tangent),
              l_genus=genera.hirzebruch_l(bundles, s.tangent))
    if s.r_symmetry is None:
        return anomalies.Background(**bg)
    kind, value = scope.lookup(s.r_symmetry, s.line, s.column)
    wanted = anomalies.R_SYMMETRY.get(s.dimension)
    if wanted == "line" and kind == "bundle" and _is_line(bundles, s.r_symmetry):
        scope.note_class_use(s.r_symmetry, s.line)
        return anomalies.Background(**bg, r_line=bundles.chern(s.r_symmetry, 1))
    if wanted == "doublet" and kind == "gauge" and value.group.family in ("SU", "Sp") \
            and value.group.series == ("A", 1):
        return anomalies.Background(**bg, r_doublet=gauge.character(scope.ring, value, ("fundamental", None)))
    need = {"line": "a line bundle", "doublet": "a gauge bundle of SU(2)"}.get(wanted)
    raise scope.fail(s, f"the R-symmetry of {s.dimension}-dimensional multiplets is {need}"
                     if need else f"there are no R-symmetric multiplets in {s.dimension} dimensions here")


def _character(scope, s: n.MatterDecl, f: matter.Field):
    """ch of the field's representation and its R-charge (zero when not given)."""
    ring = scope.ring
    ch, r = ring.one(), ring.zero()
    for factor in f.factors:
        if factor.gauge is not None:
            _, bundle = scope.lookup(factor.gauge, factor.line, factor.column)
            if not isinstance(bundle, gauge.GaugeBundle):
                raise scope.fail(factor, f"'{factor.gauge}' is not a gauge bundle; write a bundle "
                                         "construction without parentheses")
            try:
                ch = ch * gauge.character(ring, bundle, (factor.rep.name or factor.rep.labels,
                                                         factor.rep.power))
            except GroupError as exc:
                raise scope.fail(factor, str(exc)) from None
        else:
            ch = ch * constructions.construction(scope.evaluator, factor.construction).ch
    for charge in f.charges:
        q = scope.evaluate(charge.value)
        if not is_class_free(q):
            raise scope.fail(charge, "a charge is a number or an expression in the symbols")
        if not _is_line(scope.bundles, charge.bundle):
            raise scope.fail(charge, f"charges are under line bundles; '{charge.bundle}' is not one")
        if charge.bundle == s.r_symmetry and anomalies.uses_r_charge(f.kind):
            r = q
            continue
        scope.note_class_use(charge.bundle, s.line)
        ch = ch * anomalies.exp_charge(scope.bundles.chern(charge.bundle, 1), q)
    return ch, r


def _labels(s: n.MatterDecl) -> list[str]:
    """I8_hyper, I8_vector, ... (numbered when a kind repeats): names the report typesets."""
    kinds = [f.kind for f in s.fields]
    seen: dict[str, int] = {}
    out = []
    for kind in kinds:
        seen[kind] = seen.get(kind, 0) + 1
        out.append(f"{s.name}_{kind}" + (f"_{seen[kind]}" if kinds.count(kind) > 1 else ""))
    return out


def _matter(scope, s: n.MatterDecl, step: Step) -> None:
    if not s.fields:
        raise scope.fail(s, f"matter {s.name} lists no fields: put them on indented lines below")
    bg = _background(scope, s)
    total = scope.ring.zero()
    for f, label in zip(s.fields, _labels(s)):
        try:
            anomalies.density(f.kind, s.dimension)
            ch, r = _character(scope, s, f)
            count = scope.ring.one() if f.count is None else scope.evaluate(f.count)
            if not is_class_free(count):
                raise scope.fail(f.count, "a multiplicity is a number or an expression in the symbols")
            part = anomalies.contribution(f.kind, s.dimension, bg, ch, r, count)
        except AlgebraError as exc:
            raise scope.fail(f, str(exc)) from None
        step.values.append(record(label, part))
        total = total + part
    step.summary = (f"{s.name}: anomaly polynomial of {len(s.fields)} kind"
                    f"{'s' if len(s.fields) != 1 else ''} of fields in {s.dimension} dimensions, "
                    f"degree {s.dimension + 2}")
    step.checks.append(degree_check(total))
    scope.output(step, s.name, total, s.line)


HANDLERS = {n.MatterDecl: _matter}
