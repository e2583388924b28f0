"""Helpers shared by the test files: the command run in-process, derive
blocks parsed and their problems, small documents built through the engine,
lookups in a JSON record, a hand-built Report for the renderer tests, bundle
tables for the algebra tests, pdflatex, and the headless browser.  Fixtures built on these live in
conftest.py.
"""
from __future__ import annotations

import io
import json
import os
import re
import shutil
import subprocess
import textwrap
from contextlib import redirect_stderr, redirect_stdout
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

import pytest

from compiler import cli
from compiler.engine import BuildOptions, build
from compiler.errors import DocumentError
from compiler.results import CheckResult, PlotData, Prose, Report, Step, TableData, ValueRecord
from compiler.statements.parser import parse_block

ROOT = Path(__file__).resolve().parent.parent
DERIVATIONS = ROOT / "derivations"
DOCUMENTS = sorted(DERIVATIONS.glob("*.md"))
SETTLED = frozenset({"proven", "sampled"})
#: One ``FILE:LINE:COL: message`` line, as every problem is reported.
LOCATION = re.compile(r"^(?P<file>[^:\n]+):(?P<line>\d+):(?P<col>\d+): (?P<message>.+)$")


# ---------------------------------------------------------------- the command, in-process

@dataclass(frozen=True)
class Outcome:
    """What one run of the command left behind (named like a finished process)."""

    returncode: int
    stdout: str
    stderr: str


def anomark(*args, cwd: Path = ROOT) -> Outcome:
    """Run ``anomark ARGS`` in this interpreter, from ``cwd``, as ``python -m
    compiler`` would: ``cli.main``'s return value, or the code of a SystemExit
    (argparse's ``--help``, ``--version`` and usage errors), is the status."""
    out, err = io.StringIO(), io.StringIO()
    here = os.getcwd()
    os.chdir(cwd)
    try:
        with redirect_stdout(out), redirect_stderr(err):
            try:
                code = cli.main([str(a) for a in args])
            except SystemExit as stop:
                code = stop.code
        if code is None:
            code = 0
        elif not isinstance(code, int):  # sys.exit("message"): printed, status 1
            err.write(f"{code}\n")
            code = 1
    finally:
        os.chdir(here)
    return Outcome(code, out.getvalue(), err.getvalue())


def visible(folder: Path) -> list[str]:
    """Names in ``folder``, leaving out hidden ones (the cache, temporaries)."""
    return sorted(p.name for p in folder.iterdir() if not p.name.startswith("."))


# ---------------------------------------------------------------- derive blocks, parsed

#: The format spec's declaration examples, verbatim, in an order that compiles
#: (the surface fiber declares TS before the split that uses it).
SPEC_DECLARATIONS = """\
symbol N, k: integer, positive      # assumptions: integer, positive, nonnegative, real, nonzero
symbol g: integer, g >= 2           # bounds: g >= 2, z > 0, 0 < x < 1
symbol z: real, z > 0
symbol eps: real
convention angular_integral = 2     # default value; front matter or --set overrides it
bundle T4: real, rank 4
bundle T6: real, rank 6             # oriented real bundle: p1(T6) .. p3(T6), e(T6)
bundle NW: real, rank 5             # p1(NW), p2(NW); odd rank, so no e(NW)
bundle L1, L2: line                 # complex line bundles: c1(L1), c1(L2)
bundle V: complex, rank 3           # c1(V) .. c3(V)
fiber Sigma: surface, genus g, tangent TS
split T6 = T4 + TS                  # Whitney sum (TS declared earlier, e.g. by a surface fiber)
split NW = L1 + L2 + trivial(1)     # real rank 5 = two oriented planes + a trivial line
"""


def parse(text: str, first_line: int = 1):
    """The statements of a derive block (dedented) that starts at ``first_line`` of doc.md."""
    return parse_block(textwrap.dedent(text).strip("\n"), first_line, "doc.md")


