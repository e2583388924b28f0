"""Time the bundled library's builds: cold, warm, and after a one-line edit.

Not a test: run ``python bench/bench_build.py`` from the repository root.
Every ``derivations/*.md`` is built in a temporary copy of its folder (with
the documents it may ``use``), so the build
cache written there (``.anomark-cache/`` beside each copy) never touches the
repository's.  For each document, in one process:

cold      an empty cache folder: every step is computed;
warm      the same text again: every cacheable step should be restored;
append    one harmless ``check`` added at the end: one step is new;
let       the first ``let NAME = EXPR`` rewritten as ``let NAME = 1*(EXPR)``:
          the value is unchanged, but every step reading NAME, directly or
          through later values, has a new key and is recomputed.

Both edits start from the cache of the warm build.  Last, the heaviest step
kind (a-maximization) is timed against plain sympy on the same function.  sympy's own in-memory
cache is cleared before every build, so a warm build is fast because of
anomark's cache and not because sympy remembers the cold one.
"""
from __future__ import annotations

import argparse
import re
import shutil
import tempfile
import time
from collections import Counter, defaultdict
from pathlib import Path

import sympy
from sympy.core.cache import clear_cache

from compiler.algebra.extremize import extremize
from compiler.engine.cache import CACHE_DIR
from compiler.engine import BuildOptions, build, parse
from compiler.engine.handlers import CACHED
from compiler.engine.run import Run
from compiler.errors import DocumentError
from compiler.expressions import as_expr
from compiler.statements import expr_nodes as en, nodes as n

ROOT = Path(__file__).resolve().parent.parent
PHASES = ("cold", "warm", "append", "let")
_LET = re.compile(r"^(let\s+[A-Za-z][A-Za-z0-9_]*\s*=\s*)(.+?)\s*$")


def fence_spans(lines: list[str]) -> list[tuple[int, int]]:
    """(first, last) line indexes of the statements of each ``derive`` block."""
    spans, start = [], None
    for i, line in enumerate(lines):
        stripped = line.strip()
        if start is None and stripped.startswith("```") and stripped[3:].strip().split()[:1] == ["derive"]:
            start = i + 1
        elif start is not None and stripped.startswith("```"):
            spans.append((start, i - 1))
            start = None
    return spans


def append_check(text: str) -> str:
    """One new statement at the end of the last block; nothing else changes."""
    lines = text.split("\n")
    _, last = fence_spans(lines)[-1]
    return "\n".join(lines[:last + 1] + ["check 2 + 2 == 4"] + lines[last + 1:])


def scale_first_let(text: str) -> str | None:
    """The first one-line ``let`` with its right side wrapped in ``1*(...)``
    (None when the document has no such line)."""
    lines = text.split("\n")
    for first, last in fence_spans(lines):
        for i in range(first, last + 1):
            match = _LET.match(lines[i])
            body = match and match.group(2).split("#")[0].rstrip()
            if body and not body.endswith("\\") and body.count("(") == body.count(")"):
                lines[i] = f"{match.group(1)}1*({body})"
                return "\n".join(lines)
    return None


def measure(path: Path, text: str):
    """One in-process build (the engine only, no rendering) from a cold sympy
    cache: wall seconds, step counts, whether it passed, and the report."""
    path.write_text(text, encoding="utf-8")
    clear_cache()
    start = time.perf_counter()
    report = build(str(path), text, BuildOptions(use_cache=True))
    seconds = time.perf_counter() - start
    return (seconds, tally(path, text, report), report.passed), report


def tally(path: Path, text: str, report) -> Counter:
    """Steps recomputed, restored from the cache, and declarations (not
    cacheable: they set up the ring, so they always run)."""
    _, by_block = parse(str(path), text)
    statements = [s for i in sorted(by_block) for s in by_block[i]]
    assert len(statements) == len(report.steps)
    counts = Counter()
    for statement, step in zip(statements, report.steps):
        counts["restored" if step.cached else "recomputed" if type(statement) in CACHED else "declared"] += 1
    return counts


def bench_document(source: Path, folder: Path, kinds: dict) -> dict | None:
    path = folder / source.name
    text = source.read_text(encoding="utf-8")
    cache_file = folder / CACHE_DIR / f"{source.name}.json"
    results = {}
    try:
        results["cold"], report = measure(path, text)
    except DocumentError as err:
        print(f"{source.stem}: cannot be compiled, skipped ({err.problems[0]})")
        return None
    for step in report.steps:
        kinds[step.kind][0] += step.seconds
        kinds[step.kind][1] += 1
    results["warm"], _ = measure(path, text)
    warm_cache = cache_file.read_bytes()
    for phase, edit in (("append", append_check), ("let", scale_first_let)):
        edited = edit(text)
        if edited is not None:
            cache_file.write_bytes(warm_cache)
            results[phase], _ = measure(path, edited)
    return results


