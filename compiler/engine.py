"""The engine: runs a document's statements in order and records every step.

Pipeline position: ``document`` (Markdown → parts) → ``statements`` (syntax)
→ ``names`` (declared before use, bound once) → here (evaluate, check) →
``results`` (what the renderers read).  Each statement kind has one handler
in ``HANDLERS``; a handler reads values from the scope, computes with the
algebra, binds its outputs and appends checks to its step.  A handler that
raises a ``DocumentError`` turns its step into an *error* step and the
document goes on, so one bad line does not hide the rest of the report.
"""
from __future__ import annotations

import itertools
import math
import signal
import time
from contextlib import contextmanager
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path
from typing import Callable, Optional

import sympy

from . import __version__, names as names_pass, notation, preambles
from .algebra import bundles as bundles_mod, fibers as fibers_mod
from .algebra.extremize import ExtremizeError, extremize, tidy
from .algebra.graded import AlgebraError, Element, Ring
from .algebra.sampling import SymbolSpec
from .cache import CODE, StepCache, digest, expr_from_data, expr_to_data, restore_step, step_entry
from .checks import Context, claim, free_symbols, show, substitute
from .document import Block, ProsePart, read_document
from .errors import DocumentError, Location, Problem
from .calls import Function
from .expressions import (Evaluator, Missing, MissingValue, Scope, Value, as_expr, from_expr,
                          is_class_free, rational_value)
from .results import CheckResult, PlotData, Prose, Report, Step, TableData, ValueRecord
from .statements import nodes as n
from .statements.parser import parse_block

TOOL_NAME = "anomark"
#: Most points a ``for`` list may expand to (every combination is computed).
MAX_POINTS = 10_000


@dataclass(frozen=True)
class BuildOptions:
    overrides: dict = field(default_factory=dict)  # --set NAME=VALUE, as Fractions
    allow_html: bool = False
    use_cache: bool = True
    time_limit: float = 120.0  # seconds per step
    progress: Optional[Callable[[Step], None]] = None


class StepTimeout(Exception):
    """Raised inside a step when it runs past the time limit."""


@contextmanager
def time_limit(seconds: float):
    """Interrupt a runaway step (only where signals work: the main thread).

    The alarm re-arms itself: an exception raised while Python is running a
    garbage-collection callback is swallowed, so one alarm is not enough."""
    def expire(signum, frame):
        signal.setitimer(signal.ITIMER_REAL, 0.05)
        raise StepTimeout()
    try:
        previous = signal.signal(signal.SIGALRM, expire)
    except ValueError:  # not the main thread: no limit
        yield
        return
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def parse(path: str, text: str):
    """Markdown → document → statements, with every syntax problem at once."""
    document = read_document(path, text)
    problems: list[Problem] = []
    statements_by_block: dict[int, list] = {}
    for i, part in enumerate(document.parts):
        if isinstance(part, Block):
            try:
                statements_by_block[i] = parse_block(part.text, part.line, path, part.offsets)
            except DocumentError as err:
                problems.extend(err.problems)
    if problems:
        raise DocumentError.of(problems)
    return document, statements_by_block


def build(path: str, text: str, options: BuildOptions = BuildOptions()) -> Report:
    """Compile one document.  Raises DocumentError when it cannot be compiled."""
    document, statements_by_block = parse(path, text)
    statements = [s for i in sorted(statements_by_block) for s in statements_by_block[i]]
    loaded = iter(preambles.load(path, statements, parse))
    statements_by_block = {i: [next(loaded) for _ in statements_by_block[i]]
                           for i in sorted(statements_by_block)}
    statements = [s for i in sorted(statements_by_block) for s in statements_by_block[i]]
    refs = [(r.name, r.line, r.column) for part in document.parts
            if isinstance(part, ProsePart) for r in part.refs]
    front_conventions = [(c.name, c.line, c.column) for c in document.front.conventions]
    names_pass.resolve(path, statements, front_conventions, refs)
    run = Run(path, document, statements, options)
    return run.execute(statements_by_block)


@dataclass
class Binding:
    kind: str  # symbol, convention, bundle, fiber, class, value
    value: object
    line: int


