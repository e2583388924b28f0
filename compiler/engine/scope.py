"""The scope of one run: bindings, conventions, symbols, the ring, and value keys.

Handlers read and bind names only through it; the evaluator sees it as its
``expressions.Scope``.  Each binding also gets a cache key (its content for
values, else the step that bound it), which the cache layer reads.
"""
from __future__ import annotations

import itertools
import math
from contextlib import contextmanager
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

from ..algebra.lazysympy import is_sympy

from .. import names as names_pass, notation
from ..algebra import bundles as bundles_mod
from ..algebra.errors import AlgebraError
from ..algebra.graded import Element, Ring
from ..algebra.sampling import SymbolSpec, describe_point
from ..checks import Context, sympy_point
from ..errors import DocumentError, Location
from ..expressions import Evaluator, Missing, MissingValue, Scope, Value, from_expr, rational_value
from ..precision import Known, Precision, unknown_above
from ..results import ValueRecord
from ..presentation import display_tree
from ..statements import nodes as n
from .cache import digest
from .entries import value_to_data
from .symbols import DeclaredSymbol, document_region

#: Most points a ``for`` list may expand to (every combination is computed).
MAX_POINTS = 10_000
#: Characters of value text a report may show in all (each value is printed
#: as text, LaTeX and MathML; the largest bundled document shows about 5 000).
MAX_SHOWN = 100_000


@dataclass
class Binding:
    """What a name stands for in the scope, and where it was bound."""

    kind: str  # symbol, convention, bundle, fiber, class, value, function
    value: object
    line: int
    exact_to: Precision = None  # a value's known precision (see compiler.precision)


