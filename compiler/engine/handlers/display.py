"""Display handlers: show, table and plot put values into the report and bind nothing."""
from __future__ import annotations

from fractions import Fraction

from ...algebra import budget
from ...algebra.lazysympy import sympy
from ...algebra.surds import sampler
from ...checks import free_symbols, show, substitute
from ...expressions import as_expr, is_class_free
from ...precision import unknown_above
from ...presentation import display_tree
from ...results import PlotData, Step, TableData
from ...statements import expr_nodes as en, nodes as n
from ..scope import fraction_text, record

#: Sample points along a plotted interval (both ends included).
PLOT_SAMPLES = 121


def _label(node) -> str:
    return node.id if isinstance(node, en.Name) else ""


def _show(scope, s: n.Show, step: Step) -> None:
    symbol = None
    if s.symbol is not None:
        if s.symbol not in scope.specs:
            raise scope.fail(s.symbol, f"'{s.symbol}' is not a declared symbol")
        symbol = scope.specs[s.symbol].symbol
    for node in s.exprs:
        known = scope.known(node)
        try:
            step.values.append(record(_label(node), known.value,
                                      unknown_above(known.exact_to, scope.ring.truncate),
                                      s.form, symbol))
        except ValueError as problem:
            raise scope.fail(node, f"cannot show it collected in {s.symbol}: {problem}")


def _table(scope, s: n.Table, step: Step) -> None:
    values = [scope.read(node) for node in s.exprs]
    points = scope.points(s.clauses)
    params = [c.name for c in s.clauses]
    rows, text_rows = [], []
    for point in points or [{}]:
        budget.check()
        cells = [substitute(scope.ring, v, point) for v in values]
        coords = [scope.ring.scalar(point[scope.symbols[p]]) for p in params]
        rows.append([display_tree(c) for c in coords] + [record("", c).tree for c in cells])
        text_rows.append([show(c) for c in coords + cells])
    names = params + [_label(node) for node in s.exprs]
    step.table = TableData(names=names, cells=rows, text_rows=text_rows)


def _plot(scope, s: n.Plot, step: Step) -> None:
    values = [scope.read(node) for node in s.exprs]
    var = scope.specs[s.variable]
    points = scope.points(s.clauses)
    if len(points) > 1:
        raise scope.fail(s, "plot takes one value for each parameter after for")
    fixed = points[0] if points else {}
    low, high = s.interval.low, s.interval.high
    if not low < high:
        raise scope.fail(s.interval, "the plot interval must have low < high")
    xs = [low + (high - low) * Fraction(i, PLOT_SAMPLES - 1) for i in range(PLOT_SAMPLES)]
    xs = [x for x in xs if var.admits(x)]
    curves = {}
    for node, value in zip(s.exprs, values):
        value = substitute(scope.ring, value, fixed)
        if not is_class_free(value):
            raise scope.fail(node, "plot draws class-free values only")
        expr = as_expr(value)
        left = {x for x in free_symbols(value) if x.name != var.name}
        if left:
            raise scope.fail(node, "give values for " + ", ".join(sorted(x.name for x in left))
                                   + " after for")
        curves[_label(node) or f"curve {len(curves) + 1}"] = _samples(expr, var.symbol, xs)
    step.plot = PlotData(variable=s.variable, low=fraction_text(low), high=fraction_text(high),
                         fixed={sym.name: fraction_text(v) for sym, v in fixed.items()}, curves=curves)


def _samples(expr, symbol, xs) -> list[tuple[float, float]]:
    """The real points of a curve: exactly from its parts when it has at most
    one square root, else by sympy to 20 digits."""
    exact = sampler(expr, symbol)
    samples = []
    for x in xs:
        budget.check()
        if exact is not None:
            y = exact(x)
            if y is not None:
                samples.append((float(x), y))
            continue
        y = expr.subs(symbol, sympy.Rational(x.numerator, x.denominator)).evalf(20)
        if y.is_real:
            samples.append((float(x), float(y)))
    return samples


HANDLERS = {n.Show: _show, n.Table: _table, n.Plot: _plot}
