"""The ``anomark`` command: build, check, diff, watch.

This is the only place that talks to the terminal.  It reaches the rest of
the program through the engine (a Report out) and the renderers (text out),
turns document problems into ``FILE:LINE:COL: message`` lines and exit
status 2, and keeps Python tracebacks for anomark's own bugs (``--debug``).
"""
from __future__ import annotations

import argparse
import os
import re
import signal
import sys
import time
import traceback
from fractions import Fraction
from pathlib import Path

from . import __version__, usage
from .errors import DocumentError, Location, shown
from .outputs import Record, template_store, write_whole
from .render import TEX_STYLES
from .results import STATUSES

FORMATS = ("html", "json", "tex")
_RATIONAL = re.compile(r"[+-]?\d+(/\d+)?")
EXIT_INTERNAL = 3


def rational(text: str) -> Fraction:
    """A --set value: an exact integer or fraction, never a decimal."""
    text = text.strip()
    if not _RATIONAL.fullmatch(text):
        raise ValueError(f"'{text}' is not an exact rational (write 1/2, not 0.5)")
    if any(len(part.lstrip("+-")) > sys.get_int_max_str_digits() for part in text.split("/")):
        raise ValueError(f"the number has more than {sys.get_int_max_str_digits()} digits")
    return Fraction(text)


def parser() -> argparse.ArgumentParser:
    top = argparse.ArgumentParser(prog="anomark", description=usage.TOP, epilog=usage.TOP_EPILOG,
                                  formatter_class=argparse.RawDescriptionHelpFormatter)
    top.add_argument("--version", action="version", version=f"anomark {__version__}")
    sub = top.add_subparsers(dest="command", required=True, metavar="COMMAND")

    def command(name, summary, description, epilog):
        return sub.add_parser(name, help=summary, description=description, epilog=epilog,
                              formatter_class=argparse.RawDescriptionHelpFormatter)

    def common(p):
        p.add_argument("--set", action="append", default=[], metavar="NAME=VALUE",
                       help="override a declared convention with an exact rational such as 1/2 "
                            "(repeatable; default: the document's values)")
        p.add_argument("--allow-html", action="store_true",
                       help="pass raw HTML in prose through (default: shown as text)")
        p.add_argument("--no-cache", action="store_true",
                       help="recompute every step (default: reuse .anomark-cache/ beside the document)")
        p.add_argument("--quiet", action="store_true",
                       help="no summary or progress lines; problems are still printed")
        p.add_argument("--time-limit", type=float, default=30.0, metavar="SECONDS",
                       help="longest a single step may run (default: 30)")
        p.add_argument("--build-time-limit", type=float, default=300.0, metavar="SECONDS",
                       help="longest a whole build may run, reading included (default: 300)")
        p.add_argument("--debug", action="store_true", help="show tracebacks of internal errors")

    def output(p):
        p.add_argument("-o", "--output", metavar="DIR",
                       help="output folder (default: the document's own folder)")

    b = command("build", "compile documents into reports", usage.BUILD, usage.BUILD_EPILOG)
    b.add_argument("files", nargs="+", metavar="FILE.md")
    output(b)
    b.add_argument("--format", default="html,json",
                   help="comma-separated, from html,json,tex (default: html,json)")
    b.add_argument("--standalone", action="store_true",
                   help="LaTeX as a whole article rather than a fragment to \\input")
    b.add_argument("--tex-style", choices=TEX_STYLES, default="appendix",
                   help="appendix: results and claims for a paper (default); audit: every statement and check")
    common(b)

    c = command("check", "compile and check without writing files", usage.CHECK, usage.CHECK_EPILOG)
    c.add_argument("files", nargs="+", metavar="FILE.md")
    c.add_argument("--recompute", action="store_true",
                   help="compute every step and report where the cache disagrees (default: reuse it)")
    common(c)

    d = command("diff", "what changed between two JSON records", usage.DIFF, usage.DIFF_EPILOG)
    d.add_argument("old", metavar="OLD.json")
    d.add_argument("new", metavar="NEW.json")
    d.add_argument("--json", action="store_true", help="a JSON object for tools (default: text lines)")
    d.add_argument("--debug", action="store_true", help="show tracebacks of internal errors")

    w = command("watch", "rebuild on save and serve a live-reloading report",
                usage.WATCH, usage.WATCH_EPILOG)
    w.add_argument("file", metavar="FILE.md")
    output(w)
    w.add_argument("--port", type=int, default=0,
                   help="port on 127.0.0.1 to serve the report on (default: 0, any free port, printed)")
    common(w)
    return top


