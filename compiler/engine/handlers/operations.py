"""Operation handlers: let, substitute, reduce, integrate, coefficients, extremize.

Each computes new values from the names it reads and binds them; the outcome
depends on nothing else, so the cache layer may replay it.
"""
from __future__ import annotations

from ... import notation
from ...algebra import fibers as fibers_mod, localization
from ...algebra.lazysympy import sympy, sympy_symbol
from ...algebra.graded import Element
from ...checks import free_symbols
from ...expressions import as_expr, is_class_free
from ...precision import Known, beyond, degrees, integrated, substituted, unknown_above
from ...results import CheckResult, Step
from ...statements import expr_nodes as en, nodes as n
from ...statements.tree import Ident, walk
from ..scope import record
from .common import degree_check, element, known_element, relation


def _let(scope, s: n.Let, step: Step) -> None:
    known = scope.known(s.expr)
    step.checks.append(degree_check(known.value, known.exact_to, scope.ring.truncate))
    scope.output(step, s.name, known.value, s.line, known.exact_to)


def _substitute(scope, s: n.Substitute, step: Step) -> None:
    known = scope.known(s.target)
    target, exact_to = known.value, known.exact_to
    whole = target if isinstance(target, Element) else None
    present = whole.generator_keys() if whole is not None else set()
    names = {symbol.name for symbol in free_symbols(target)}  # the ring's symbols or sympy's
    mapping = {}
    for pair in s.pairs:
        lhs = element(scope, pair.lhs, "substitute")
        key = _replaced(scope, pair.lhs, lhs)
        if key in mapping:
            raise scope.fail(pair, f"{lhs.to_text()} is substituted twice")
        if key not in present if isinstance(key, str) else key.name not in names:
            raise scope.fail(pair.lhs, f"{lhs.to_text()} does not occur in the expression (a typo?)")
        degree = lhs.degrees()[0]
        replacement = scope.evaluator.read(pair.rhs, degree)
        rhs = replacement.value
        exact_to = substituted(Known(target, exact_to), degree, replacement)
        got = rhs.degrees() if isinstance(rhs, Element) else [0]
        ok = not got or got == [degree]
        replaced = f"degree {', '.join(map(str, got))}" if got else "0"
        step.checks.append(CheckResult(
            f"{lhs.to_text()} (degree {degree}) replaced by {replaced}",
            "proven" if ok else "failed",
            "" if ok else f"the right side has degree {', '.join(map(str, got))}, not {degree}"))
        mapping[key] = rhs
    if any(c.status == "failed" for c in step.checks):
        scope.bind_missing(s.outputs, s.line)
        return
    if all(isinstance(v, Element) for v in mapping.values()) and whole is not None:
        result = whole.substitute(mapping)
    elif is_class_free(target) and not any(isinstance(k, str) for k in mapping):
        # An irrational value (an extremum) put into a class-free expression.
        from ...algebra.radicals import tidy  # sympy: imported for such values only
        exact = as_expr(target).subs({sympy_symbol(k): as_expr(v) for k, v in mapping.items()})
        result = tidy(exact, list(scope.specs.values()))
        if result.has(sympy.I):
            raise scope.fail(s, f"the substitution makes the value complex: {notation.text(result)}")
    else:
        raise scope.fail(s, "an irrational value can only be substituted into a class-free expression")
    step.checks.append(degree_check(result, exact_to, scope.ring.truncate))
    scope.output(step, s.outputs[0], result, s.line, exact_to)


def _replaced(scope, node, value: Element):
    """The generator key (or symbol) a substitution's left side names."""
    key = fibers_mod.single_generator(value)
    if key is not None:
        return key
    symbol = value.as_symbol()
    if symbol is not None:
        return symbol
    raise scope.fail(node, f"the left side {value.to_text()} is not a single class or symbol")


def _reduce(scope, s: n.Reduce, step: Step) -> None:
    known = known_element(scope, s.target, "reduce")
    target, exact_to = known.value, known.exact_to
    relations = [relation(scope, r) for r in s.relations]
    for node, rel in zip(s.relations, relations):
        if rel.is_class_free() and not rel.is_zero:
            raise scope.fail(node, "a relation for reduce must involve classes; "
                                   "to give a symbol a value use substitute or for")
    basis = scope.ring.groebner(relations)
    result = scope.ring.reduce(target, basis)
    again = scope.ring.reduce(result, basis)
    plural = "s" if len(relations) != 1 else ""
    step.checks.append(CheckResult(f"normal form modulo {len(relations)} relation{plural} "
                                   f"(basis of {len(basis)})",
                                   "proven" if again == result else "failed"))
    step.checks.append(degree_check(result, exact_to, scope.ring.truncate))
    scope.output(step, s.outputs[0], result, s.line, exact_to)


#: Fiber types integrated otherwise than through their table of top integrals.
INTEGRATE = {localization.LocalizedFiber: localization.integrate}


def _integrate(scope, s: n.Integrate, step: Step) -> None:
    known = known_element(scope, s.target, "integrate")
    target = known.value
    _, fiber = scope.lookup(s.fiber, s.fiber_line, s.fiber_column)
    # (A localized fiber checks its integrals itself: ∫ 1 must come out 0 there.)
    if (type(fiber) not in INTEGRATE and not target.is_zero
            and not target.generator_keys() & fiber.class_keys()
            and not _mentions(scope, s.target, fiber)):
        step.checks.append(CheckResult(
            f"the integrand has a class of {fiber.name}", "failed",
            f"{target.to_text()} has no class of {fiber.name}, so its integral is 0: "
            f"integrate a value that involves {', '.join(sorted(fiber.class_keys()))}"))
        scope.bind_missing(s.outputs, s.line)
        return
    result, checks = INTEGRATE.get(type(fiber), fibers_mod.integrate)(target, fiber)
    for c in checks:
        step.checks.append(CheckResult(c.what, "proven" if c.ok else "failed", c.detail))
    exact_to = integrated(known.exact_to, fiber.dimension)
    if unknown_above(exact_to, scope.ring.truncate) is not None:
        step.checks.append(degree_check(result, exact_to, scope.ring.truncate))
    scope.output(step, s.outputs[0], result, s.line, exact_to)


