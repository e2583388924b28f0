"""The plain data model of a build: what every renderer reads.

The engine fills it in; HTML, LaTeX and JSON are views of it, and ``diff``
compares two of its JSON forms.  Nothing here knows about sympy: values are
already printed, as our own expression syntax (``text``) and as LaTeX.
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
    what: str  # "homogeneous of degree 8", "claim holds", ...
    status: str  # one of STATUSES
    detail: str = ""


@dataclass
class ValueRecord:
    """A named value as printed: re-readable text, LaTeX, and form degrees."""

    name: str
    text: str
    latex: str
    degrees: list[int] = field(default_factory=list)
    #: The degree from which the value is not known (``truncate`` dropped what
    #: it depends on); None when it is exact.  ``text`` and ``latex`` show it.
    unknown_from: Optional[int] = None


@dataclass
class TableData:
    columns: list[str]  # header cells as LaTeX (parameters, then values)
    rows: list[list[str]]  # cells as LaTeX
    text_rows: list[list[str]]  # the same cells in our expression syntax
    names: list[str] = field(default_factory=list)  # header cells as written (a_star, N)


@dataclass
class PlotData:
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
    #: ``FILE:LINE:COL: message`` lines for every failed check and step error,
    #: for the command line's standard error.
    diagnostics: list[str] = field(default_factory=list)
    #: Located problems that did not stop the build (a near-miss ``derive`` fence).
    warnings: list = field(default_factory=list)
    #: How many steps were replayed from the build cache rather than computed.
    cached_steps: int = 0
    #: How many ``@{NAME}`` in prose show a value beyond its known precision.
    prose_errors: int = 0

    @property
    def steps(self) -> list[Step]:
        return [i for i in self.items if isinstance(i, Step)]

    @property
    def passed(self) -> bool:
        return not self.prose_errors and all(s.status in ("proven", "sampled") for s in self.steps)

    def count(self, status: str) -> int:
        """How many checks over all steps ended in ``status``."""
        return sum(c.status == status for s in self.steps for c in s.checks)
