"""The run loop: parse, resolve names, run each statement once, record every step.

Error policy: a statement that raises a ``DocumentError`` (or an algebra
error) becomes an *error* step and the document goes on, so one bad line does
not hide the rest of the report.  Every failed or errored step gives one
``FILE:LINE:COL`` diagnostic; the later steps that could not run because an
earlier one produced no value are counted on one line, not listed.

Limits: each step runs under a step time limit and the whole build under a
build time limit.  Both are cooperative deadlines (``algebra.budget``, which
long loops poll, so they hold in any thread) and, in the main thread, also
an alarm signal that interrupts code that does not poll.
"""
from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from dataclasses import dataclass, field
from typing import Callable, Optional

from .. import __version__, names as names_pass, preambles
from ..algebra import budget, fibers as fibers_mod
from ..algebra.graded import AlgebraError
from ..document import Block, ProsePart, read_document
from ..errors import DocumentError, Location, Problem
from ..expressions import Missing, MissingValue
from ..precision import prose_read
from ..results import CheckResult, Prose, Report, Step, ValueRecord
from ..statements import nodes as n
from ..statements.parser import parse_block
from .cache import CODE, StepCache, digest
from .handlers import CACHED, HANDLERS
from .layer import DISAGREES, CacheLayer
from .scope import DocScope

TOOL_NAME = "anomark"
#: The check of a step that could not run.
STEP_RUNS = "step runs"


@dataclass(frozen=True)
class BuildOptions:
    """How one build runs: overrides, cache, limits, progress."""

    overrides: dict = field(default_factory=dict)  # --set NAME=VALUE, as Fractions
    allow_html: bool = False
    use_cache: bool = True
    time_limit: float = 30.0  # seconds per step
    build_time_limit: float = 300.0  # seconds for the whole build
    recompute: bool = False  # compute every step and compare with the cache
    progress: Optional[Callable[[Step], None]] = None


@contextmanager
def _alarm():
    """Interrupt code that does not poll the budget when the active deadline
    passes (only where signals work: the main thread).

    The alarm re-arms itself: an exception raised while Python is running a
    garbage-collection callback is swallowed, so one alarm is not enough."""
    left = budget.remaining()
    if left is None or threading.current_thread() is not threading.main_thread():
        yield
        return
    seconds, limit = left

    def expire(signum, frame):
        signal.setitimer(signal.ITIMER_REAL, 0.05)
        raise budget.BudgetExceeded(limit)
    previous = signal.signal(signal.SIGALRM, expire)
    signal.setitimer(signal.ITIMER_REAL, max(seconds, 0.001))
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def _limit_name(what: str, seconds: float, flag: str) -> str:
    return f"the {what} time limit of {seconds:g} s ({flag})"


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
    limit = _limit_name("build", options.build_time_limit, "--build-time-limit")
    with budget.deadline(options.build_time_limit, limit):
        try:
            with _alarm():
                run, statements_by_block = _prepare(path, text, options)
        except budget.BudgetExceeded as exc:
            raise DocumentError(Location(path, 1, 1),
                                f"{exc.limit} exceeded while reading the document") from None
        return run.execute(statements_by_block)


def _prepare(path: str, text: str, options: BuildOptions):
    """Parse, resolve names and set up the run: everything before the first step."""
    document, statements_by_block = parse(path, text)
    statements = [s for i in sorted(statements_by_block) for s in statements_by_block[i]]
    try:
        loaded = iter(preambles.load(path, statements, parse))
    except DocumentError as err:
        err.warnings = document.warnings
        raise
    statements_by_block = {i: [next(loaded) for _ in statements_by_block[i]]
                           for i in sorted(statements_by_block)}
    statements = [s for i in sorted(statements_by_block) for s in statements_by_block[i]]
    refs = [(r.name, r.line, r.column) for part in document.parts
            if isinstance(part, ProsePart) for r in part.refs]
    front_conventions = [(c.name, c.line, c.column) for c in document.front.conventions]
    try:
        names_pass.resolve(path, statements, front_conventions, refs)
        return Run(path, document, statements, options), statements_by_block
    except DocumentError as err:  # a near-miss fence often explains an unknown name
        err.warnings = document.warnings
        raise


