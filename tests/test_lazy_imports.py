"""Builds whose algebra stays on FLINT never import sympy, and show the same as builds that do.

sympy costs about a third of a second to import, more than a whole build of
most documents; it is imported on first use (``algebra/lazysympy.py``).  One
child process builds several documents that need no radicals, solving,
series or sympy-only functions, from scratch and again from the build cache,
and then reports whether sympy was imported; it then imports sympy and
builds them again, and the files must be the same byte for byte.  The rule
is anomark's own (common practice, no source).
"""
from __future__ import annotations

import importlib.util
import json
import os
import shutil
import subprocess
import sys

from support import DERIVATIONS, ROOT

#: Bundled documents whose builds need no sympy.  The others need it:
#: free-chirals, twisted-compactification (maximize: radicals), green-schwarz
#: (factorization), sqcd-duality (relations between symbols), large-n (a
#: surface of symbolic genus), spindle-d3 (symbolic orbifold orders),
#: sqcd-conformal-window (a sum with symbolic bounds) and general-fiber (the
#: tangent weight h*u1 + u2): sympy's assumptions decide those signs and
#: integralities.
NO_SYMPY = ["brane-inflow", "four-manifold-genera", "gauge-traces", "lines-on-hypersurfaces",
            "seiberg-duality", "six-dimensional-gauge", "six-dimensional-gravity", "sqcd-matching",
            "ten-dimensional-count", "tensor-multiplet"]

_CHILD = r"""
import json, os, sys
from compiler import cli

def build_all(folder, *flags):
    return [cli.main(["build", doc, "-o", os.path.join(folder, os.path.basename(doc)[:-3]),
                      "--quiet", *flags]) for doc in docs]

docs, out = json.loads(sys.argv[1]), sys.argv[2]
lazy = build_all(os.path.join(out, "lazy"), "--no-cache")
build_all(os.path.join(out, "cold"))                     # fills each document's cache
lazy += build_all(os.path.join(out, "lazy-warm"))        # restores every step from it
loaded = "sympy" in sys.modules
import sympy
eager = build_all(os.path.join(out, "eager"), "--no-cache")
eager += build_all(os.path.join(out, "eager-warm"))
print(json.dumps({"lazy": lazy, "eager": eager, "sympy_loaded": loaded}))
"""


def _inflow_document(k: int) -> str:
    """The wide inflow cube of bench/bench_inflow.py with ``k`` flavour fields."""
    spec = importlib.util.spec_from_file_location("bench_inflow", ROOT / "bench" / "bench_inflow.py")
    module = importlib.util.module_from_spec(spec)
    sys.path.insert(0, str(ROOT / "bench"))  # the bench's own helpers, as when it runs
    try:
        spec.loader.exec_module(module)
    finally:
        sys.path.remove(str(ROOT / "bench"))
    return module.document(k)


def _files(folder) -> dict:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_builds_without_sympy_import_none_and_show_the_same(tmp_path):
    # the documents are copied (with the folders they use), so their caches land here
    shutil.copytree(DERIVATIONS, tmp_path / "derivations", ignore=shutil.ignore_patterns(".*"))
    inflow = tmp_path / "derivations" / "inflow.md"
    inflow.write_text(_inflow_document(6), encoding="utf-8")
    docs = [str(inflow)] + [str(tmp_path / "derivations" / f"{name}.md") for name in NO_SYMPY]
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    run = subprocess.run([sys.executable, "-c", _CHILD, json.dumps(docs), str(tmp_path / "out")],
                         capture_output=True, text=True, cwd=tmp_path, env=env, timeout=600)
    assert run.returncode == 0, run.stderr
    result = json.loads(run.stdout.strip().splitlines()[-1])
    assert result["lazy"] == result["eager"] == [0] * (2 * len(docs)), run.stderr
    assert result["sympy_loaded"] is False
    for lazy, eager in (("lazy", "eager"), ("lazy-warm", "eager-warm")):
        built, again = _files(tmp_path / "out" / lazy), _files(tmp_path / "out" / eager)
        assert sorted(built) == sorted(again) and len(built) >= 2 * len(docs)
        assert [name for name in built if built[name] != again[name]] == []


def test_importing_the_engine_imports_no_sympy():
    code = "import sys, compiler.engine, compiler.render.html; print('sympy' in sys.modules)"
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT,
                         env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=120)
    assert run.stdout.strip() == "False", run.stderr