class Run(Scope):
    """One evaluation of one document: the namespace, the algebra and the steps."""

    def __init__(self, path: str, document, statements, options: BuildOptions):
        self.path = path
        self.document = document
        self.options = options
        self.conventions = self._conventions(statements)
        self.specs: dict[sympy.Symbol, SymbolSpec] = {}
        self.symbols_by_name: dict[str, SymbolSpec] = {}
        declared = []
        statements = list(preambles.flatten(statements))
        for s in statements:
            if isinstance(s, n.SymbolDecl):
                for name in s.names:
                    try:
                        spec = SymbolSpec.declare(name, s.assumptions,
                                                  [(b.op, b.value) for b in s.bounds if b.name == name])
                    except ValueError as exc:
                        raise DocumentError(Location(path, s.line, s.column), str(exc)) from None
                    self.symbols_by_name[name] = spec
                    self.specs[spec.symbol] = spec
                    declared.append(spec.symbol)
        self.ring = Ring(declared, document.front.truncate)
        self.bundles = bundles_mod.BundleTable(self.ring)
        self.groups = 0
        self.bindings: dict[str, Binding] = {}
        self.history: dict[str, list[tuple[int, ValueRecord]]] = {}
        self.class_uses: dict[str, int] = {}
        self.reported_missing: set[str] = set()
        self.diagnostics: list[Problem] = []
        self.evaluator = Evaluator(self, path)
        self.cache = StepCache(path, options.use_cache)
        self.top_path = path
        self.used: set[str] = set()  # the documents whose statements have run
        self.keys: dict[str, str] = {}
        # The declarations so far (symbols, bundles, splits, fibers), the
        # conventions and the truncation: the ring every value lives in.
        self.ring_key = digest("ring", self.ring.truncate, sorted(self.report_conventions().items()),
                               [d.source for d in statements if isinstance(d, n.SymbolDecl)])
        self.step_key = self.ring_key
        for name, value in self.conventions.items():  # final values, in force from the start
            self.bind(name, "convention", self.ring.scalar(value), 0)

    # ------------------------------------------------------------ conventions

    def _conventions(self, statements) -> dict[str, Fraction]:
        """Convention values by precedence: --set, front matter, statement default."""
        values = dict(names_pass.BUILTIN_CONVENTIONS)
        for s in statements:
            if isinstance(s, n.ConventionDecl):
                values[s.name] = s.value
        for entry in self.document.front.conventions:
            values[entry.name] = entry.value
        for name, value in self.options.overrides.items():
            if name not in values:
                raise DocumentError(Location(self.path, 1, 1),
                                    f"--set {name}: no convention of that name is declared")
            values[name] = value
        return {k: Fraction(v) for k, v in values.items()}

    def report_conventions(self) -> dict[str, str]:
        return {k: fraction_text(v) for k, v in sorted(self.conventions.items())}

    # ------------------------------------------------------------ scope

    def lookup(self, name: str, line: int, column: int):
        binding = self.bindings.get(name)
        if binding is None:
            raise DocumentError(Location(self.path, line, column), f"unknown name '{name}'")
        if isinstance(binding.value, Missing):
            raise MissingValue(Location(self.path, line, column), name, binding.value.line)
        if binding.kind == "symbol":
            return "symbol", self.ring.symbol(binding.value.symbol)
        return binding.kind, binding.value

    def note_class_use(self, bundle: str, line: int) -> None:
        """A value at ``line`` uses the classes of ``bundle`` and of its parts."""
        self.class_uses.setdefault(bundle, line)
        for part in self.bundles.parts(bundle) or ():
            if isinstance(part, str):
                self.note_class_use(part, line)

    def bind(self, name: str, kind: str, value, line: int, shown: ValueRecord | None = None) -> None:
        self.bindings[name] = Binding(kind, value, line)
        self.keys[name] = self.value_key(name, kind, value)
        if kind in ("value", "convention", "class", "symbol") and not isinstance(value, Missing):
            if shown is None:
                shown = record(name, self.ring.symbol(value.symbol) if kind == "symbol" else value)
            self.history.setdefault(name, []).append((line, shown))

    def value_key(self, name: str, kind: str, value) -> str:
        """A value's cache key is its content, so an edit that gives the same
        value again recomputes nothing downstream; anything else is keyed by
        the step that bound it."""
        if kind == "value" and isinstance(value, Element):
            return digest("element", self.ring_key, value.to_data())
        if kind == "value" and isinstance(value, sympy.Expr):
            try:
                return digest("expr", self.ring_key, expr_to_data(value))
            except ValueError:
                pass
        return digest(self.step_key, name)

    def evaluate(self, expr) -> Value:
        return self.evaluator.evaluate(expr)

    @contextmanager
    def reading(self, path: str):
        """Run a used document's statements: their problems point into it."""
        outer = self.path
        self.path = self.evaluator.path = path
        try:
            yield
        finally:
            self.path = self.evaluator.path = outer

    def where(self, line: int) -> str:
        return f"at line {line}" if self.path == self.top_path else f"at line {line} of {self.path}"

    def fail(self, node, message: str) -> DocumentError:
        return DocumentError(Location(self.path, node.line, node.column), message)

    # ------------------------------------------------------------ running

    def execute(self, statements_by_block) -> Report:
        items = []
        index = 0
        for i, part in enumerate(self.document.parts):
            if isinstance(part, ProsePart):
                items.append((part, None))
                continue
            for statement in statements_by_block.get(i, []):
                index += 1
                step = self.run_step(index, statement)
                items.append((None, step))
                if self.options.progress:
                    self.options.progress(step)
        self.cache.save()
        final = [Prose(p.markdown, p.line, self._refs(p)) if p is not None else s for p, s in items]
        front = self.document.front
        values = {name: hist[-1][1] for name, hist in self.history.items()
                  if self.bindings[name].kind == "value"
                  and not isinstance(self.bindings[name].value, Missing)}
        report = Report(
            tool_name=TOOL_NAME, tool_version=__version__, document=self.path,
            title=front.title, authors=list(front.authors), date=front.date,
            abstract=front.abstract,
            conventions=self.report_conventions(),
            truncate=front.truncate, items=final, values=values,
            allow_html=self.options.allow_html,
            diagnostics=[str(p) for p in self.diagnostics])
        return report

    def _refs(self, part: ProsePart) -> dict[str, ValueRecord]:
        """Each @{NAME}: the binding in force at that line, else the first one."""
        refs = {}
        for ref in part.refs:
            hist = self.history.get(ref.name, [])
            if not hist:
                continue
            before = [rec for line, rec in hist if line < ref.line]
            refs[ref.name] = before[-1] if before else hist[0][1]
        return refs

    def new_step(self, index: int, s) -> Step:
        return Step(index=index, line=s.line, column=s.column, end_line=s.end_line,
                    source=s.source, kind=s.kind,
                    outputs=list(getattr(s, "outputs", ()) or ((s.name,) if isinstance(s, n.Let) else ())),
                    rebind=getattr(s, "rebind", False))

    def key_of(self, s) -> str:
        """The cache key: the statement, its inputs' keys, the ring so far
        (declarations, conventions, truncation) and the tool's code."""
        seeded = s.line if isinstance(s, (n.Check, n.Extremize)) else None
        inputs = [(name, self.keys.get(name)) for name in names_pass.references(s)]
        return digest(__version__, CODE, self.ring_key, s.kind, s.source, seeded, inputs)

    def run_step(self, index: int, s) -> Step:
        step = self.new_step(index, s)
        self.step_key = self.key_of(s)
        start = time.perf_counter()
        cacheable = type(s) in CACHED
        if not cacheable:
            self.ring_key = digest(self.ring_key, self.step_key)
        entry = self.cache.get(self.step_key) if cacheable else None
        if entry is not None and self.restore(step, s, entry):
            self.cache.put(self.step_key, entry)
            step.seconds = time.perf_counter() - start
            self.note_failures(step, s)
            return step
        step = self.new_step(index, s)
        try:
            with time_limit(self.options.time_limit):
                HANDLERS[type(s)](self, s, step)
        except DocumentError as err:
            self._step_error(step, s, err.problems[0], getattr(err, "name", None))
        except StepTimeout:
            self._step_error(step, s, Problem(Location(self.path, s.line, s.column),
                                              f"time limit of {self.options.time_limit:g} s exceeded"))
        except (AlgebraError, ExtremizeError, fibers_mod.FiberError, ValueError, ZeroDivisionError) as exc:
            self._step_error(step, s, Problem(Location(self.path, s.line, s.column), str(exc)))
        except RecursionError:
            self._step_error(step, s, Problem(Location(self.path, s.line, s.column),
                                              "expression too deeply nested"))
        step.seconds = time.perf_counter() - start
        if cacheable and step.status != "error":
            self.store(step)
        self.note_failures(step, s)
        return step

    def restore(self, step: Step, s, entry: dict) -> bool:
        """Fill a step and bind its outputs from a cache entry; False if the
        entry is unusable in any way (it is then recomputed)."""
        try:
            restore_step(step, entry)
            outputs = _dict_of(entry["outputs"])
            if set(outputs) != set(step.outputs):
                return False
            symbols = {spec.symbol.name: spec.symbol for spec in self.specs.values()}
            values = {name: self._cached_value(name, step.line, data, symbols)
                      for name, data in outputs.items()}
            keys = _dict_of(entry["keys"])
            if set(keys) != set(outputs) or not all(isinstance(k, str) for k in keys.values()):
                return False
        except Exception:  # a corrupt entry can be anything: never trust, recompute
            return False
        for name in names_pass.references(s):
            if name in self.bindings and self.bindings[name].kind == "bundle":
                self.note_class_use(name, s.line)
        shown = {v.name: v for v in step.values}
        for name, value in values.items():
            self.bind(name, "value", value, step.line, shown.get(name))
            # The key the value had when computed: a rebuilt sympy tree may
            # differ in shape (sympy distributes numbers), never in value.
            self.keys[name] = keys[name]
        return True

    def _cached_value(self, name: str, line: int, data, symbols):
        (kind, payload), = _dict_of(data).items()
        if kind == "missing":
            return Missing(name, line)
        if kind == "element":
            return self.ring.from_data(payload)
        if kind == "expr":
            return expr_from_data(payload, symbols)
        raise ValueError(f"unknown cached value kind {kind!r}")

    def store(self, step: Step) -> None:
        outputs = {}
        try:
            for name in step.outputs:
                value = self.bindings[name].value
                if isinstance(value, Missing):
                    outputs[name] = {"missing": True}
                elif isinstance(value, Element):
                    outputs[name] = {"element": value.to_data()}
                else:
                    outputs[name] = {"expr": expr_to_data(value)}
        except ValueError:
            return
        entry = step_entry(step, outputs)
        entry["keys"] = {name: self.keys[name] for name in outputs}
        self.cache.put(self.step_key, entry)

    def note_failures(self, step: Step, s) -> None:
        for check in step.checks:
            if check.status == "failed":
                self.diagnostics.append(Problem(Location(self.path, s.line, s.column),
                                                f"check failed: {check.what}"
                                                + (f": {check.detail}" if check.detail else "")))

    def _step_error(self, step: Step, s, problem: Problem, missing: str | None = None) -> None:
        """An error step: report it (a missing input only once) and mark
        everything the statement would have bound as missing."""
        step.checks.append(CheckResult("step runs", "error", problem.message))
        if missing not in self.reported_missing:
            self.diagnostics.append(problem)
            if missing:
                self.reported_missing.add(missing)
        for name in names_pass.bound_names(s):
            binding = self.bindings.get(name)
            kind = binding.kind if binding is not None else "value"
            self.bind(name, kind, Missing(name, s.line), s.line)

    def output(self, step: Step, name: str, value: Value, line: int) -> None:
        """Bind an output and show it in the step."""
        if isinstance(value, sympy.Expr):
            value = from_expr(self.ring, value)
        self.bind(name, "value", value, line)
        step.values.append(self.history[name][-1][1])

    def seed(self, line: int) -> str:
        """Sample points are seeded by the document's file name and the line,
        so however the path is typed (or wherever the folder moves) a build
        sees the same points, and the cache beside it stays valid."""
        return f"{Path(self.path).name}:{line}"

    def context(self, line: int) -> Context:
        return Context(self.ring, self.specs, self.seed(line))

    def points(self, clauses) -> list[dict]:
        """Every combination of a ``for`` list, checked against assumptions."""
        axes = []
        for c in clauses:
            spec = self.symbols_by_name[c.name]
            if c.range is not None:
                low, high = c.range
                if high - low >= MAX_POINTS:
                    raise DocumentError(Location(self.path, c.line, c.column),
                                        f"the range {low}..{high} has more than {MAX_POINTS} values")
                if low > high:
                    raise DocumentError(Location(self.path, c.line, c.column),
                                        f"empty range {low}..{high}")
                values = [Fraction(v) for v in range(low, high + 1)]
            else:
                value = rational_value(self.evaluate(c.value))
                if value is None:
                    raise DocumentError(Location(self.path, c.line, c.column),
                                        f"the value given to {c.name} must be an exact number")
                values = [value]
            for v in values:
                if not spec.admits(v):
                    raise DocumentError(Location(self.path, c.line, c.column),
                                        f"{c.name} = {fraction_text(v)} breaks its declaration ({spec.describe()})")
            axes.append([(spec.symbol, sympy.Rational(v.numerator, v.denominator)) for v in values])
        total = math.prod(len(axis) for axis in axes)
        if total > MAX_POINTS:
            raise DocumentError(Location(self.path, clauses[0].line, clauses[0].column),
                                f"the for ranges give {total} points; at most {MAX_POINTS} are checked")
        return [dict(combo) for combo in itertools.product(*axes)] if axes else []