class DocScope(Scope):
    """The namespace and the algebra of one document's run."""

    def __init__(self, path: str, document, statements, overrides: dict):
        self.path = path
        self.top_path = path
        #: Used documents (by key): the steps of their statements, and those
        #: whose ``use`` step has shown them.
        self.used: dict[str, list] = {}
        self.reported: set[str] = set()
        self.conventions = _conventions(path, document, statements, overrides)
        #: The declared symbols and the relations between them.
        self.region = document_region(path, statements)
        self.specs: dict[str, SymbolSpec] = {s.name: s for s in self.region.specs}
        #: The symbols as the ring keys them (by name: no sympy).
        self.symbols = {name: DeclaredSymbol(name, spec) for name, spec in self.specs.items()}
        self.ring = Ring(list(self.symbols.values()), document.front.truncate)
        self.bundles = bundles_mod.BundleTable(self.ring)
        self.groups = 0
        self.bindings: dict[str, Binding] = {}
        self.history: dict[str, list[tuple[int, ValueRecord]]] = {}
        self.class_uses: dict[str, int] = {}
        self.evaluator = Evaluator(self, path)
        self.keys: dict[str, str] = {}
        self.shown = 0  # characters of value text shown so far (MAX_SHOWN)
        # The declarations so far (symbols, bundles, splits, fibers), the
        # conventions and the truncation: the ring every value lives in.
        self.ring_key = digest("ring", self.ring.truncate, sorted(self.report_conventions().items()),
                               [d.source for d in statements if isinstance(d, n.SymbolDecl)])
        self.step_key = self.ring_key
        for name, value in self.conventions.items():  # final values, in force from the start
            try:
                self.bind(name, "convention", self.ring.scalar(value), 0)
            except AlgebraError as exc:  # a --set value past the digit limit
                raise DocumentError(Location(path, 1, 1), f"convention {name}: {exc}") from None

    def report_conventions(self) -> dict[str, str]:
        return {k: fraction_text(v) for k, v in sorted(self.conventions.items())}

    # ------------------------------------------------------------ names

    def lookup(self, name: str, line: int, column: int):
        binding = self.bindings.get(name)
        if binding is None:
            raise DocumentError(Location(self.path, line, column), f"unknown name '{name}'")
        if isinstance(binding.value, Missing):
            raise MissingValue(Location(self.path, line, column), name, binding.value.line)
        if binding.kind == "symbol":
            return "symbol", self.ring.symbol(binding.value)
        return binding.kind, binding.value

    def exact_to(self, name: str) -> Precision:
        return self.bindings[name].exact_to

    def note_class_use(self, bundle: str, line: int) -> None:
        """A value at ``line`` uses the classes of ``bundle`` and of its parts."""
        self.class_uses.setdefault(bundle, line)
        for part in self.bundles.parts(bundle) or ():
            if isinstance(part, str):
                self.note_class_use(part, line)

    def bind(self, name: str, kind: str, value, line: int, shown: ValueRecord | None = None,
             key: str | None = None, exact_to: Precision = None) -> None:
        """Bind ``name``; ``key`` is its cache key when known (a restored value)."""
        if shown is None and isinstance(value, Element) and self.shown + 2 * value.size > MAX_SHOWN:
            raise AlgebraError(f"the values shown would pass {MAX_SHOWN} characters of text "
                               f"(the limit on report size; '{name}' alone has {value.size} terms)")
        self.bindings[name] = Binding(kind, value, line, exact_to)
        self.keys[name] = key or self.value_key(name, kind, value, exact_to)
        if kind in ("value", "convention", "class", "symbol") and not isinstance(value, Missing):
            computed = shown is None
            if computed:
                shown = record(name, self.ring.symbol(value) if kind == "symbol" else value,
                               unknown_above(exact_to, self.ring.truncate))
            self.shown += len(shown.text)
            if computed and self.shown > MAX_SHOWN:
                raise AlgebraError(f"the values shown would pass {MAX_SHOWN} characters of text "
                                   f"(the limit on report size; '{name}' alone has {len(shown.text)})")
            self.history.setdefault(name, []).append((line, shown))

    def bind_missing(self, names, line: int) -> None:
        """Mark what a failed statement would have bound as having no value."""
        for name in names:
            binding = self.bindings.get(name)
            self.bind(name, binding.kind if binding is not None else "value", Missing(name, line), line)

    def value_key(self, name: str, kind: str, value, exact_to: Precision = None) -> str:
        """A value's cache key is its content, so an edit that gives the same
        value again recomputes nothing downstream; anything else is keyed by
        the step that bound it."""
        if kind == "value" and not isinstance(value, Missing):
            try:
                return digest(self.ring_key, value_to_data(value), exact_to)
            except ValueError:  # a value the cache cannot keep
                pass
        return digest(self.step_key, name)

    def output(self, step, name: str, value: Value, line: int, exact_to: Precision = None) -> None:
        """Bind an output (exact up to degree ``exact_to``) and show it in the step."""
        if is_sympy(value):
            value = from_expr(self.ring, value)
        self.bind(name, "value", value, line, exact_to=exact_to)
        step.values.append(self.history[name][-1][1])

    def evaluate(self, expr) -> Value:
        return self.evaluator.evaluate(expr)

    def known(self, expr) -> Known:
        """A value with the degree up to which it is exact."""
        return self.evaluator.known(expr)

    def read(self, expr, degree: int | None = None) -> Value:
        """A value read in ``degree`` (None: whole); an error beyond its precision."""
        return self.evaluator.read(expr, degree).value

    @contextmanager
    def reading(self, path: str):
        """While a used document's statements run, problems point into it."""
        outer = self.path
        self.path = self.evaluator.path = path
        try:
            yield
        finally:
            self.path = self.evaluator.path = outer

    def fail(self, node, message: str) -> DocumentError:
        return DocumentError(Location(self.path, node.line, node.column), message)

    def new_group(self) -> int:
        """Each fiber owns the next block of the monomial order (a failed
        declaration keeps its number, so no two fibers ever share one)."""
        self.groups += 1
        return self.groups

    # ------------------------------------------------------------ sampling

    def seed(self, line: int) -> str:
        """Sample points are seeded by the document's file name and the line,
        so however the path is typed (or wherever the folder moves) a build
        sees the same points, and the cache beside it stays valid."""
        return f"{Path(self.path).name}:{line}"

    def context(self, line: int) -> Context:
        return Context(self.ring, self.specs, self.seed(line), self.region.relations)

    def points(self, clauses) -> list[dict]:
        """Every combination of a ``for`` list, checked against assumptions."""
        axes = []
        for c in clauses:
            spec = self.specs[c.name]
            if c.range is not None:
                low, high = c.range
                if high - low >= MAX_POINTS:
                    raise self.fail(c, f"the range {low}..{high} has more than {MAX_POINTS} values")
                if low > high:
                    raise self.fail(c, f"empty range {low}..{high}")
                values = [Fraction(v) for v in range(low, high + 1)]
            else:
                value = rational_value(self.read(c.value, 0))
                if value is None:
                    raise self.fail(c, f"the value given to {c.name} must be an exact number")
                values = [value]
            for v in values:
                if not spec.admits(v):
                    raise self.fail(c, f"{c.name} = {fraction_text(v)} breaks its declaration "
                                       f"({spec.describe()})")
            axes.append([(self.symbols[c.name], v) for v in values])
        total = math.prod(len(axis) for axis in axes)
        if total > MAX_POINTS:
            raise self.fail(clauses[0], f"the for ranges give {total} points; "
                                        f"at most {MAX_POINTS} are checked")
        points = [dict(combo) for combo in itertools.product(*axes)] if axes else []
        for point in points if self.region.relations else ():  # else each value was checked above
            broken = self.region.violations(sympy_point(point))
            try:
                self.region.fixing(sympy_point(point))
            except ValueError as exc:  # it leaves another symbol no value
                broken.append(f"at {describe_point(point)}, {exc}")
            if broken:
                raise self.fail(clauses[0], f"the point is outside the declared region: {broken[0]}")
        return points


def _conventions(path: str, document, statements, overrides: dict) -> dict[str, Fraction]:
    """Convention values by precedence: --set, front matter, statement default."""
    values = dict(names_pass.BUILTIN_CONVENTIONS)
    for s in statements:
        if isinstance(s, n.ConventionDecl):
            values[s.name] = s.value
    for entry in document.front.conventions:
        values[entry.name] = entry.value
    for name, value in overrides.items():
        if name not in values:
            raise DocumentError(Location(path, 1, 1),
                                f"--set {name}: no convention of that name is declared")
        values[name] = value
    return {k: Fraction(v) for k, v in values.items()}


def fraction_text(value: Fraction) -> str:
    return str(value.numerator) if value.denominator == 1 else f"{value.numerator}/{value.denominator}"


def record(name: str, value: Value, unknown_from: int | None = None,
           form: str = "factored", symbol=None) -> ValueRecord:
    """A value as the renderers see it: normal-form text, display tree (in
    ``form``, see ``display_tree``) and its LaTeX; ``unknown_from`` is the
    degree from which it is not known (shown as an order term, like a
    series' O(x^n), in the display; the normal-form text stays what the
    parser reads back)."""
    tree = display_tree(value, form, symbol)
    text = value.to_text() if isinstance(value, Element) else notation.text(value)
    degrees = value.degrees() if isinstance(value, Element) else [] if value == 0 else [0]
    if unknown_from is not None:
        tree = ["add", *(tree[1:] if tree[0] == "add" else [tree]), ["order", unknown_from]]
    return ValueRecord(name, text, degrees, tree, unknown_from)
