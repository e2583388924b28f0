"""How a bench runs a whole ``anomark`` process with the code of a given checkout.

This checkout runs as a user runs it.  Another one (``--before DIR``) runs
with ``python -S`` and the venv's packages on PYTHONPATH: an editable install
of this checkout maps ``compiler.templates`` to this checkout's templates, and
``-S`` keeps that mapping (a ``.pth`` hook in site-packages) out, so the older
code reads its own templates.  Skipping ``site`` saves the older code a few
milliseconds of start-up, which only makes the comparison stricter.
"""
from __future__ import annotations

import os
import sys
import sysconfig
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def command(code: Path, args: list[str]) -> tuple[list[str], dict]:
    """``python args...`` with anomark from ``code``: the argv and the environment."""
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)   # as installed: compiled modules are kept
    if Path(code).resolve() == ROOT:
        env["PYTHONPATH"] = str(ROOT)
        return [sys.executable, *args], env
    env["PYTHONPATH"] = os.pathsep.join([str(code), sysconfig.get_paths()["purelib"]])
    return [sys.executable, "-S", *args], env