def _dict_of(x) -> dict:
    if not isinstance(x, dict):
        raise ValueError("cache entry: a mapping was expected")
    return x


# ---------------------------------------------------------------- printing

def fraction_text(value: Fraction) -> str:
    return str(value.numerator) if value.denominator == 1 else f"{value.numerator}/{value.denominator}"


def record(name: str, value: Value) -> ValueRecord:
    """A value as the renderers see it."""
    if isinstance(value, Element):
        return ValueRecord(name, value.to_text(), value.to_latex(), value.degrees())
    return ValueRecord(name, notation.text(value), notation.latex(value), [] if value == 0 else [0])


def degree_check(value: Value) -> CheckResult:
    degrees = value.degrees() if isinstance(value, Element) else ([] if value == 0 else [0])
    if not degrees:
        return CheckResult("zero (passes every degree check)", "proven")
    if len(degrees) == 1:
        return CheckResult(f"homogeneous of degree {degrees[0]}", "proven")
    return CheckResult("form degrees " + ", ".join(map(str, degrees)), "proven")


# ---------------------------------------------------------------- handlers
# One function per statement kind: (run, statement, step) -> None.

def _symbol(run: Run, s: n.SymbolDecl, step: Step) -> None:
    for name in s.names:
        spec = run.symbols_by_name[name]
        run.bind(name, "symbol", spec, s.line)
    step.summary = ", ".join(s.names) + ": " + run.symbols_by_name[s.names[0]].describe()


