"""The command line's help texts: what each command is for, its exit statuses, an example.

Kept apart from cli.py so that the argument wiring there stays short; the
texts are argparse descriptions and epilogs, printed as written.
"""
from __future__ import annotations

BUILD_STATUS = """\
exit status:
  0  every check passed (proven, or sampled at exact points)
  1  some check failed and none errored
  2  the document could not be compiled, or a step could not run;
     each problem is printed as FILE:LINE:COL: message
  3  an internal error in anomark itself (rerun with --debug)"""

TOP = """\
Compile a Markdown derivation (front matter, prose and ```derive blocks)
into a checked HTML report, a LaTeX appendix and a JSON record.  Each
statement becomes a step with checks that end proven, sampled, failed or
error.  The language reference is the docs/ folder of anomark's source."""

TOP_EPILOG = f"""\
{BUILD_STATUS}

examples:
  anomark build derivations/twisted-compactification.md -o out
  anomark check derivations/*.md
  anomark diff before/doc.json after/doc.json
  anomark watch derivations/twisted-compactification.md -o out

'anomark COMMAND --help' describes each command."""

BUILD = """\
Compile each FILE into report files named after it (FILE.md gives FILE.html,
FILE.json and, with tex, FILE.tex), each written whole or not at all.  A
document with failed or error steps still writes its files; one that cannot
be parsed writes none.  A summary line per document is printed on standard
error (--quiet silences it).  When nothing a build reads has changed (the
document, the documents it uses, the options, anomark itself) and its files
are untouched, the rebuild repeats what the last build said ("up to date")
without building."""

BUILD_EPILOG = f"""\
{BUILD_STATUS}
  With several files the exit status is the worst of them.

example:
  anomark build derivations/twisted-compactification.md -o out --format html,json,tex
  anomark build derivations/*.md -o out
  anomark build derivations/brane-inflow.md -o after --set angular_integral=1"""

CHECK = """\
Compile each FILE and check it without writing any report; one summary line
per document on standard error (--quiet silences it)."""

CHECK_EPILOG = f"""\
{BUILD_STATUS}
  With several files the exit status is the worst of them.

example:
  anomark check derivations/*.md --quiet && echo all passed"""

DIFF = """\
Compare two JSON records written by 'anomark build --format json': the
conventions that differ, the values whose text changed and the checks whose
status changed."""

DIFF_EPILOG = """\
exit status:
  0  nothing moved
  1  something differs
  2  a record could not be read
  3  an internal error in anomark itself

example:
  anomark diff before/brane-inflow.json after/brane-inflow.json
  anomark diff --json old.json new.json | head -1"""

WATCH = """\
Build FILE as 'build' does (HTML only), then rebuild it every time it is
saved, printing the summary line after each build.  The report is served on
http://127.0.0.1:PORT/ (loopback only) to a browser that reloads itself when
a rebuild finishes; the files written to DIR carry no script, only the
served copy does.  Stop with Ctrl-C."""

WATCH_EPILOG = """\
exit status:
  0  stopped with Ctrl-C
  2  the document could not be read, or the port could not be opened
  3  an internal error in anomark itself

example:
  anomark watch derivations/twisted-compactification.md -o out --port 8000
  (then open http://127.0.0.1:8000/ and edit the document)"""