def main(argv=None) -> int:
    args = parser().parse_args(argv)
    try:
        status = COMMANDS[args.command](args)
        sys.stdout.flush()  # a closed pipe shows here, where it can be handled
        return status
    except BrokenPipeError:
        return closed_pipe()
    except DocumentError as err:
        print_problems(err)
        return 2
    except KeyboardInterrupt:
        print("anomark: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # an anomark bug: say so, plainly
        if getattr(args, "debug", False):
            traceback.print_exc()
        print(f"anomark: internal error (a bug in anomark, not in your document): "
              f"{type(exc).__name__}: {shown(str(exc))}" + ("" if getattr(args, "debug", False)
                                                else "; rerun with --debug for details"),
              file=sys.stderr)
        return EXIT_INTERNAL


def closed_pipe() -> int:
    """The reader went away (``anomark diff ... | head -1``): stop quietly, as ``cat`` would.

    Standard output is pointed at /dev/null so that the interpreter's last
    flush does not fail again; the status is the shell's for SIGPIPE.
    """
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, sys.stdout.fileno())
    os.close(devnull)
    return 128 + signal.SIGPIPE


# ------------------------------------------------------------ what the tool says

def say(args, line: str) -> None:
    """A line for the author on standard error, unless --quiet."""
    if not getattr(args, "quiet", False):
        print(line, file=sys.stderr)


def warning_lines(source) -> list[str]:
    """Located warnings a build carries (near-miss ``derive`` fences), as FILE:LINE:COL: warning: ...

    Read with getattr: reports and document errors without warnings have none.
    """
    lines = []
    for warning in getattr(source, "warnings", ()) or ():
        location, message = getattr(warning, "location", None), getattr(warning, "message", None)
        lines.append(f"{location}: warning: {shown(message)}" if location is not None else shown(str(warning)))
    return lines


def print_warnings(source) -> None:
    for line in warning_lines(source):
        print(line, file=sys.stderr)


def print_problems(err: DocumentError) -> None:
    print_warnings(err)
    for problem in err.problems:
        print(problem, file=sys.stderr)


VERDICTS = {0: "passed", 1: "FAILED", 2: "ERRORS"}


def plural(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def summary(path: str, report) -> str:
    """``doc.md: passed — 46 checks: 43 proven, 3 sampled (50 steps)``."""
    total = sum(len(s.checks) for s in report.steps)
    counts = ", ".join(plural(report.count(s), s) if s == "error" else f"{report.count(s)} {s}"
                       for s in STATUSES if report.count(s))
    line = (f"{shown(path)}: {VERDICTS[status_of(report)]} \u2014 {plural(total, 'check')}"
            f"{': ' + counts if counts else ''} ({plural(len(report.steps), 'step')})")
    return line


def files_note(verb: str, files) -> str:
    """``; wrote out/doc.html, out/doc.json`` after a summary line."""
    return f"; {verb} {', '.join(shown(str(p)) for p in files)}"


def options(args, path: str):
    from .engine import BuildOptions
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
                        build_time_limit=args.build_time_limit,
                        recompute=getattr(args, "recompute", False), progress=progress_printer(args))


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
    """Build the document at ``path``; print (and return) its warnings and diagnostics."""
    from .engine import build  # the engine loads only when a document is compiled
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
    lines = warning_lines(report) + list(report.diagnostics)
    for line in lines:
        print(line, file=sys.stderr)
    return report, lines


def status_of(report) -> int:
    statuses = {s.status for s in report.steps}
    return 2 if "error" in statuses or report.prose_errors else 1 if "failed" in statuses else 0


def cmd_build(args) -> int:
    formats = [f.strip() for f in args.format.split(",") if f.strip()]
    unknown = [f for f in formats if f not in FORMATS]
    if unknown:
        print(f"anomark: unknown format {', '.join(unknown)} (choose from {', '.join(FORMATS)})",
              file=sys.stderr)
        return 2
    targets = [(output_folder(args, p).resolve(), Path(p).stem) for p in args.files]
    twice = sorted({str(folder / stem) for folder, stem in targets if targets.count((folder, stem)) > 1})
    if twice:
        print(f"anomark: two documents would write the same reports {shown(twice[0])}.*; "
              "build them into different folders", file=sys.stderr)
        return 2
    worst = 0
    for path in args.files:
        try:
            status = build_once(args, formats, path)
        except DocumentError as err:
            print_problems(err)
            status = 2
        worst = max(worst, status)
    return worst


