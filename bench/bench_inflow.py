"""The wide inflow cube as a document, against the same computation in plain sympy.

Not a test: run ``python bench/bench_inflow.py`` from the repository root.
The document: the S^4 sphere bundle of a real rank-5 bundle NW split into two
oriented planes L1, L2 and a trivial line, K flavour line bundles F1..FK with
symbolic charges q1..qK, and the angular form with flavour terms

    E4 = e4/2 + sum_i (q_i c1(L1) + (N - q_i) c1(L2)) c1(F_i)
              + sum_{i<=j} q_i q_j/(i+j) c1(F_i) c1(F_j) + N/4 (c1(L1)^2 + c1(L2)^2),

cubed and integrated over the sphere.  Plain sympy does the same with
expressions: expand E4^3, then integrate term by term by the power of e4
(the sphere relations give e4^(2s+1) -> 2 p2(NW)^s = 2 (x1 x2)^(2s), even
powers -> 0).  Both results are checked equal before any time is printed.

Three measurements, one run:
1. K = 6, whole process: ``python -m compiler build DOC -o OUT --no-cache``
   (HTML and JSON written, minimum of ``--runs``), against plain sympy in
   this process (expansion and integration only, no printing; minimum of
   ``--sympy-runs``).  Target: the build at least 15x faster.  With
   ``--before DIR`` (another checkout) its build is timed too, interleaved.
2. The flavour family K = 1..10 in process (``compiler.engine.build`` plus
   the HTML and JSON renderers, as the command line does): time against the
   number of terms of the result, with the exponent of a least-squares fit
   of log CPU time on log terms.  Target: exponent at most 1.  Times are
   printed as wall and CPU seconds; on a machine shared with other work the
   CPU seconds are the steadier measure.  A K whose cube passes the ring's
   term limit (``element.MAX_TERMS``, 20 000 terms over classes and symbols:
   K = 9 and 10 today) is refused by the build, shown as such and left out
   of the fit.
"""
from __future__ import annotations

import argparse
import math
import resource
import subprocess
import sys
import tempfile
import time
from fractions import Fraction
from pathlib import Path

import sympy

from checkouts import command
from compiler.engine import BuildOptions, parse
from compiler.engine.run import Run
from compiler.render.html import to_html
from compiler.render.json import to_json

ROOT = Path(__file__).resolve().parent.parent


def document(k: int) -> str:
    """The inflow document with K flavour line bundles."""
    flavours = [f"F{i}" for i in range(1, k + 1)]
    charges = [f"q{i}" for i in range(1, k + 1)]
    terms = ["e4/2"]
    for i in range(k):
        terms.append(f"({charges[i]}*c1(L1) + (N - {charges[i]})*c1(L2))*c1({flavours[i]})")
        for j in range(i, k):
            terms.append(f"{charges[i]}*{charges[j]}/{i + j + 2}*c1({flavours[i]})*c1({flavours[j]})")
    terms.append("N/4*(c1(L1)^2 + c1(L2)^2)")
    angular = " \\\n    + ".join(terms)
    return f"""---
title: Wide inflow cube with {k} flavour fields
---

# Inflow with flavour

```derive
symbol N: integer, positive
symbol {", ".join(charges)}: integer
bundle NW: real, rank 5
bundle L1, L2: line
bundle {", ".join(flavours)}: line
split NW = L1 + L2 + trivial(1)
fiber S4: sphere of NW, angular e4
let E4 = {angular}
integrate E4^3 over S4 -> I8
```
"""