def _convention(run: Run, s: n.ConventionDecl, step: Step) -> None:
    value = run.conventions[s.name]
    run.bind(s.name, "convention", run.ring.scalar(value), s.line)
    origin = "default" if value == s.value else "overridden"
    step.summary = f"{s.name} = {fraction_text(value)} ({origin})"
    step.values.append(run.history[s.name][-1][1])


def _bundle(run: Run, s: n.BundleDecl, step: Step) -> None:
    for name in s.names:
        run.bundles.declare(name, s.bundle_kind, s.rank)
        run.bind(name, "bundle", name, s.line)
    rank = f"rank {s.rank}" if s.rank is not None else "rank 1"
    step.summary = f"{', '.join(s.names)}: {s.bundle_kind} bundle{'s' if len(s.names) > 1 else ''}, {rank}"


def _split(run: Run, s: n.SplitDecl, step: Step) -> None:
    used = run.class_uses.get(s.bundle)
    if used is not None:
        raise run.fail(s, f"'{s.bundle}' is split at line {s.line}, but a value at line {used} "
                          "already uses its classes; move the split before line " + str(used))
    parts = [p.name if p.name is not None else bundles_mod.Trivial(p.trivial) for p in s.parts]
    run.bundles.split(s.bundle, parts)
    run.keys[s.bundle] = digest(run.keys.get(s.bundle), run.step_key)
    unit = run.bundles.kind(s.bundle)
    size = run.bundles.rank if unit == "complex" else run.bundles.real_rank
    sizes = [str(size(p)) if isinstance(p, str) else str(p.rank) for p in parts]
    account = f"{unit} rank {run.bundles.rank(s.bundle)} = {' + '.join(sizes)}"
    step.checks.append(CheckResult(f"ranks add up: {account}", "proven"))