def output_folder(args, path: str) -> Path:
    return Path(args.output) if args.output else Path(path).parent


def settings(args, formats, path: str) -> list:
    """Every option the files and the verdict depend on, for the rebuild record."""
    return [formats, getattr(args, "standalone", False), getattr(args, "tex_style", None), args.set,
            args.allow_html, args.time_limit, args.build_time_limit,
            str(output_folder(args, path).resolve()), path]


def build_once(args, formats, path: str) -> int:
    """Compile ``path``, write its reports whole, and say what happened; when
    the last build had the same inputs and its files are untouched, only say."""
    out, source = output_folder(args, path), Path(path)
    if out.exists() and not out.is_dir():
        print(f"anomark: {shown(str(out))}: not a folder (-o names the output folder)", file=sys.stderr)
        return 2
    record = Record(path, settings(args, formats, path), not args.no_cache)
    last = record.current()
    if last is not None:
        for line in last["lines"]:
            print(line, file=sys.stderr)
        say(args, last["summary"] + files_note("up to date:", last["files"]))
        return last["status"]
    report, lines = compile_file(args, path)
    files = report_files(args, report, formats, path)
    clash = [target for target in files if target.resolve() == source.resolve()]
    if clash:
        print(f"anomark: {shown(str(clash[0]))}: the output would overwrite the document itself; "
              "choose another folder with -o", file=sys.stderr)
        return 2
    try:
        write_whole(files)
    except OSError as exc:
        print(f"anomark: cannot write into {shown(str(out))}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    status, line = status_of(report), summary(path, report)
    if status != 2:  # an error may be a time limit: the next build tries again
        record.save(files, report.sources, status, lines, line)
    say(args, line + files_note("wrote", files))
    return status


def report_files(args, report, formats, path: str) -> dict[Path, bytes]:
    """Every output file of one build, by path: the reports and, for LaTeX, the plots."""
    from .render.templates import keep_compiled  # the renderers load only when something is rendered
    with keep_compiled(template_store()):
        return render_files(args, report, formats, path)


def render_files(args, report, formats, path: str) -> dict[Path, bytes]:
    from .render.html import to_html
    from .render.json import to_json
    out, stem = output_folder(args, path), Path(path).stem
    files: dict[Path, bytes] = {}
    if "html" in formats:
        files[out / f"{stem}.html"] = to_html(report).encode("utf-8")
    if "json" in formats:
        files[out / f"{stem}.json"] = to_json(report).encode("utf-8")
    if "tex" in formats:
        from .render.tex import plot_files, to_tex
        files[out / f"{stem}.tex"] = to_tex(report, standalone=args.standalone, style=args.tex_style).encode("utf-8")
        for name, data in plot_files(report).items():
            files[out / name] = data
    return files


def cmd_check(args) -> int:
    worst = 0
    for path in args.files:
        try:
            report, _ = compile_file(args, path)
        except DocumentError as err:
            print_problems(err)
            worst = 2
            continue
        say(args, summary(path, report))
        worst = max(worst, status_of(report))
    return worst


def cmd_diff(args) -> int:
    from .diff import diff_records, diff_to_json, format_diff, load_record  # this command only
    old, new = load_record(args.old), load_record(args.new)
    result = diff_records(old, new)
    print(diff_to_json(result) if args.json else format_diff(result))
    return 0 if result.empty else 1


def cmd_watch(args) -> int:
    from .watch import Watch  # the server loads only for this command

    source = Path(args.file)
    if not source.is_file():
        raise DocumentError(Location(args.file, 1, 1), "cannot read the document: no such file")

    def rebuild() -> None:
        try:
            build_once(args, ["html"], args.file)
        except DocumentError as err:
            print_problems(err)

    watch = Watch(source, output_folder(args, args.file) / f"{source.stem}.html", rebuild)
    try:
        url = watch.start(args.port)
    except OSError as exc:
        print(f"anomark: cannot serve on 127.0.0.1:{args.port}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    print(f"anomark: serving {url} (rebuilds when {shown(args.file)} is saved; Ctrl-C stops)",
          file=sys.stderr, flush=True)
    try:
        watch.run()
    except KeyboardInterrupt:
        return 0
    finally:
        watch.stop()
    return 0


COMMANDS = {"build": cmd_build, "check": cmd_check, "diff": cmd_diff, "watch": cmd_watch}
