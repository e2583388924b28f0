"""The words of an extremization: the second-order test and every failure.

Kept apart from the decision (``extremize.py``) so that the decision reads
as the algorithm; each function takes the problem and says what it found.
"""
from __future__ import annotations

from .lazysympy import sympy

from .sampling import describe_point, evaluate, spelled

NEEDED = {"maximize": "a negative-definite Hessian (a maximum)",
          "minimize": "a positive-definite Hessian (a minimum)",
          "extremize": "a non-degenerate Hessian"}
KIND = {"maximize": "maximum", "minimize": "minimum", "extremize": "critical point"}


def names(symbols) -> str:
    return ", ".join(str(s) for s in symbols)


def point_text(variables, coords) -> str:
    return ", ".join(f"{v} = {spelled(c)}" for v, c in zip(variables, coords))


def approx_text(variables, coords) -> str:
    return ", ".join(f"{v} ≈ {sympy.re(sympy.N(c, 12))}" for v, c in zip(variables, coords))


def where(point) -> str:
    return f" at {describe_point(point)}" if point else ""


def found_text(p, closed, implicit) -> str:
    """``critical points x = 1; x = 2`` plus the components without closed form."""
    parts = [point_text(p.vars, c.coords) for c in closed]
    parts += [f"the roots of {spelled(sympy.factor(c.polynomial))} = 0 "
              f"(degree {c.degree} in {c.variable})" for c in implicit]
    return "critical points " + "; ".join(parts)


def test_text(p, minors, symbolic: bool) -> str:
    """The second-order test in words, e.g. ``d²a/deps² = -3 < 0``."""
    if len(p.vars) == 1:
        v = p.vars[0]
        rel = {"maximize": "< 0", "minimize": "> 0", "extremize": "≠ 0"}[p.mode]
        lhs = f"d²{p.name}/d{v}²"
        if symbolic:
            second = p.tidy(p.content * minors[0])
            return f"{lhs} = {spelled(second)} {rel}"
        return f"{lhs} {rel}"
    kind = {"maximize": "negative definite", "minimize": "positive definite",
            "extremize": "non-degenerate"}[p.mode]
    return f"the Hessian of {p.name} in {p.var_names} is {kind}"


def degenerate_message(p, coords, point) -> str:
    return (f"the Hessian of {p.name} is degenerate (zero determinant) at the "
            f"critical point {point_text(p.vars, coords)}{where(point)}; the "
            f"second-order test cannot decide")


def complex_message(p, found, point) -> str:
    return (f"every critical point of {p.name} is complex{where(point)}: {found}"
            f"; {p.name} has no real {KIND[p.mode]}")


def range_hint(p) -> str:
    v = p.vars[0]
    return f"give a range, e.g. `{p.mode} {p.name} over {v} in (-1, 1) -> ...`"


def count_message(p, found, admissible, point) -> str:
    """None or several admissible points; ``admissible`` are coordinates."""
    if not admissible:
        return (f"no critical point of {p.name} has {NEEDED[p.mode]}"
                f"{domain_text(p)}{where(point)}; {found}")
    exact = not any(c.has(sympy.Float) for coords in admissible for c in coords)
    listed = "; ".join((point_text if exact else approx_text)(p.vars, c) for c in admissible)
    return (f"{len(admissible)} critical points of {p.name} have "
            f"{NEEDED[p.mode]}{domain_text(p)}{where(point)}: {listed}; " + range_hint(p))


def branch_message(p, picks) -> str:
    """Different sample points chose different critical points."""
    parts = []
    for what, (point, coords) in picks.items():
        values = ", ".join(f"{v} ≈ {sympy.re(evaluate(x, point)).evalf(6)}"
                           for v, x in zip(p.vars, coords))
        parts.append(f"{what} at {describe_point(point)} ({values})")
    return (f"different sample points pick different roots for the {KIND[p.mode]} "
            f"of {p.name}: " + "; ".join(parts) + "; restrict the parameters in "
            "their `symbol` declarations or " + range_hint(p))


def implicit_message(p, component, point, coords) -> str:
    """The extremum exists at the sample points but has no closed form."""
    v = component.variable
    polynomial = sympy.collect(sympy.expand(component.polynomial), v, sympy.factor)
    return (f"the {KIND[p.mode]} of {p.name} is a root of {spelled(polynomial)} = 0, a "
            f"polynomial of degree {component.degree} in {v}, irreducible over the rationals "
            f"in {names(p.param_symbols)}; in several variables anomark writes closed forms "
            f"only for roots of degree at most 2, so there is no exact value for general "
            f"{names(p.param_symbols)}; it is the only {KIND[p.mode]}{where(point)}, at "
            f"{approx_text(p.vars, coords)}; fix the parameters to get an exact value")


def label(p, key, closed, implicit) -> str:
    """A critical point, or an implicit component, in words."""
    kind, index = key
    if kind == "closed":
        return point_text(p.vars, closed[index].coords)
    return f"a root of {spelled(sympy.factor(implicit[index].polynomial))} = 0"


def domain_text(p) -> str:
    parts = []
    for v, (lo, lo_strict, hi, hi_strict) in zip(p.vars, p.domains):
        if lo is None and hi is None:
            continue
        left = "(" if lo_strict or lo is None else "["
        right = ")" if hi_strict or hi is None else "]"
        parts.append(f"{v} in {left}{'-oo' if lo is None else lo}, "
                     f"{'oo' if hi is None else hi}{right}")
    parts += [r.text for r in p.variable_relations]
    return (" with " + ", ".join(parts)) if parts else ""