def _new_group(run: Run) -> int:
    """Each fiber owns the next block of the monomial order (a failed
    declaration keeps its number, so no two fibers ever share one)."""
    run.groups += 1
    return run.groups


def _declare_fiber(run: Run, s, fiber, step: Step) -> None:
    run.bind(s.name, "fiber", fiber, s.line)
    integrals = ", ".join(f"∫ {run.ring.monomial(m).to_text()} = {v.to_text()}"
                          for m, v in fiber.integrals.items())
    step.summary = f"{s.name}: fiber of dimension {fiber.dimension}; {integrals}"


def _surface(run: Run, s: n.SurfaceFiber, step: Step) -> None:
    genus = as_expr(run.evaluate(s.genus))
    if genus.is_integer is not True:
        raise run.fail(s.genus, f"the genus must be an integer or a symbol declared integer, not {notation.text(genus)}")
    group = _new_group(run)
    run.bundles.declare(s.tangent, "real", 2, group=group)
    run.bind(s.tangent, "bundle", s.tangent, s.line)
    tangent_euler = run.bundles.euler(s.tangent)
    _declare_fiber(run, s, fibers_mod.surface_fiber(s.name, run.ring, group, genus, tangent_euler), step)


def _sphere(run: Run, s: n.SphereFiber, step: Step) -> None:
    rank = run.bundles.rank(s.bundle)
    if run.bundles.kind(s.bundle) != "real":
        raise run.fail(s, f"the sphere bundle needs a real bundle; {s.bundle} is complex")
    top = run.bundles.pontryagin(s.bundle, rank // 2) if rank % 2 else None
    run.note_class_use(s.bundle, s.line)
    fiber = fibers_mod.sphere_fiber(
        s.name, run.ring, _new_group(run), s.bundle, rank, top, s.angular,
        run.conventions["angular_integral"], planes=_planes(run, s.bundle))
    run.bind(s.angular, "class", run.ring.monomial([(s.angular, 1)]), s.line)
    _declare_fiber(run, s, fiber, step)


def _planes(run: Run, bundle: str) -> list:
    """Euler classes of the oriented planes B splits into, if it splits so."""
    parts = run.bundles.parts(bundle)
    if not parts:
        return []
    planes = [p for p in parts if isinstance(p, str)]
    trivial = sum(p.rank for p in parts if not isinstance(p, str))
    if trivial != 1 or any(run.bundles.real_rank(p) != 2 for p in planes):
        return []
    return [run.bundles.euler(p) for p in planes]


def _general(run: Run, s: n.GeneralFiber, step: Step) -> None:
    group = _new_group(run)
    classes = fibers_mod.declare_fiber_classes(
        run.ring, group, [(c.name, c.degree) for c in s.classes], s.dimension, s.name)
    for c in s.classes:
        run.bind(c.name, "class", classes[c.name], c.line)
    relations = [_relation(run, r) for r in s.relations]
    integrals = [(_element(run, eq.lhs, "an integral"), _element(run, eq.rhs, "an integral"))
                 for eq in s.integrals]
    fiber = fibers_mod.general_fiber(s.name, run.ring, group, s.dimension, relations, integrals)
    _declare_fiber(run, s, fiber, step)


def _relation(run: Run, eq: n.Equation) -> Element:
    sides = [run.evaluate(side) for side in (eq.lhs, eq.rhs) if side is not None]
    if not all(isinstance(side, Element) for side in sides):
        raise run.fail(eq, "a relation must be a polynomial in the classes with "
                           "rational-function coefficients")
    return sides[0] - sides[1] if len(sides) == 2 else sides[0]


def _let(run: Run, s: n.Let, step: Step) -> None:
    value = run.evaluate(s.expr)
    step.checks.append(degree_check(value))
    run.output(step, s.name, value, s.line)


def _define(run: Run, s: n.Define, step: Step) -> None:
    """The body's other names keep the values they have now (``let!`` later
    does not change the function); the report shows the definition once."""
    captured = {name: run.lookup(name, name.line, name.column) for name in names_pass.references(s)}
    function = Function(s.name, tuple(map(str, s.params)), s.body, captured, run.where(s.line))
    run.bind(s.name, "function", function, s.line)
    step.summary = s.source.split(None, 1)[1].lstrip("!").strip()


def _use(run: Run, s: n.UseDecl, step: Step) -> None:
    """Run a used document's statements once; its checks become this step's,
    its problems are reported here with their own location."""
    module = s.module
    own = [d for d in module.exports if d.origin == module.display]
    step.summary = f"{module.display}: " + ", ".join(
        f"{d.name} ({d.kind}, line {d.line})" for d in own)
    if module.key in run.used:
        step.summary = f"{module.display}: already used above"
        return
    run.used.add(module.key)
    first = len(run.diagnostics)
    with run.reading(module.display):
        for inner in module.statements:
            done = run.run_step(0, inner)
            step.checks.extend(CheckResult(f"{module.display}:{done.line}: {c.what}", c.status, c.detail)
                               for c in done.checks)
    inner = run.diagnostics[first:]
    del run.diagnostics[first:]
    run.diagnostics.extend(Problem(Location(run.path, s.line, s.column), f"{p.location}: {p.message}")
                           for p in inner if not p.message.startswith("check failed"))
    for d in module.exports:
        binding = run.bindings.get(d.name)
        if binding is None:
            continue
        if isinstance(binding.value, Missing):
            run.bind(d.name, binding.kind, Missing(d.name, s.line), s.line)
        elif d.name in run.history:
            # Prose refers to what the use brought in at the use line.
            run.history[d.name] = [(s.line, rec) for _, rec in run.history[d.name]]
            if binding.kind == "value":
                step.values.append(run.history[d.name][-1][1])


def _element(run: Run, node, what: str) -> Element:
    value = run.evaluate(node)
    if not isinstance(value, Element):
        raise run.fail(node, f"{what} needs a polynomial in the classes, not {notation.text(value)}")
    return value


def _substitute(run: Run, s: n.Substitute, step: Step) -> None:
    target = run.evaluate(s.target)
    element = target if isinstance(target, Element) else None
    present = element.generator_keys() if element is not None else set()
    symbols = free_symbols(target)
    mapping = {}
    for pair in s.pairs:
        lhs = _element(run, pair.lhs, "substitute")
        rhs = run.evaluate(pair.rhs)
        key = _single_generator(run, pair.lhs, lhs)
        if key in mapping:
            raise run.fail(pair, f"{lhs.to_text()} is substituted twice")
        if key not in present and key not in symbols:
            raise run.fail(pair.lhs, f"{lhs.to_text()} does not occur in the expression (a typo?)")
        degree = lhs.degrees()[0]
        got = rhs.degrees() if isinstance(rhs, Element) else [0]
        ok = not got or got == [degree]
        replaced = f"degree {', '.join(map(str, got))}" if got else "0"
        step.checks.append(CheckResult(
            f"{lhs.to_text()} (degree {degree}) replaced by {replaced}",
            "proven" if ok else "failed",
            "" if ok else f"the right side has degree {', '.join(map(str, got))}, not {degree}"))
        mapping[key] = rhs
    if any(c.status == "failed" for c in step.checks):
        for name in s.outputs:
            run.bind(name, "value", Missing(name, s.line), s.line)
        return
    if all(isinstance(v, Element) for v in mapping.values()) and element is not None:
        result = element.substitute(mapping)
    elif is_class_free(target) and all(isinstance(k, sympy.Symbol) for k in mapping):
        # An irrational value (an extremum) put into a class-free expression.
        exact = as_expr(target).subs({k: as_expr(v) for k, v in mapping.items()})
        result = tidy(exact, list(run.specs.values()))
        if result.has(sympy.I):
            raise run.fail(s, f"the substitution makes the value complex: {notation.text(result)}")
    else:
        raise run.fail(s, "an irrational value can only be substituted into a class-free expression")
    step.checks.append(degree_check(result))
    run.output(step, s.outputs[0], result, s.line)


def _single_generator(run: Run, node, value: Element):
    """The generator key (or symbol) a substitution's left side names."""
    terms = value.terms()
    if len(terms) == 1:
        monomial, coefficient = terms[0]
        if coefficient == 1 and len(monomial) == 1 and monomial[0][1] == 1:
            return monomial[0][0]
        if not monomial and coefficient.is_Symbol:
            return coefficient
    raise run.fail(node, f"the left side {value.to_text()} is not a single class or symbol")


def _reduce(run: Run, s: n.Reduce, step: Step) -> None:
    target = _element(run, s.target, "reduce")
    relations = [_relation(run, r) for r in s.relations]
    for node, relation in zip(s.relations, relations):
        if relation.is_class_free() and not relation.is_zero:
            raise run.fail(node, "a relation for reduce must involve classes; "
                                 "to give a symbol a value use substitute or for")
    basis = run.ring.groebner(relations)
    result = run.ring.reduce(target, basis)
    again = run.ring.reduce(result, basis)
    step.checks.append(CheckResult(f"normal form modulo {len(relations)} relation"
                                   f"{'s' if len(relations) != 1 else ''} (basis of {len(basis)})",
                                   "proven" if again == result else "failed"))
    step.checks.append(degree_check(result))
    run.output(step, s.outputs[0], result, s.line)


def _integrate(run: Run, s: n.Integrate, step: Step) -> None:
    target = _element(run, s.target, "integrate")
    _, fiber = run.lookup(s.fiber, s.fiber_line, s.fiber_column)
    result, checks = fibers_mod.integrate(target, fiber)
    for c in checks:
        step.checks.append(CheckResult(c.what, "proven" if c.ok else "failed", c.detail))
    run.output(step, s.outputs[0], result, s.line)


def _coefficients(run: Run, s: n.Coefficients, step: Step) -> None:
    target = _element(run, s.target, "coefficients")
    if len(s.monomials) != len(s.outputs):
        raise run.fail(s, f"{len(s.monomials)} monomials but {len(s.outputs)} names after ->")
    rest = target
    for node, name in zip(s.monomials, s.outputs):
        pairs = _written_monomial(run, node)
        if not run.ring.is_normal_monomial(pairs):
            raise run.fail(node, f"{run.ring.monomial_text(pairs)} is not a monomial of the normal form")
        monomial = run.ring.monomial(pairs)
        coefficient = target.coefficient(monomial)
        rest = rest - coefficient * monomial
        run.output(step, name, coefficient, s.line)
    step.remainder = record("remainder", rest)
    step.checks.append(CheckResult(
        "every monomial read" if rest.is_zero else
        f"the rest has {len(rest.terms())} term{'s' if len(rest.terms()) != 1 else ''} (shown as remainder)",
        "proven"))


def _written_monomial(run: Run, node) -> list:
    """A monomial as the author wrote it, as (generator key, exponent) pairs
    (``1`` is the empty monomial: the class-free part).

    Read from the syntax tree rather than from its value, because evaluating
    would already rewrite a non-normal monomial (``e(T4)^2`` into ``p2(T4)``)
    and hide the mistake."""
    if isinstance(node, n.Num) and node.value == 1:
        return []
    if isinstance(node, n.Binary) and node.op == "*":
        return _written_monomial(run, node.left) + _written_monomial(run, node.right)
    if isinstance(node, n.Binary) and node.op == "^":
        k = run.evaluator.integer_arg(node.right)
        if k < 1:
            raise run.fail(node.right, "a monomial has positive exponents")
        return [(key, e * k) for key, e in _written_monomial(run, node.left)]
    value = _element(run, node, "coefficients")
    terms = value.terms()
    if len(terms) == 1 and terms[0][1] == 1 and len(terms[0][0]) == 1:
        return list(terms[0][0])  # a class, or a power of one (p1 of a plane is e^2)
    raise run.fail(node, f"{value.to_text()} is not a single class: coefficients reads monomials "
                         "in the classes of the normal form")


def _extremize(run: Run, s: n.Extremize, step: Step) -> None:
    f = run.evaluate(s.target)
    if not is_class_free(f):
        classes = ", ".join(sorted(f.generator_keys()))
        raise run.fail(s.target, f"{s.mode} needs a class-free expression; this one still contains "
                                 f"{classes} (degrees {', '.join(map(str, f.degrees()))})")
    variables = [(run.symbols_by_name[v.name].symbol,
                  None if v.interval is None else (v.interval.low, v.interval.high))
                 for v in s.variables]
    try:
        expr = as_expr(f)
        involved = [spec for spec in run.specs.values() if spec.symbol in expr.free_symbols]
        result = extremize(s.mode, expr, variables, involved,
                           run.seed(s.line), name=_target_name(s.target))
    except ExtremizeError as exc:
        if exc.status != "failed":
            raise run.fail(s, str(exc)) from None
        step.checks.append(CheckResult("one admissible critical point", "failed", str(exc)))
        for name in s.outputs:
            run.bind(name, "value", Missing(name, s.line), s.line)
        return
    for name, coordinate in zip(s.point, result.point):
        run.output(step, name, coordinate, s.line)
    run.output(step, s.value, result.value, s.line)
    status = "proven" if result.settled == "symbolic" else "sampled"
    account = result.account.replace("**", "^")
    detail = account
    step.checks.append(CheckResult("one admissible critical point", status, detail))


def _target_name(node) -> str:
    return node.id if isinstance(node, n.Name) else "f"


def _check(run: Run, s: n.Check, step: Step) -> None:
    lhs = run.evaluate(s.lhs)
    rhs = run.evaluate(s.rhs)
    text = s.source.split(None, 1)[1] if " " in s.source else s.source
    step.checks.append(claim(lhs, s.op, rhs, run.points(s.clauses), run.context(s.line), text))


def _show(run: Run, s: n.Show, step: Step) -> None:
    for node in s.exprs:
        value = run.evaluate(node)
        rec = record(node.id if isinstance(node, n.Name) else "", value)
        step.values.append(rec)


def _table(run: Run, s: n.Table, step: Step) -> None:
    values = [run.evaluate(node) for node in s.exprs]
    points = run.points(s.clauses)
    params = [c.name for c in s.clauses]
    columns = [notation.name_latex(p) for p in params]
    columns += [notation.name_latex(node.id) if isinstance(node, n.Name) else r"\cdots"
                for node in s.exprs]
    rows, text_rows = [], []
    for point in points or [{}]:
        cells = [substitute(run.ring, v, point) for v in values]
        coords = [point[run.symbols_by_name[p].symbol] for p in params]
        rows.append([notation.latex(c) for c in coords] + [record("", c).latex for c in cells])
        text_rows.append([notation.text(c) for c in coords] + [show(c) for c in cells])
    names = params + [node.id if isinstance(node, n.Name) else "" for node in s.exprs]
    step.table = TableData(columns=columns, rows=rows, text_rows=text_rows, names=names)


def _plot(run: Run, s: n.Plot, step: Step) -> None:
    values = [run.evaluate(node) for node in s.exprs]
    var = run.symbols_by_name[s.variable]
    points = run.points(s.clauses)
    if len(points) > 1:
        raise run.fail(s, "plot takes one value for each parameter after for")
    fixed = points[0] if points else {}
    low, high = s.interval.low, s.interval.high
    if not low < high:
        raise run.fail(s.interval, "the plot interval must have low < high")
    curves = {}
    for node, value in zip(s.exprs, values):
        value = substitute(run.ring, value, fixed)
        if not is_class_free(value):
            raise run.fail(node, "plot draws class-free values only")
        expr = as_expr(value)
        left = free_symbols(value) - {var.symbol}
        if left:
            raise run.fail(node, "give values for " + ", ".join(sorted(x.name for x in left)) + " after for")
        samples = []
        for i in range(121):
            x = sympy.Rational(low.numerator, low.denominator) + (
                sympy.Rational(high.numerator, high.denominator) - sympy.Rational(low.numerator, low.denominator)) * i / 120
            if not var.admits(Fraction(int(x.p), int(x.q))):
                continue
            y = expr.subs(var.symbol, x).evalf(20)
            if y.is_real:
                samples.append((float(x), float(y)))
        curves[node.id if isinstance(node, n.Name) else f"curve {len(curves) + 1}"] = samples
    step.plot = PlotData(variable=s.variable, low=fraction_text(low), high=fraction_text(high),
                         fixed={sym.name: notation.text(v) for sym, v in fixed.items()}, curves=curves)


#: Statements whose outcome is kept in the build cache; declarations always
#: run, since they set up the ring the cached values live in.
CACHED = frozenset({n.Let, n.Substitute, n.Reduce, n.Integrate, n.Coefficients,
                    n.Extremize, n.Check, n.Show, n.Table, n.Plot})

HANDLERS = {
    n.SymbolDecl: _symbol, n.ConventionDecl: _convention, n.BundleDecl: _bundle,
    n.SplitDecl: _split, n.SurfaceFiber: _surface, n.SphereFiber: _sphere,
    n.GeneralFiber: _general, n.Let: _let, n.Define: _define, n.UseDecl: _use,
    n.Substitute: _substitute,
    n.Reduce: _reduce, n.Integrate: _integrate, n.Coefficients: _coefficients,
    n.Extremize: _extremize, n.Check: _check, n.Show: _show, n.Table: _table,
    n.Plot: _plot,
}