class Run:
    """One evaluation of one document: the scope, the cache layer and the steps."""

    def __init__(self, path: str, document, statements, options: BuildOptions):
        self.path = path
        self.document = document
        self.options = options
        flat = list(preambles.flatten(statements))
        self.scope = DocScope(path, document, flat, options.overrides)
        #: The documents this one uses, by key: a rebuild must read them again.
        self.sources = sorted({s.module.key for s in flat if isinstance(s, n.UseDecl) and s.module is not None})
        self.cache = StepCache(path, options.use_cache)
        self.layer = CacheLayer(self.scope, self.cache, options.recompute)
        self.step_limit = _limit_name("step", options.time_limit, "--time-limit")
        #: Diagnostics in order, each with the count of later steps it stands for.
        self.problems: list[list] = []
        #: Line of a step that produced no value → the line of the root cause.
        self.roots: dict[int, int] = {}
        #: Root cause line → index in ``problems`` of its printed follow-on.
        self.follow_ons: dict[int, int] = {}
        #: Lines of steps already accounted for as follow-ons.
        self.counted: set[int] = set()
        #: The line of the step that ran out of build time; later steps do not run.
        self.out_of_time: Optional[int] = None
        #: Line of an error step → where inside the statement its problem is.
        self.error_at: dict[int, Location] = {}
        #: ``@{NAME}`` in prose that show a value beyond its known precision.
        self.prose_errors = 0

    # ------------------------------------------------------------ running

    def execute(self, statements_by_block) -> Report:
        parts = []
        index = 0
        for i, part in enumerate(self.document.parts):
            if isinstance(part, ProsePart):
                parts.append(part)
                continue
            for statement in statements_by_block.get(i, []):
                index += 1
                step = self.run_statement(index, statement)
                parts.append(step)
                if self.options.progress:
                    self.options.progress(step)
        self.cache.save()
        # Prose is read after the whole run: an @{NAME} may show a later binding.
        items = [Prose(p.markdown, p.line, self._refs(p)) if isinstance(p, ProsePart) else p
                 for p in parts]
        scope, front = self.scope, self.document.front
        values = {name: hist[-1][1] for name, hist in scope.history.items()
                  if scope.bindings[name].kind == "value"
                  and not isinstance(scope.bindings[name].value, Missing)}
        return Report(
            tool_name=TOOL_NAME, tool_version=__version__, document=self.path,
            title=front.title, authors=list(front.authors), date=front.date,
            abstract=front.abstract, conventions=scope.report_conventions(),
            truncate=front.truncate, items=items, values=values,
            allow_html=self.options.allow_html, diagnostics=self._diagnostics(),
            warnings=list(self.document.warnings), cached_steps=self.layer.restored,
            prose_errors=self.prose_errors,
            notation=dict(front.notation), headline=list(front.results),
            sources=self.sources)

    def _refs(self, part: ProsePart) -> dict[str, ValueRecord]:
        """Each @{NAME}: the binding in force at that line, else the first one.
        Showing a value that is not known in every degree it reads is an error."""
        shown = {}
        for ref in part.refs:
            if self.scope.history.get(ref.name):
                rec = shown[ref.name] = _at(self.scope.history[ref.name], ref.line)
                problem = prose_read(rec, self.scope.ring.truncate, f"@{{{ref.name}}}")
                if problem:
                    self.prose_errors += 1
                    self.problems.append([Problem(Location(self.path, ref.line, ref.column),
                                                  problem), 0])
        return shown

    def run_statement(self, index: int, s) -> Step:
        """One statement; a ``use`` first runs its document's statements
        (once per build), each a step of its own that the ``use`` step shows."""
        if isinstance(s, n.UseDecl) and s.module.key not in self.scope.used:
            self.scope.used[s.module.key] = self._run_used(s.module)
        return self.run_step(index, s)

    def _run_used(self, module) -> list[Step]:
        """The used document's steps, with their problems kept apart: the
        ``use`` step reports them, at its own line."""
        kept = self.problems, self.roots, self.follow_ons, self.counted, self.path
        self.problems, self.roots, self.follow_ons, self.counted = [], {}, {}, set()
        self.path = module.display
        try:
            with self.scope.reading(module.display):
                return [self.run_statement(0, inner) for inner in module.statements]
        finally:
            self.problems, self.roots, self.follow_ons, self.counted, self.path = kept

    def run_step(self, index: int, s) -> Step:
        scope = self.scope
        inputs = [(name, scope.keys.get(name)) for name in names_pass.references(s)]
        seeded = s.line if isinstance(s, (n.Check, n.Extremize)) else None
        # The statement, its inputs' keys, the ring so far and the tool's code.
        scope.step_key = digest(__version__, CODE, scope.ring_key, s.kind, s.source, seeded, inputs)

        def blank() -> Step:
            return Step(index=index, line=s.line, column=s.column, end_line=s.end_line,
                        source=s.source, kind=s.kind, outputs=_outputs(s),
                        rebind=getattr(s, "rebind", False))

        def compute(step: Step) -> None:
            start = time.perf_counter()
            self._compute(s, step)
            step.seconds = time.perf_counter() - start

        if type(s) in CACHED:
            step = self.layer.step(scope.step_key, s, blank, compute)
        else:
            scope.ring_key = digest(scope.ring_key, scope.step_key)
            step = blank()
            compute(step)
        self._note(step, s)
        return step

    def _compute(self, s, step: Step) -> None:
        """Run the handler under the limits; turn what it raises into an error step."""
        where = Location(self.path, s.line, s.column)
        if self.out_of_time is not None:
            return self._step_error(step, s, Problem(where, f"not run: the build time limit was "
                                                            f"reached at line {self.out_of_time}"),
                                    follow_on=True, origin=self.out_of_time)
        try:
            with budget.deadline(self.options.time_limit, self.step_limit), _alarm():
                HANDLERS[type(s)](self.scope, s, step)
        except MissingValue as err:
            self._step_error(step, s, err.problems[0], follow_on=True, origin=err.line)
        except DocumentError as err:
            self._step_error(step, s, err.problems[0])
        except budget.BudgetExceeded as exc:
            if exc.limit != self.step_limit:  # the build's own limit: the rest cannot run
                self.out_of_time = s.line
            self._step_error(step, s, Problem(where, f"{exc.limit} exceeded"))
        except (AlgebraError, fibers_mod.FiberError, ValueError, ZeroDivisionError) as exc:
            self._step_error(step, s, Problem(where, str(exc)))
        except RecursionError:
            self._step_error(step, s, Problem(where, "expression too deeply nested"))

    def _step_error(self, step: Step, s, problem: Problem, follow_on: bool = False,
                    origin: int | None = None) -> None:
        """An error step: everything the statement would have bound has no value."""
        step.checks.append(CheckResult(STEP_RUNS, "error", problem.message))
        self.error_at[s.line] = problem.location
        self.scope.bind_missing(names_pass.bound_names(s), s.line)
        if not follow_on:
            return
        root = self.roots.get(origin, origin)
        self.roots[s.line] = root
        if root in self.follow_ons:
            self.problems[self.follow_ons[root]][1] += 1
        else:
            self.follow_ons[root] = len(self.problems)
            self.problems.append([problem, 0])
        self.counted.add(s.line)

    def _note(self, step: Step, s) -> None:
        """One diagnostic for each failed or errored check a step has (its own, not a follow-on)."""
        if s.line in self.counted:
            return
        for check in step.checks:
            if check.status not in ("failed", "error"):
                continue
            form = MESSAGES.get((check.status, check.what), MESSAGES[check.status])
            message = form.format(what=check.what, detail=check.detail).removesuffix(": ")
            where = Location(self.path, s.line, s.column)
            if check.what == STEP_RUNS:
                where = self.error_at.get(s.line, where)
            self.problems.append([Problem(where, message), 0])
        if s.line == self.out_of_time:  # the steps it keeps from running are counted on its line
            self.follow_ons[s.line] = len(self.problems) - 1

    def _diagnostics(self) -> list[str]:
        lines = []
        for problem, more in self.problems:
            lines.append(str(problem) + (f" (and {more} later step{'s' if more != 1 else ''} "
                                         "for the same reason)" if more else ""))
        return lines


#: How a failed or errored check is told on the command line, by status (and by the
#: engine's own check names); anything else is a claim.
MESSAGES = {
    "failed": "check failed: {what}: {detail}",
    "error": "could not decide {what}: {detail}",
    ("error", STEP_RUNS): "{detail}",
    ("error", DISAGREES): "{what}: {detail}",
}


def _outputs(s) -> list[str]:
    return list(getattr(s, "outputs", ()) or ((s.name,) if isinstance(s, n.Let) else ()))


def _at(history: list, line: int) -> ValueRecord:
    before = [rec for bound_at, rec in history if bound_at < line]
    return before[-1] if before else history[0][1]