def parse_problems(text: str, first_line: int = 1) -> list[tuple[str, int, int, str]]:
    """(path, line, column, message) of each problem of a block that does not parse."""
    with pytest.raises(DocumentError) as info:
        parse(text, first_line)
    return [(p.location.path, p.location.line, p.location.column, p.message)
            for p in info.value.problems]


def parse_problem(text: str, first_line: int = 1) -> tuple[int, int, str]:
    """(line, column, message) of the one problem of a block that does not parse."""
    (found,) = parse_problems(text, first_line)
    return found[1:]


# ---------------------------------------------------------------- documents through the engine

def compile_text(path: Path, text: str, **options):
    """Write ``text`` to ``path`` and build it in-process; the cache is off
    unless asked for.  Raises DocumentError like the engine does."""
    path.write_text(text, encoding="utf-8")
    options.setdefault("use_cache", False)
    return build(str(path), text, BuildOptions(**options))


# ---------------------------------------------------------------- the JSON record

def normalised(text: str) -> str:
    """Source text with continuation backslashes and runs of blanks collapsed."""
    return " ".join(text.replace("\\\n", " ").replace("\\", " ").split())


def find_step(record: dict, source: str) -> dict:
    """The only step whose source is ``source`` (up to blanks and continuations)."""
    want = normalised(source)
    found = [s for s in record["steps"] if normalised(s["source"]) == want]
    assert len(found) == 1, f"expected exactly one step {want!r}, found {len(found)}"
    return found[0]


def check_statuses(record: dict, source: str) -> set[str]:
    """The statuses of a step's checks; the step must have run some."""
    step = find_step(record, source)
    assert step["checks"], f"{source!r} ran no checks"
    return {c["status"] for c in step["checks"]}


def assert_proven(record: dict, source: str) -> None:
    assert check_statuses(record, source) == {"proven"}, find_step(record, source)["checks"]


def assert_settled(record: dict, source: str) -> None:
    """Proven, or sampled where the engine cannot simplify the radicals."""
    assert check_statuses(record, source) <= SETTLED, find_step(record, source)["checks"]


# ---------------------------------------------------------------- a hand-built report

# M5-brane anomaly polynomial: I8 = (N-1) I8(1) + (N^3-N)/24 p2(N).
# Source: Harvey, Minasian, Moore, "Non-abelian tensor-multiplet anomalies", 1998.
I8_TEXT = "(N - 1)*I8_free + (N^3 - N)/24*p2(NW)"
I8_LATEX = r"(N - 1) I_{8 , \mathrm{free}} + \frac{N^{3} - N}{24} p_{2}(\mathrm{NW})"
SCRIPT = "<script>alert(1)</script>"
N3_MINUS_N = ["add", ["pow", ["sym", "N"], 3], ["neg", ["sym", "N"]]]
I8_DISPLAY = "(N - 1)*I8_free + (N^3 - N)/24*p2(NW)"
I8_TREE = ["add", ["mul", ["add", ["sym", "N"], ["neg", ["int", 1]]], ["sym", "I8_free"]],
           ["mul", ["div", N3_MINUS_N, ["int", 24]], ["cls", "p2(NW)"]]]


def a_star(n: int, g: int) -> Fraction:
    """The table's formula, as the format spec's example check states it (from the spec)."""
    return Fraction((g - 1) * (8 * n**3 - 3 * n - 5), 24)


def _frac_tree(q: Fraction) -> list:
    return ["int", q.numerator] if q.denominator == 1 else ["div", ["int", q.numerator], ["int", q.denominator]]


