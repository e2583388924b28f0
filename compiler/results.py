"""The plain data model of a build: what every renderer reads.

The engine fills it in; HTML, LaTeX and JSON are views of it, and ``diff``
compares two of its JSON forms.  Nothing here knows about sympy: a value is
its normal-form ``text`` (what comparisons and diffs use) and its
presentation ``tree``, plain JSON lists ``[kind, *children]`` that the
printers in ``compiler.render.printers`` turn into text, LaTeX and MathML.

Tree kinds: ``["int", n]`` (n >= 0), ``["sym", name]``, ``["cls", text]`` (a
class generator as the document writes it), ``["add", t, ...]``,
``["neg", t]``, ``["mul", f, ...]``, ``["div", num, den]``,
``["pow", base, n]`` (n >= 2), ``["sqrt", t]`` and ``["order", n]`` (the
term standing for what is not known from degree n on).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional, Union

#: The four check statuses, weakest last.  A step's status is the weakest of
#: its checks; a document passes when nothing failed or errored.
STATUSES = ("proven", "sampled", "failed", "error")


def weakest(statuses) -> str:
    """The weakest status among ``statuses`` (``proven`` for none)."""
    rank = max((STATUSES.index(s) for s in statuses), default=0)
    return STATUSES[rank]


@dataclass
class CheckResult:
    """One check of a step: what it claims, its status and why."""

    what: str  # "homogeneous of degree 8", "claim holds", ...
    status: str  # one of STATUSES
    detail: str = ""


@dataclass
class ValueRecord:
    """A named value: normal-form text, form degrees, presentation tree (the
    renderers print the tree; the record holds no notation)."""

    name: str
    text: str
    degrees: list[int] = field(default_factory=list)
    tree: list = field(default_factory=lambda: ["int", 0])
    #: The degree from which the value is not known (``truncate`` dropped what
    #: it depends on); None when it is exact.  The tree ends in its order term.
    unknown_from: Optional[int] = None


_ARITY = {"order": 1, "int": 1, "sym": 1, "cls": 1, "neg": 1, "sqrt": 1, "div": 2, "pow": 2, "root": 2}


def valid_tree(tree, depth: int = 0) -> bool:
    """Whether ``tree`` is a presentation tree (for data read back from a cache)."""
    if depth > 200 or not isinstance(tree, list) or not tree or tree[0] not in (*_ARITY, "add", "mul"):
        return False
    kind, args = tree[0], tree[1:]
    if kind in ("int", "pow", "order", "root"):
        number = args[-1] if args else None
        if type(number) is not int or number < 0 or len(args) != _ARITY[kind]:
            return False
        return kind in ("int", "order") or valid_tree(args[0], depth + 1)
    if kind in ("sym", "cls"):
        return len(args) == 1 and isinstance(args[0], str)
    if kind in _ARITY and len(args) != _ARITY[kind]:
        return False
    return len(args) >= 1 and all(valid_tree(a, depth + 1) for a in args)


@dataclass
class TableData:
    """Parameters, then values: headers as written, cells as presentation
    trees (printed by the renderers, with the author's notation)."""

    names: list[str]  # header cells as written (N, a_star); "" for an expression
    cells: list[list[list]]  # rows of presentation trees
    text_rows: list[list[str]]  # the same cells in our expression syntax


@dataclass
class PlotData:
    """A plot as exact numbers in text and sampled curves: what renderers draw."""

    variable: str
    low: str
    high: str
    fixed: dict[str, str]  # parameter -> value used
    curves: dict[str, list[tuple[float, float]]]  # name -> sampled points


@dataclass
class Step:
    """One statement's outcome, in document order."""

    index: int  # 1-based, over the whole document
    line: int
    column: int
    end_line: int
    source: str
    kind: str  # the statement word; "let" for let!
    outputs: list[str]
    checks: list[CheckResult] = field(default_factory=list)
    values: list[ValueRecord] = field(default_factory=list)  # what it shows
    rebind: bool = False
    remainder: Optional[ValueRecord] = None  # coefficients: what was not read
    summary: str = ""  # one-line human account ("chose eps = -1/3: Hessian -4 < 0")
    table: Optional[TableData] = None
    plot: Optional[PlotData] = None
    seconds: float = 0.0
    cached: bool = False

    @property
    def status(self) -> str:
        return weakest(c.status for c in self.checks)

    @property
    def routine_checks(self) -> list[CheckResult]:
        """Automatic checks that passed exactly: a reader folds these away.
        A ``check`` statement's own claims are never routine."""
        return [c for c in self.checks if self.kind != "check" and c.status == "proven"]

    @property
    def notable_checks(self) -> list[CheckResult]:
        """Every check not routine: claims, and anything sampled, failed or in error."""
        return [c for c in self.checks if self.kind == "check" or c.status != "proven"]


@dataclass
class Prose:
    """A run of Markdown between computation blocks.

    ``refs`` holds the value each ``@{NAME}`` in it shows: the binding in
    force at that point of the document.
    """

    markdown: str
    line: int  # file line of the first line of ``markdown``
    refs: dict[str, ValueRecord] = field(default_factory=dict)


Item = Union[Prose, Step]


@dataclass
class Report:
    """A whole build: every step and prose part, for the renderers and the record."""

    tool_name: str
    tool_version: str
    document: str  # the path as given on the command line
    title: str
    authors: list[str]
    date: str
    abstract: str
    conventions: dict[str, str]  # name -> exact value as text
    truncate: int
    items: list[Item]
    values: dict[str, ValueRecord]  # each name's final binding
    allow_html: bool = False
    #: front matter ``notation``: name -> the author's LaTeX for it (checked).
    notation: dict[str, str] = field(default_factory=dict)
    #: front matter ``results``: the headline values, in the author's order.
    headline: list[str] = field(default_factory=list)
    #: ``FILE:LINE:COL: message`` lines for every failed check and step error,
    #: for the command line's standard error.
    diagnostics: list[str] = field(default_factory=list)
    #: Located problems that did not stop the build (a near-miss ``derive`` fence).
    warnings: list = field(default_factory=list)
    #: How many steps were replayed from the build cache rather than computed.
    cached_steps: int = 0
    #: How many ``@{NAME}`` in prose show a value beyond its known precision.
    prose_errors: int = 0
    #: The documents it used, by key (a real path, or ``library/NAME``).
    sources: list[str] = field(default_factory=list)

    @property
    def steps(self) -> list[Step]:
        return [i for i in self.items if isinstance(i, Step)]

    @property
    def passed(self) -> bool:
        return not self.prose_errors and all(s.status in ("proven", "sampled") for s in self.steps)

    def count(self, status: str) -> int:
        """How many checks over all steps ended in ``status``."""
        return sum(c.status == status for s in self.steps for c in s.checks)

    @property
    def check_count(self) -> int:
        return sum(len(s.checks) for s in self.steps)