def edited_line(text: str) -> str:
    """Which statement the ``let`` phase rewrote, for the printout."""
    new = scale_first_let(text)
    if new is None:
        return "(no one-line let)"
    for number, (old, line) in enumerate(zip(text.split("\n"), new.split("\n")), start=1):
        if old != line:
            return f"line {number}: {line.strip()}"
    raise AssertionError("scale_first_let changed nothing")


def maximize_side_by_side(source: Path) -> None:
    """The document's first one-variable ``maximize``: anomark's extremizer
    against plain sympy (solve f' = 0, simplify f'' and f at every root)."""
    text = source.read_text(encoding="utf-8")
    document, by_block = parse(str(source), text)
    statements = [s for i in sorted(by_block) for s in by_block[i]]
    target = next((s for s in statements if isinstance(s, n.Extremize) and s.mode == "maximize"
                   and isinstance(s.target, en.Name) and len(s.variables) == 1), None)
    if target is None:
        return
    run = Run(str(source), document, statements, BuildOptions(use_cache=False))
    run.execute(by_block)
    f = as_expr(run.scope.bindings[target.target.id].value)
    v = run.scope.specs[str(target.variables[0].name)].symbol

    clear_cache()
    start = time.perf_counter()
    result = extremize("maximize", f, [(v, None)], list(run.scope.specs.values()), "bench")
    ours = time.perf_counter() - start
    clear_cache()
    start = time.perf_counter()
    roots = sympy.solve(sympy.diff(f, v), v)
    second = sympy.diff(f, v, 2)
    plain = [(sympy.simplify(second.subs(v, r)), sympy.simplify(f.subs(v, r))) for r in roots]
    theirs = time.perf_counter() - start
    print(f"\n{source.stem}, line {target.line}: {target.source}")
    print(f"  anomark maximize : {ours:7.3f} s  one maximum chosen ({result.settled}), "
          f"value of {sympy.count_ops(result.value)} operations")
    print(f"  plain sympy      : {theirs:7.3f} s  {len(roots)} critical points, none chosen "
          f"(sign of f'' left open), values of {', '.join(str(sympy.count_ops(p[1])) for p in plain)} operations")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("documents", nargs="*", type=Path,
                        help="documents to time (default: every derivations/*.md)")
    args = parser.parse_args()
    sources = args.documents or sorted((ROOT / "derivations").glob("*.md"))

    kinds: dict[str, list] = defaultdict(lambda: [0.0, 0])
    rows = []
    with tempfile.TemporaryDirectory(prefix="anomark-bench-") as tmp:
        for source in sources:
            folder = Path(tmp) / source.stem  # the document's folder, with what it may use
            shutil.copytree(source.parent, folder, ignore=shutil.ignore_patterns(".anomark-cache"))
            results = bench_document(source, folder, kinds)
            if results:
                rows.append((source.stem, results, edited_line(source.read_text(encoding="utf-8"))))
            shutil.rmtree(folder)

    width = max((len(name) for name, _, _ in rows), default=8)
    print(f"{'document':<{width}}  " + "  ".join(f"{p:>22}" for p in PHASES))
    print(f"{'':<{width}}  " + "  ".join(f"{'s  (new/cached/decl)':>22}" for _ in PHASES))
    totals = {p: [0.0, Counter()] for p in PHASES}
    for name, results, _ in rows:
        cells = []
        for phase in PHASES:
            if phase not in results:
                cells.append(f"{'-':>22}")
                continue
            seconds, counts, passed = results[phase]
            totals[phase][0] += seconds
            totals[phase][1] += counts
            mark = "" if passed else "!"
            cells.append(f"{seconds:7.3f}{mark:1} ({counts['recomputed']:>3}/{counts['restored']:>3}/"
                         f"{counts['declared']:>2})")
        print(f"{name:<{width}}  " + "  ".join(f"{c:>22}" for c in cells))
    cells = [f"{t:7.3f}  ({c['recomputed']:>3}/{c['restored']:>3}/{c['declared']:>2})"
             for t, c in totals.values()]
    print(f"{'total':<{width}}  " + "  ".join(f"{c:>22}" for c in cells))
    if totals["warm"][0]:
        print(f"\ncold / warm: {totals['cold'][0] / totals['warm'][0]:.1f}x"
              f"   ('!' marks a build whose checks did not all pass)")

    print("\nthe 'let' edit:")
    for name, _, line in rows:
        print(f"  {name:<{width}}  {line}")

    print("\ncold build time by step kind (whole library):")
    whole = sum(s for s, _ in kinds.values()) or 1.0
    for kind, (seconds, count) in sorted(kinds.items(), key=lambda kv: -kv[1][0]):
        print(f"  {kind:<14} {seconds:8.3f} s  {100 * seconds / whole:5.1f}%  over {count:>3} steps")

    heaviest = max(rows, key=lambda row: row[1]["cold"][0], default=None)
    if heaviest is not None:
        maximize_side_by_side(next(s for s in sources if s.stem == heaviest[0]))


if __name__ == "__main__":
    main()