def _frac_text(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def make_report(document: str = "derivations/twisted.md") -> Report:
    """A Report for the renderer tests, without the engine: prose with math and
    value references, steps of every status, a coefficients remainder, a table
    and a plot.  Renderers only display what the engine computed, so the
    values here are data to be shown; where a formula is a known result its
    source is noted above."""
    i8 = ValueRecord("I8", I8_TEXT, [8], I8_TREE)
    kr = ValueRecord("kR", "(N^3 - N)/12", [0], ["div", N3_MINUS_N, ["int", 12]])
    rem = ValueRecord("kR", "1/24*p1(T4)^2", [8],
                      ["mul", ["div", ["int", 1], ["int", 24]], ["pow", ["cls", "p1(T4)"], 2]])
    ns, gs = [2, 3], [2, 3]
    rows = [[["int", n], ["int", g], _frac_tree(a_star(n, g))] for n in ns for g in gs]
    text_rows = [[str(n), str(g), _frac_text(a_star(n, g))] for n in ns for g in gs]
    curve = [(x / 4, float(a_star(4, 3)) * (x / 4)) for x in range(2, 13)]
    items = [
        Prose(
            "# Setup\n\nThe polynomial $I_8$ has degree $x^2$ and value @{I8}.\n\n"
            f"Beware {SCRIPT} in prose.\n\n$$\n\\int_\\Sigma e(TS) = 2 - 2g\n$$\n",
            line=5,
            refs={"I8": i8},
        ),
        Step(1, 10, 1, 10, "symbol N: integer, positive", "symbol", ["N"]),
        Step(2, 11, 1, 11, f"let I8 = {I8_TEXT}", "let", ["I8"],
             checks=[CheckResult("homogeneous of degree 8", "proven")], values=[i8]),
        Step(3, 12, 1, 12, "coefficients I8 of c1(R)*p1(T4) -> kR", "coefficients", ["kR"],
             checks=[CheckResult("coefficients are class-free", "proven")], values=[kr], remainder=rem),
        Step(4, 13, 1, 13, "check kR == (N^3 - N)/12", "check", [],
             checks=[CheckResult("claim holds", "sampled", "equal at 24 random points")]),
        Step(5, 14, 1, 14, f"check kR == N  # {SCRIPT}", "check", [],
             checks=[CheckResult("claim holds", "failed", "at N = 2: left 1/2, right 2")]),
        Step(6, 15, 1, 16, "let! I8 = missing + 1", "let", ["I8"], rebind=True,
             checks=[CheckResult("value exists", "error", "undefined name missing")]),
        Step(7, 17, 1, 17, "table a_star for N = 2..3, g = 2..3", "table", [],
             table=TableData(["N", "g", "a_star"], rows, text_rows)),
        Step(8, 18, 1, 18, "plot a_star over z in 1/2..3 for N = 4, g = 3", "plot", [],
             summary="one curve, 11 points",
             plot=PlotData("z", "1/2", "3", {"N": "4", "g": "3"}, {"a_star": curve})),
        Prose("Finally $a_\\star$ and @{kR}.\n", line=20, refs={"kR": kr}),
    ]
    return Report(
        tool_name="anomark",
        tool_version="0.1.0",
        document=document,
        title="Anomaly of a twisted compactification",
        authors=["A. Writer", "B. Reader"],
        date="2024-05-01",
        abstract="We compute $a$ for @{kR}.",
        conventions={"angular_integral": "2"},
        truncate=12,
        items=items,
        values={"I8": i8, "kR": kr},
    )


# ---------------------------------------------------------------- bundle tables

def bundle_table(truncate: int = 12, **bundles: str):
    """A bundle table over a ring with no symbols, with ``bundles`` declared in
    the order given as ``name="kind [rank]"`` (``NW="real 5"``, ``L="line"``).
    The algebra is imported here, so a moved module breaks only the tests that
    use it."""
    from compiler.algebra.bundles import BundleTable
    from compiler.algebra.graded import Ring

    table = BundleTable(Ring([], truncate))
    for name, spec in bundles.items():
        kind, *rank = spec.split()
        table.declare(name, kind, *map(int, rank))
    return table


def whitney_sum(ranks):
    """Real bundles A0, A1, ... of the given ranks and B split as their sum."""
    names = [f"A{k}" for k in range(len(ranks))]
    t = bundle_table(**{name: f"real {r}" for name, r in zip(names, ranks)}, B=f"real {sum(ranks)}")
    t.split("B", names)
    return t, names


# ---------------------------------------------------------------- TeX

needs_tex = pytest.mark.skipif(not (shutil.which("pdflatex") and shutil.which("pdftotext")),
                               reason="pdflatex or pdftotext is not installed")
TEX_TIMEOUT = 120  # seconds per pdflatex run


def pdflatex(tex: Path) -> Path:
    """Compile in the file's folder (rerun once if LaTeX asks); on failure
    fail with LaTeX's error and the offending source line."""
    for _ in range(2):
        run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", tex.name],
                             cwd=tex.parent, capture_output=True, text=True, errors="replace",
                             timeout=TEX_TIMEOUT)
        log = tex.with_suffix(".log").read_text(encoding="utf-8", errors="replace")
        if run.returncode != 0:
            error = re.search(r"^!.*?(?=^\s*$|^Here is how much)", log, re.S | re.M)
            where = re.search(r"^l\.(\d+)", log, re.M)
            line = ""
            if where:
                number = int(where.group(1))
                source = tex.read_text(encoding="utf-8").splitlines()
                if number <= len(source):  # l.N counts in the file being read, maybe an \input one
                    line = f"\n{tex.name}:{number}: {source[number - 1]}"
            pytest.fail(f"pdflatex failed on {tex.name}:\n{error.group(0) if error else log[-2000:]}{line}")
        if "Rerun to get" not in log:
            break
    pdf = tex.with_suffix(".pdf")
    assert pdf.is_file() and pdf.stat().st_size > 0
    return pdf


