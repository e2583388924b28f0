"""Whole-process builds of the bundled library: cold, warm, and bare start-up.

Not a test: run ``python bench/bench_process.py`` from the repository root.
Each ``derivations/*.md`` is built in a temporary copy of its folder (with
the documents it may ``use``) by its own ``python -m compiler build FILE -o
OUT`` process (HTML and JSON, as a user runs it): first with an empty cache folder (cold), then again with the
cache that build wrote (warm).  Each time is the minimum over ``--runs``
repetitions (a cold repetition starts from an empty cache again).  The bare
interpreter start-up (``python -c pass``) is timed the same way, so a warm
rebuild can be read against it.  ``--cpu`` times CPU seconds (user +
system) of each process instead of wall seconds.

Then the whole library as one command, ``python -m compiler build *.md -o
OUT`` (as an author builds every appendix of a paper): cold and warm, this
checkout only, against the sum of the per-document cold processes (and,
with ``--before``, of the older checkout's, which takes one document per
command).

``--before DIR`` names another checkout of anomark (say ``git worktree add
/tmp/old <commit>``): every build is then also timed with that code, the two
interleaved run by run so that a busy machine slows both alike, and the
ratios are printed.  The documents are this checkout's.
"""
from __future__ import annotations

import argparse
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from checkouts import command

ROOT = Path(__file__).resolve().parent.parent


class CannotBuild(Exception):
    """The document does not compile with this checkout (exit 2 or 3)."""


#: Wall seconds, or with ``--cpu`` the child's CPU seconds (user + system):
#: on a machine shared with other work the CPU time is the steadier measure.
CPU = False


def _children_cpu() -> float:
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def timed(argv: list[str], cwd: Path, code: Path) -> float:
    """Seconds of one process run with anomark from ``code`` (see ``CPU``)."""
    argv, env = command(code, argv[1:])
    start, cpu = time.perf_counter(), _children_cpu()
    done = subprocess.run(argv, cwd=cwd, env=env, capture_output=True, text=True)
    seconds = _children_cpu() - cpu if CPU else time.perf_counter() - start
    if done.returncode > 1:
        raise CannotBuild(f"{' '.join(argv)} with {code} exited {done.returncode}:\n{done.stderr}")
    return seconds


def build_times(source: Path, folder: Path, codes: list[Path], runs: int) -> list[tuple[float, float]]:
    """(cold, warm) minimum wall seconds of ``anomark build`` on a copy of
    SOURCE, for each checkout in ``codes`` (runs interleaved)."""
    build = [sys.executable, "-m", "compiler", "build", source.name, "-o", "out", "--quiet"]
    cold = [[] for _ in codes]
    warm = [[] for _ in codes]
    for _ in range(runs):
        for i, code in enumerate(codes):
            place = folder / str(i)
            shutil.rmtree(place, ignore_errors=True)
            shutil.copytree(source.parent, place, ignore=shutil.ignore_patterns(".anomark-cache"))
            cold[i].append(timed(build, place, code))
    for _ in range(runs):
        for i, code in enumerate(codes):
            warm[i].append(timed(build, folder / str(i), code))
    return [(min(c), min(w)) for c, w in zip(cold, warm)]


def library_times(sources: list[Path], folder: Path, runs: int) -> tuple[float, float]:
    """(cold, warm) minimum seconds of one ``anomark build`` of every document in SOURCES."""
    build = [sys.executable, "-m", "compiler", "build", *(p.name for p in sources), "-o", "out", "--quiet"]
    cold, warm = [], []
    for _ in range(runs):
        shutil.rmtree(folder, ignore_errors=True)
        shutil.copytree(sources[0].parent, folder, ignore=shutil.ignore_patterns(".anomark-cache"))
        cold.append(timed(build, folder, ROOT))
        warm.append(timed(build, folder, ROOT))
    return min(cold), min(warm)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("documents", nargs="*", type=Path,
                        help="documents to build (default: every derivations/*.md)")
    parser.add_argument("--runs", type=int, default=3, help="repetitions; the minimum is kept")
    parser.add_argument("--before", type=Path, help="another checkout of anomark to compare with")
    parser.add_argument("--cpu", action="store_true", help="CPU seconds of each process instead of wall")
    args = parser.parse_args()
    global CPU
    CPU = args.cpu
    sources = [p.resolve() for p in args.documents] or sorted((ROOT / "derivations").glob("*.md"))
    codes = [ROOT] + ([args.before.resolve()] if args.before else [])
    with tempfile.TemporaryDirectory(prefix="anomark-process-") as tmp:
        start_up = min(timed([sys.executable, "-c", "pass"], Path(tmp), ROOT) for _ in range(args.runs))
        rows = []
        for source in sources:
            try:
                rows.append((source.stem, build_times(source, Path(tmp) / source.stem, codes, args.runs)))
            except CannotBuild as exc:
                print(f"{source.stem}: skipped, {exc}", file=sys.stderr)
        built = [s for s in sources if s.stem in {name for name, _ in rows}]
        one_cold, one_warm = library_times(built, Path(tmp) / "library", args.runs)
    width = max(len(name) for name, _ in rows)
    before = " before cold  before warm  cold ratio  warm ratio" if args.before else ""
    print(f"{'document':<{width}}  {'cold s':>8}  {'warm s':>8}{before}")
    totals = [[0.0, 0.0] for _ in codes]
    for name, times in rows:
        line = f"{name:<{width}}  {times[0][0]:8.3f}  {times[0][1]:8.3f}"
        if args.before:
            (cold, warm), (old_cold, old_warm) = times
            line += f"  {old_cold:11.3f}  {old_warm:11.3f}  {old_cold / cold:9.1f}x  {old_warm / warm:9.1f}x"
        print(line)
        for total, (cold, warm) in zip(totals, times):
            total[0] += cold
            total[1] += warm
    line = f"{'total':<{width}}  {totals[0][0]:8.3f}  {totals[0][1]:8.3f}"
    if args.before:
        (cold, warm), (old_cold, old_warm) = totals
        line += f"  {old_cold:11.3f}  {old_warm:11.3f}  {old_cold / cold:9.1f}x  {old_warm / warm:9.1f}x"
    print(line)
    cold, warm = totals[0]
    print(f"\nbare interpreter start-up: {start_up:.3f} s")
    print(f"warm rebuild / start-up (mean per document): {warm / len(rows) / start_up:.1f}x")
    print(f"cold / warm: {cold / warm:.1f}x")
    print(f"\nthe {len(built)} documents in one command: cold {one_cold:.3f} s, warm {one_warm:.3f} s")
    print(f"  cold against one process per document: {cold / one_cold:.1f}x")
    if args.before:
        print(f"  cold against the --before checkout, one process per document: "
              f"{totals[1][0] / one_cold:.1f}x   (target: >= 4x)")


if __name__ == "__main__":
    main()
