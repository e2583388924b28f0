"""The display form's cost on large class polynomials (not a test).

Run ``python bench/bench_display.py`` from the repository root.  The inputs
are the cubes of ``bench_ring.py``'s angular form E4 with one flavour (44
class monomials: the collected path, a common factor pulled out and every
coefficient factored on FLINT) and with six flavours (2077 monomials, past
``COLLECT_LIMIT``: written term by term, each coefficient as the normal form
splits it), and the small one with ``show ... as expanded`` and
``collected in N``.  Before the display form moved to FLINT (sympy's cancel,
gcd and factor per coefficient) the two display forms took 3.7 s and 12.7 s
on the project's machine.
"""
from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import bench_ring  # noqa: E402

from compiler.presentation import display_tree  # noqa: E402
from compiler.render.printers import LatexPrinter  # noqa: E402


def cube(flavours: int):
    bench_ring.FLAVOURS = flavours
    bench_ring.BASE = ["x1", "x2"] + [f"f{i}" for i in range(1, flavours + 1)]
    bench_ring.SYMBOLS = ["N"] + [f"q{i}" for i in range(1, flavours + 1)]
    return bench_ring.run_ring()[1]


def timed(fn):
    start = time.perf_counter()
    value = fn()
    return time.perf_counter() - start, value


def main():
    for flavours in (1, 6):
        value = cube(flavours)
        n = len(value.fractions())
        symbol = value.ring.symbols[0]
        for label, run in (("display form", lambda: display_tree(value)),
                           ("as expanded", lambda: display_tree(value, "expanded")),
                           ("collected in N", lambda: display_tree(value, "collected", symbol))):
            if flavours == 6 and label != "display form":
                continue  # sympy-bound forms an author asks for on small values
            elapsed, tree = timed(run)
            _, latex = timed(lambda: LatexPrinter().doprint(tree))
            print(f"E4^3, {flavours} flavour(s), {n:5d} monomials, {label:15s}: "
                  f"{elapsed:7.3f} s  ({len(latex)} LaTeX characters)")

if __name__ == "__main__":
    main()
