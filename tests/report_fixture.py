"""A hand-built Report for the renderer tests: prose with math and value
references, steps of every status, a coefficients remainder, a table and a
plot.  Renderers only display what the engine computed, so the values here
are data to be shown; where a formula is a known result its source is noted.
"""
from __future__ import annotations

from fractions import Fraction

from compiler.results import (
    CheckResult,
    PlotData,
    Prose,
    Report,
    Step,
    TableData,
    ValueRecord,
)

# M5-brane anomaly polynomial: I8 = (N-1) I8(1) + (N^3-N)/24 p2(N).
# Source: Harvey, Minasian, Moore, "Non-abelian tensor-multiplet anomalies", 1998.
I8_TEXT = "(N - 1)*I8_free + (N^3 - N)/24*p2(NW)"
I8_LATEX = r"\left(N - 1\right) I_{8,\mathrm{free}} + \frac{N^{3} - N}{24} p_{2}(\mathrm{NW})"
SCRIPT = "<script>alert(1)</script>"
N3_MINUS_N = ["add", ["pow", ["sym", "N"], 3], ["neg", ["sym", "N"]]]
I8_DISPLAY = "(N - 1)*I8_free + (N^3 - N)/24*p2(NW)"
I8_TREE = ["add", ["mul", ["add", ["sym", "N"], ["neg", ["int", 1]]], ["sym", "I8_free"]],
           ["mul", ["div", N3_MINUS_N, ["int", 24]], ["cls", "p2(NW)"]]]


def a_star(n: int, g: int) -> Fraction:
    """The table's formula, as the format spec's example check states it (from the spec)."""
    return Fraction((g - 1) * (8 * n**3 - 3 * n - 5), 24)


def _frac_latex(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else rf"\frac{{{q.numerator}}}{{{q.denominator}}}"


def _frac_text(q: Fraction) -> str:
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def make_report(document: str = "derivations/twisted.md") -> Report:
    i8 = ValueRecord("I8", I8_TEXT, I8_LATEX, [8], I8_TREE)
    kr = ValueRecord("kR", "(N^3 - N)/12", r"\frac{N^{3} - N}{12}", [0], ["div", N3_MINUS_N, ["int", 12]])
    rem = ValueRecord("kR", "1/24*p1(T4)^2", r"\frac{1}{24} p_{1}(T4)^{2}", [8],
                      ["mul", ["div", ["int", 1], ["int", 24]], ["pow", ["cls", "p1(T4)"], 2]])
    ns, gs = [2, 3], [2, 3]
    rows = [[str(n), str(g), _frac_latex(a_star(n, g))] for n in ns for g in gs]
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
             table=TableData(["N", "g", r"a_{\star}"], rows, text_rows, ["N", "g", "a_star"])),
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
