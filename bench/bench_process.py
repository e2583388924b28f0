"""Whole-process builds of the bundled library: cold, warm, and bare start-up.

Not a test: run ``python bench/bench_process.py`` from the repository root.
Each ``derivations/*.md`` is copied to a temporary folder and built by its
own ``python -m compiler build FILE -o OUT`` process (HTML and JSON, as a
user runs it): first with an empty cache folder (cold), then again with the
cache that build wrote (warm).  Each time is the minimum over ``--runs``
repetitions (a cold repetition starts from an empty cache again).  The bare
interpreter start-up (``python -c pass``) is timed the same way, so a warm
rebuild can be read against it.
"""
from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def timed(argv: list[str], cwd: Path) -> float:
    """Wall seconds of one process; it must not fail to compile (exit 2 or 3)."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("PYTHONDONTWRITEBYTECODE", None)   # as installed: compiled modules are kept
    start = time.perf_counter()
    done = subprocess.run(argv, cwd=cwd, env=env, capture_output=True, text=True)
    seconds = time.perf_counter() - start
    if done.returncode > 1:
        raise SystemExit(f"{' '.join(argv)} exited {done.returncode}:\n{done.stderr}")
    return seconds


def build_times(source: Path, folder: Path, runs: int) -> tuple[float, float]:
    """(cold, warm) minimum wall seconds of ``anomark build`` on a copy of SOURCE."""
    build = [sys.executable, "-m", "compiler", "build", source.name, "-o", "out", "--quiet"]
    cold = []
    for _ in range(runs):
        shutil.rmtree(folder, ignore_errors=True)
        folder.mkdir(parents=True)
        shutil.copy(source, folder / source.name)
        cold.append(timed(build, folder))
    warm = [timed(build, folder) for _ in range(runs)]
    return min(cold), min(warm)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("documents", nargs="*", type=Path,
                        help="documents to build (default: every derivations/*.md)")
    parser.add_argument("--runs", type=int, default=3, help="repetitions; the minimum is kept")
    args = parser.parse_args()
    sources = [p.resolve() for p in args.documents] or sorted((ROOT / "derivations").glob("*.md"))
    with tempfile.TemporaryDirectory(prefix="anomark-process-") as tmp:
        start_up = min(timed([sys.executable, "-c", "pass"], Path(tmp)) for _ in range(args.runs))
        rows = [(s.stem, *build_times(s, Path(tmp) / s.stem, args.runs)) for s in sources]
    width = max(len(name) for name, _, _ in rows)
    print(f"{'document':<{width}}  {'cold s':>8}  {'warm s':>8}")
    for name, cold, warm in rows:
        print(f"{name:<{width}}  {cold:8.3f}  {warm:8.3f}")
    cold_total, warm_total = sum(r[1] for r in rows), sum(r[2] for r in rows)
    print(f"{'total':<{width}}  {cold_total:8.3f}  {warm_total:8.3f}")
    print(f"\nbare interpreter start-up: {start_up:.3f} s")
    print(f"warm rebuild / start-up (mean per document): {warm_total / len(rows) / start_up:.1f}x")
    print(f"cold / warm: {cold_total / warm_total:.1f}x")


if __name__ == "__main__":
    main()