def pdf_text(pdf: Path, layout: bool = True) -> str:
    """The PDF's text as pdftotext reads it."""
    run = subprocess.run(["pdftotext", *(["-layout"] if layout else []), pdf.name, "-"], cwd=pdf.parent,
                         capture_output=True, text=True, check=True, timeout=TEX_TIMEOUT)
    return run.stdout


# ---------------------------------------------------------------- the headless browser
# The browser is the distribution's own (CI installs it with apt); selenium is
# pointed at it explicitly so it never fetches a driver or a browser itself.

CHROMIUM = Path("/usr/bin/chromium")
CHROMEDRIVER = Path("/usr/bin/chromedriver")
# Headless, and quiet: no background fetches of its own that could be
# mistaken for (or hide) a request made by the page.
BROWSER_FLAGS = (
    "--headless=new",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-default-apps",
    "--window-size=1280,2000",
)


def missing_browser() -> str | None:
    """Why the browser tests cannot run here, or None when they can."""
    absent = [str(p) for p in (CHROMIUM, CHROMEDRIVER) if shutil.which(str(p)) is None]
    if absent:
        return f"headless browser not installed ({', '.join(absent)} missing; apt install chromium chromium-driver)"
    return None


def start_browser(profile: Path):
    """A fresh headless Chromium with a throwaway profile and performance logging."""
    from selenium import webdriver  # only the browser tests need selenium
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    options.binary_location = str(CHROMIUM)
    for flag in BROWSER_FLAGS:
        options.add_argument(flag)
    options.add_argument(f"--user-data-dir={profile}")
    options.set_capability("goog:loggingPrefs", {"performance": "ALL", "browser": "ALL"})
    return webdriver.Chrome(service=Service(str(CHROMEDRIVER)), options=options)


def build_snippet(tmp_path: Path, capsys, body: str, *extra: str, truncate: int = 8):
    """Build one derive block through the command line: (exit status, stderr, JSON record or None)."""
    doc = tmp_path / "doc.md"
    doc.write_text(f"---\ntitle: t\ntruncate: {truncate}\n---\n\n```derive\n{body}\n```\n",
                   encoding="utf-8")
    status = cli.main(["build", str(doc), "-o", str(tmp_path / "out"), "--format", "json",
                       "--no-cache", "--quiet", *extra])
    err = capsys.readouterr().err
    record = tmp_path / "out" / "doc.json"
    return status, err, json.loads(record.read_text()) if record.exists() else None