def plain_sympy(k: int) -> sympy.Expr:
    """The same integral with sympy expressions: expand, then read the power of
    e4 in each term (linear in the terms; ``sympy.collect`` takes minutes here)."""
    e4, x1, x2, N = sympy.symbols("e4 x1 x2 N")
    f = sympy.symbols(" ".join(f"f{i}" for i in range(1, k + 2)))[:k]
    q = sympy.symbols(" ".join(f"q{i}" for i in range(1, k + 2)))[:k]
    form = e4 / 2 + N / 4 * (x1 ** 2 + x2 ** 2)
    for i in range(k):
        form += (q[i] * x1 + (N - q[i]) * x2) * f[i]
        for j in range(i, k):
            form += q[i] * q[j] / (i + j + 2) * f[i] * f[j]
    cube = sympy.expand(form ** 3)
    p2 = x1 ** 2 * x2 ** 2
    integrated = []
    for term in sympy.Add.make_args(cube):   # term = c * e4^m
        c, m = term.as_coeff_exponent(e4)
        if m % 2 == 1:
            integrated.append(2 * p2 ** ((m - 1) // 2) * c)
    return sympy.expand(sympy.Add(*integrated))


def in_process(k: int, folder: Path):
    """One in-process build of the K document with the command line's renderers
    ((wall, CPU) seconds) and the ring value bound to I8."""
    path = folder / f"inflow-{k}.md"
    text = document(k)
    path.write_text(text, encoding="utf-8")
    start, cpu = time.perf_counter(), time.process_time()
    document_, by_block = parse(str(path), text)
    statements = [s for i in sorted(by_block) for s in by_block[i]]
    run = Run(str(path), document_, statements, BuildOptions(use_cache=False))
    report = run.execute(by_block)
    to_html(report)
    to_json(report)
    seconds = (time.perf_counter() - start, time.process_time() - cpu)
    if not report.passed:
        raise Refused("; ".join(c.detail for s in report.steps for c in s.checks
                                if c.status in ("failed", "error")))
    return seconds, run.scope.bindings["I8"].value


class Refused(Exception):
    """The build did not pass (a K beyond the ring's term limit, say)."""


def as_plain(value, k: int) -> sympy.Expr:
    """A ring value as a sympy expression in the plain side's names (the
    document's symbols carry assumptions, the plain ones none)."""
    rename = {"c1(L1)": "x1", "c1(L2)": "x2", **{f"c1(F{i})": f"f{i}" for i in range(1, k + 1)}}
    plain = lambda c: c.xreplace({s: sympy.Symbol(s.name) for s in c.free_symbols})
    return sympy.expand(sum(plain(c) * sympy.Mul(*[sympy.Symbol(rename[key]) ** e for key, e in pairs])
                            for pairs, c in value.terms()))


def term_count(value) -> int:
    """Terms over classes and symbols together."""
    return sum(len(sympy.Add.make_args(sympy.expand(c))) for _, c in value.terms())


def _children_cpu() -> float:
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def whole_process(k: int, folder: Path, codes: list[Path], runs: int) -> list[tuple[float, float]]:
    """Minimum (wall, CPU) seconds of the K document's command-line build, for
    each checkout in ``codes`` (runs interleaved, so a busy machine slows all alike)."""
    path = folder / f"inflow-{k}.md"
    path.write_text(document(k), encoding="utf-8")
    args = ["-m", "compiler", "build", path.name, "-o", "out", "--no-cache", "--quiet"]
    best = [(math.inf, math.inf)] * len(codes)
    for _ in range(runs):
        for i, code in enumerate(codes):
            argv, env = command(code, args)
            start, cpu = time.perf_counter(), _children_cpu()
            done = subprocess.run(argv, cwd=folder, env=env, capture_output=True, text=True)
            now = (time.perf_counter() - start, _children_cpu() - cpu)
            best[i] = tuple(min(b, t) for b, t in zip(best[i], now))
            if done.returncode != 0:
                raise SystemExit(f"build of inflow-{k} with {code} exited {done.returncode}:\n{done.stderr}")
    return best


def fitted_exponent(points: list[tuple[float, float]]) -> float:
    """Slope of the least-squares line through (log x, log y)."""
    xs, ys = [math.log(x) for x, _ in points], [math.log(y) for _, y in points]
    mx, my = sum(xs) / len(xs), sum(ys) / len(ys)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / sum((x - mx) ** 2 for x in xs)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--runs", type=int, default=3, help="whole-process builds; the minimum is kept")
    parser.add_argument("--sympy-runs", type=int, default=1, help="plain sympy runs; the minimum is kept")
    parser.add_argument("--family", type=int, default=10, help="largest K of the flavour family")
    parser.add_argument("--before", type=Path,
                        help="another checkout of anomark: its whole-process build is timed too")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="anomark-inflow-") as tmp:
        folder = Path(tmp)
        _, value = in_process(6, folder)
        theirs, plain = (math.inf, math.inf), None
        for _ in range(args.sympy_runs):
            start, cpu = time.perf_counter(), time.process_time()
            plain = plain_sympy(6)
            now = (time.perf_counter() - start, time.process_time() - cpu)
            theirs = tuple(min(b, t) for b, t in zip(theirs, now))
        assert sympy.expand(as_plain(value, 6) - plain) == 0, "anomark and sympy disagree"
        codes = [ROOT] + ([args.before.resolve()] if args.before else [])
        ours, *before = whole_process(6, folder, codes, args.runs)
        print(f"wide inflow cube, 6 flavours: {len(sympy.Add.make_args(plain))} terms, same value both ways")
        print(f"{'':30}  {'wall s':>8}  {'CPU s':>8}")
        print(f"{'anomark build, whole process':30}  {ours[0]:8.3f}  {ours[1]:8.3f}")
        for old in before:
            print(f"{'the same, --before checkout':30}  {old[0]:8.3f}  {old[1]:8.3f}")
        print(f"{'plain sympy, in process':30}  {theirs[0]:8.3f}  {theirs[1]:8.3f}")
        print(f"{'sympy / anomark':30}  {theirs[0] / ours[0]:7.1f}x  {theirs[1] / ours[1]:7.1f}x"
              f"   (target: >= 15x)")
        for old in before:
            print(f"{'sympy / --before checkout':30}  {theirs[0] / old[0]:7.1f}x  {theirs[1] / old[1]:7.1f}x")

        print("\nflavour family, in process (build + HTML + JSON):")
        print(f"{'K':>3}  {'terms':>7}  {'wall s':>8}  {'CPU s':>8}")
        points = []
        for k in range(1, args.family + 1):
            try:
                (wall, cpu), value = in_process(k, folder)
            except Refused as exc:
                print(f"{k:>3}  refused: {exc}")
                continue
            terms = term_count(value)
            points.append((terms, cpu))
            print(f"{k:>3}  {terms:>7}  {wall:8.3f}  {cpu:8.3f}")
        print(f"fitted exponent of CPU time against terms: {fitted_exponent(points):.2f}   (target: <= 1)")


if __name__ == "__main__":
    main()