def _mentions(scope, node, fiber) -> bool:
    """Whether an integrand as written names a class of the fiber (which a
    relation may then have removed: ∫ e^2 = 0 over a sphere is a result)."""
    keys = fiber.class_keys()
    for item, _ in walk(node):
        binding = scope.bindings.get(item) if isinstance(item, Ident) else None
        if binding is None:
            continue
        if binding.kind == "bundle" and keys & set(scope.bundles.get(item).keys):
            return True
        if isinstance(binding.value, Element) and binding.value.generator_keys() & keys:
            return True
    return False


def _coefficients(scope, s: n.Coefficients, step: Step) -> None:
    known = known_element(scope, s.target, "coefficients")
    target = known.value
    if len(s.monomials) != len(s.outputs):
        raise scope.fail(s, f"{len(s.monomials)} monomials but {len(s.outputs)} names after ->")
    rest = target
    present = degrees(target)
    for node, name in zip(s.monomials, s.outputs):
        pairs = _written_monomial(scope, node)
        if not scope.ring.is_normal_monomial(pairs):
            raise scope.fail(node, f"{scope.ring.monomial_text(pairs)} is not a monomial of the normal form")
        monomial = scope.ring.monomial(pairs)
        degree = monomial.degrees()[0]
        problem = beyond(known, degree, scope.ring.truncate, f"the coefficient of {monomial.to_text()}")
        if problem:
            raise scope.fail(node, problem)
        if present and degree not in present:  # (an exact 0 has every coefficient 0)
            shown = ", ".join(map(str, present))
            step.checks.append(CheckResult(
                f"{monomial.to_text()} (degree {degree}) can occur in the value", "failed",
                f"the value has no part of degree {degree} (its degrees: {shown})"))
            scope.bind_missing(s.outputs, s.line)
            return
        coefficient = target.coefficient(monomial)
        rest = rest - coefficient * monomial
        scope.output(step, name, coefficient, s.line)
    step.remainder = record("remainder", rest, unknown_above(known.exact_to, scope.ring.truncate))
    terms = len(rest.monomials())
    step.checks.append(CheckResult(
        "every monomial read" if rest.is_zero else
        f"the rest has {terms} term{'s' if terms != 1 else ''} (shown as remainder)", "proven"))


def _written_monomial(scope, node) -> list:
    """A monomial as the author wrote it, as (generator key, exponent) pairs
    (``1`` is the empty monomial: the class-free part).

    Read from the syntax tree rather than from its value, because evaluating
    would already rewrite a non-normal monomial (``e(T4)^2`` into ``p2(T4)``)
    and hide the mistake."""
    if isinstance(node, en.Num) and node.value == 1:
        return []
    if isinstance(node, en.Binary) and node.op == "*":
        return _written_monomial(scope, node.left) + _written_monomial(scope, node.right)
    if isinstance(node, en.Binary) and node.op == "^":
        k = scope.evaluator.integer_arg(node.right)
        if k < 1:
            raise scope.fail(node.right, "a monomial has positive exponents")
        return [(key, e * k) for key, e in _written_monomial(scope, node.left)]
    value = element(scope, node, "coefficients")
    pairs = value.as_monomial()
    if pairs is not None and len(pairs) == 1:
        return list(pairs)  # a class, or a power of one (p1 of a plane is e^2)
    raise scope.fail(node, f"{value.to_text()} is not a single class: coefficients reads monomials "
                           "in the classes of the normal form")


def _extremize(scope, s: n.Extremize, step: Step) -> None:
    from ...algebra.extremize import ExtremizeError, extremize  # sympy's solver: imported when needed
    f = scope.read(s.target)
    if not is_class_free(f):
        classes = ", ".join(sorted(f.generator_keys()))
        raise scope.fail(s.target, f"{s.mode} needs a class-free expression; this one still contains "
                                   f"{classes} (degrees {', '.join(map(str, f.degrees()))})")
    variables = [(scope.specs[v.name].symbol,
                  None if v.interval is None else (v.interval.low, v.interval.high))
                 for v in s.variables]
    try:
        expr = as_expr(f)
        region = scope.region.restrict(expr.free_symbols)  # with the symbols related to them
        name = s.target.id if isinstance(s.target, en.Name) else "f"
        result = extremize(s.mode, expr, variables, list(region.specs), scope.seed(s.line),
                           relations=region.relations, name=name)
    except ExtremizeError as exc:
        if exc.status != "failed":
            raise scope.fail(s, str(exc)) from None
        step.checks.append(CheckResult("one admissible critical point", "failed", str(exc)))
        scope.bind_missing(s.outputs, s.line)
        return
    for name, coordinate in zip(s.point, result.point):
        scope.output(step, name, coordinate, s.line)
    scope.output(step, s.value, result.value, s.line)
    status = "proven" if result.settled == "symbolic" else "sampled"
    step.checks.append(CheckResult("one admissible critical point", status, result.account))


HANDLERS = {
    n.Let: _let, n.Substitute: _substitute, n.Reduce: _reduce, n.Integrate: _integrate,
    n.Coefficients: _coefficients, n.Extremize: _extremize,
}
