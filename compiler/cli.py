"""The ``anomark`` command: build, check, diff.

This is the only place that talks to the terminal.  It reaches the rest of
the program through the engine (a Report out) and the renderers (text out),
turns document problems into ``FILE:LINE:COL: message`` lines and exit
status 2, and keeps Python tracebacks for anomark's own bugs (``--debug``).
"""
from __future__ import annotations

import argparse
import os
import re
import sys
import tempfile
import time
import traceback
from fractions import Fraction
from pathlib import Path

from . import __version__
from .diff import diff_records, diff_to_json, format_diff, load_record
from .engine import BuildOptions, build
from .errors import DocumentError, Location
from .render.html import to_html
from .render.json import to_json
from .render.tex import STYLES, plot_files, to_tex

FORMATS = ("html", "json", "tex")
_RATIONAL = re.compile(r"[+-]?\d+(/\d+)?")
EXIT_INTERNAL = 3


def rational(text: str) -> Fraction:
    """A --set value: an exact integer or fraction, never a decimal."""
    text = text.strip()
    if not _RATIONAL.fullmatch(text):
        raise ValueError(f"'{text}' is not an exact rational (write 1/2, not 0.5)")
    return Fraction(text)


def parser() -> argparse.ArgumentParser:
    top = argparse.ArgumentParser(prog="anomark", description="Checked derivations of anomalies.")
    top.add_argument("--version", action="version", version=f"anomark {__version__}")
    sub = top.add_subparsers(dest="command", required=True)

    def common(p):
        p.add_argument("--set", action="append", default=[], metavar="NAME=VALUE",
                       help="override a declared convention with an exact rational")
        p.add_argument("--allow-html", action="store_true", help="pass raw HTML in prose through")
        p.add_argument("--no-cache", action="store_true", help="recompute every step")
        p.add_argument("--quiet", action="store_true", help="no progress lines")
        p.add_argument("--time-limit", type=float, default=120.0, metavar="SECONDS",
                       help="longest a single step may run (default 120)")
        p.add_argument("--debug", action="store_true", help="show tracebacks of internal errors")

    b = sub.add_parser("build", help="compile a document into reports")
    b.add_argument("file")
    b.add_argument("-o", "--output", metavar="DIR", help="output folder (default: the document's)")
    b.add_argument("--format", default="html,json", help="comma-separated: html,json,tex")
    b.add_argument("--standalone", action="store_true", help="LaTeX as a full article")
    b.add_argument("--tex-style", choices=STYLES, default="appendix",
                   help="appendix: results and claims for a paper; audit: every statement and check")
    common(b)

    c = sub.add_parser("check", help="compile without writing files; exit status only")
    c.add_argument("files", nargs="+")
    common(c)

    d = sub.add_parser("diff", help="what changed between two JSON records")
    d.add_argument("old")
    d.add_argument("new")
    d.add_argument("--json", action="store_true", help="machine-readable output")
    d.add_argument("--debug", action="store_true")
    return top


def main(argv=None) -> int:
    args = parser().parse_args(argv)
    try:
        return COMMANDS[args.command](args)
    except DocumentError as err:
        for problem in err.problems:
            print(problem, file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("anomark: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # an anomark bug: say so, plainly
        if getattr(args, "debug", False):
            traceback.print_exc()
        print(f"anomark: internal error (a bug in anomark, not in your document): "
              f"{type(exc).__name__}: {exc}" + ("" if getattr(args, "debug", False)
                                                else "; rerun with --debug for details"),
              file=sys.stderr)
        return EXIT_INTERNAL


def options(args, path: str) -> BuildOptions:
    overrides = {}
    for item in args.set:
        name, sep, value = item.partition("=")
        if not sep or not name.strip():
            raise DocumentError(Location(path, 1, 1), f"--set {item}: write NAME=VALUE")
        try:
            overrides[name.strip()] = rational(value)
        except ValueError as exc:
            raise DocumentError(Location(path, 1, 1), f"--set {name.strip()}: {exc}") from None
    return BuildOptions(overrides=overrides, allow_html=args.allow_html,
                        use_cache=not args.no_cache, time_limit=args.time_limit,
                        progress=progress_printer(args))


def progress_printer(args):
    """A live line per step on a terminal, once a build has run a second."""
    if args.quiet or not sys.stderr.isatty():
        return None
    start = time.perf_counter()

    def show(step):
        if time.perf_counter() - start < 1.0:
            return
        name = ", ".join(step.outputs) or step.kind
        sys.stderr.write(f"\r\x1b[K  line {step.line:>4}  {step.kind:<12} {name[:30]:<30} "
                         f"{step.status:<8} {step.seconds:6.2f} s")
        sys.stderr.flush()
    show.finish = lambda: (time.perf_counter() - start >= 1.0) and sys.stderr.write("\r\x1b[K")
    return show


def compile_file(args, path: str):
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise DocumentError(Location(path, 1, 1), f"cannot read the document: {exc}") from None
    opts = options(args, path)
    try:
        report = build(path, text, opts)
    finally:
        if opts.progress is not None:
            opts.progress.finish()
    for line in report.diagnostics:
        print(line, file=sys.stderr)
    return report


def status_of(report) -> int:
    statuses = {s.status for s in report.steps}
    return 2 if "error" in statuses else 1 if "failed" in statuses else 0


def write_whole(files: dict[Path, bytes]) -> None:
    """Write every file to a temporary name first, then move them into place."""
    staged = []
    umask = os.umask(0)
    os.umask(umask)
    try:
        for target, data in files.items():
            target.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.")
            with os.fdopen(fd, "wb") as handle:
                handle.write(data)
            os.chmod(tmp, 0o666 & ~umask)
            staged.append((tmp, target))
    except BaseException:
        for tmp, _ in staged:
            os.unlink(tmp)
        raise
    for tmp, target in staged:
        os.replace(tmp, target)


def cmd_build(args) -> int:
    formats = [f.strip() for f in args.format.split(",") if f.strip()]
    unknown = [f for f in formats if f not in FORMATS]
    if unknown:
        print(f"anomark: unknown format {', '.join(unknown)} (choose from {', '.join(FORMATS)})",
              file=sys.stderr)
        return 2
    report = compile_file(args, args.file)
    source = Path(args.file)
    out = Path(args.output) if args.output else source.parent
    stem = source.stem
    files: dict[Path, bytes] = {}
    if "html" in formats:
        files[out / f"{stem}.html"] = to_html(report).encode("utf-8")
    if "json" in formats:
        files[out / f"{stem}.json"] = to_json(report).encode("utf-8")
    if "tex" in formats:
        files[out / f"{stem}.tex"] = to_tex(report, standalone=args.standalone, style=args.tex_style).encode("utf-8")
        for name, data in plot_files(report).items():
            files[out / name] = data
    write_whole(files)
    return status_of(report)


def cmd_check(args) -> int:
    worst = 0
    for path in args.files:
        try:
            worst = max(worst, status_of(compile_file(args, path)))
        except DocumentError as err:
            for problem in err.problems:
                print(problem, file=sys.stderr)
            worst = 2
    return worst


def cmd_diff(args) -> int:
    old, new = load_record(args.old), load_record(args.new)
    result = diff_records(old, new)
    print(diff_to_json(result) if args.json else format_diff(result))
    return 0 if result.empty else 1


COMMANDS = {"build": cmd_build, "check": cmd_check, "diff": cmd_diff}
