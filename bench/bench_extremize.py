"""Extremization: anomark against plain sympy on the same functions.

Two parts, both run from the repository root:

1. Whole-process builds (``python -m compiler build --no-cache``, JSON
   only) of the bench cases in bench/cases/ and of the bundled documents with
   a-maximizations: wall time, peak memory and exit status.
2. In-process, on the weighted trial functions of the bench cases:
   ``compiler.algebra.extremize.extremize`` against plain sympy
   (``solve`` of the gradient, then ``simplify`` of the Hessian's leading
   minors and of the function at each solution).  Plain sympy runs in a
   child process stopped after ``--limit`` seconds, since it can take
   minutes and gigabytes.

Not a test: nothing here asserts a time.
"""
from __future__ import annotations

import argparse
import multiprocessing
import resource
import os
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

import sympy

ROOT = Path(__file__).resolve().parent.parent
DOCUMENTS = [ROOT / "bench" / "cases" / "weighted-two-variable.md",
             ROOT / "bench" / "cases" / "weighted-three-variable.md",
             ROOT / "derivations" / "free-chirals.md",
             ROOT / "derivations" / "twisted-compactification.md"]


def weighted(count: int):
    """The bench cases' trial a: multiplicities N, N + 1, ..., R-charges
    r1, ..., r_count, the last charge fixed by the sum being 2."""
    N = sympy.Symbol("N", integer=True, positive=True)
    rs = sympy.symbols(f"r1:{count + 1}", real=True)

    def term(n, r):
        return n * (3 * (r - 1) ** 3 - (r - 1))
    a = sympy.Rational(3, 32) * (sum(term(N + i, r) for i, r in enumerate(rs))
                                 + term(N + count, 2 - sum(rs)))
    return N, list(rs), a


def build_once(path: Path, limit: float) -> tuple[float, int, int | str]:
    """Wall time, peak memory (MB) and exit status of one whole-process build."""
    with tempfile.TemporaryDirectory() as out:
        start = time.perf_counter()
        proc = subprocess.Popen([sys.executable, "-m", "compiler", "build", str(path), "-o", out,
                                 "--format", "json", "--no-cache", "--quiet"],
                                cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        timer = threading.Timer(limit, proc.kill)
        timer.start()
        _, code, usage = os.wait4(proc.pid, 0)
        timer.cancel()
        proc.returncode = os.waitstatus_to_exitcode(code)
        wall = time.perf_counter() - start
    status: int | str = proc.returncode if proc.returncode >= 0 else "killed at the limit"
    return wall, usage.ru_maxrss // 1024, status


def ours(count: int) -> tuple[float, str]:
    from compiler.algebra.extremize import ExtremizeError, extremize
    from compiler.algebra.sampling import SymbolSpec
    N, rs, a = weighted(count)
    spec = SymbolSpec.declare("N", ["integer"], [(">=", 2)])
    a = a.xreplace({N: spec.symbol})
    start = time.perf_counter()
    try:
        result = extremize("maximize", a, [(r, None) for r in rs], [spec], "bench", name="a")
        what = f"{result.settled}: {', '.join(sympy.sstr(c) for c in result.point)}"
    except ExtremizeError as exc:
        what = f"{exc.status}: {str(exc)[:70]}..."
    return time.perf_counter() - start, what


def _plain(count: int, queue) -> None:
    N, rs, a = weighted(count)
    start = time.perf_counter()
    gradient = [sympy.diff(a, r) for r in rs]
    solutions = sympy.solve(gradient, rs, dict=True)
    hessian = sympy.hessian(a, rs)
    for sol in solutions:
        for k in range(1, count + 1):
            sympy.simplify(hessian[:k, :k].det().xreplace(sol))
        sympy.simplify(a.xreplace(sol))
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss // 1024
    queue.put((time.perf_counter() - start, peak, len(solutions)))


def plain(count: int, limit: float) -> str:
    queue = multiprocessing.Queue()
    child = multiprocessing.Process(target=_plain, args=(count, queue))
    child.start()
    child.join(limit)
    if child.is_alive():
        child.terminate()
        child.join()
        return f"did not finish in {limit:.0f} s"
    if queue.empty():
        return f"stopped (exit {child.exitcode})"
    wall, peak, found = queue.get()
    return f"{wall:7.2f} s, {peak} MB, {found} solutions, none chosen"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--limit", type=float, default=120, help="seconds for each plain sympy run")
    parser.add_argument("--skip-builds", action="store_true", help="only the in-process part")
    args = parser.parse_args()
    if not args.skip_builds:
        print("whole-process builds (--no-cache, json)")
        for path in DOCUMENTS:
            wall, peak, status = build_once(path, 600)
            print(f"  {path.stem:28s} {wall:7.2f} s  {peak:5d} MB  exit {status}")
    print("\nin process: maximize the weighted trial a")
    for count in (2, 3):
        wall, what = ours(count)
        print(f"  {count} variables  anomark : {wall:7.2f} s  {what}")
        print(f"  {count} variables  sympy   : {plain(count, args.limit)}")


if __name__ == "__main__":
    main()
