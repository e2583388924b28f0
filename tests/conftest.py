"""Fixtures shared by the test files: the command run in-process, and each
bundled derivation built once per session, with its files kept in a
temporary folder for every test that reads them.

Hypothesis runs derandomized in the suite, so a run of the suite is
repeatable; ``HYPOTHESIS_PROFILE=hunt`` draws fresh examples instead.

The suite runs in one process.  With pytest-xdist installed it can be spread
over workers with ``-n 2 --dist loadgroup``: the tests that read the bundled
builds then share one worker, so no document is built twice.
"""
from __future__ import annotations

import json
import os
import shutil
from dataclasses import dataclass
from pathlib import Path

import pytest
from hypothesis import HealthCheck, settings

from compiler.engine.cache import KEY_ENV
from support import DERIVATIONS, DOCUMENTS, anomark as run_anomark

settings.register_profile("suite", deadline=None, derandomize=True, database=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("hunt", deadline=None, suppress_health_check=[HealthCheck.too_slow])
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "suite"))


@pytest.fixture(scope="session", autouse=True)
def session_key_folder(tmp_path_factory):
    """The cache's signing secret in a temporary folder for the whole run,
    never in the user's own cache folder."""
    with pytest.MonkeyPatch.context() as patch:
        patch.setenv(KEY_ENV, str(tmp_path_factory.mktemp("cache-key")))
        yield


@pytest.fixture
def key_folder(tmp_path_factory, monkeypatch) -> Path:
    """A fresh signing secret for one test, in a folder of its own, outside
    every document folder."""
    folder = tmp_path_factory.mktemp("key")
    monkeypatch.setenv(KEY_ENV, str(folder))
    return folder


@pytest.fixture
def anomark():
    """``anomark(*args, cwd=ROOT)``: the command in this interpreter; returns
    its exit status and what it wrote (``returncode``, ``stdout``, ``stderr``)."""
    return run_anomark


@dataclass(frozen=True)
class Built:
    """A bundled document built by ``anomark build`` with every format."""

    stem: str
    returncode: int
    stderr: str
    record: dict  # the JSON record; empty if none was written
    out: Path  # the output folder

    def file(self, ext: str) -> Path:
        return self.out / f"{self.stem}.{ext}"


@pytest.fixture(scope="session")
def bundled_folder(tmp_path_factory) -> Path:
    """A folder holding a copy of derivations/ (the documents, no cache), so that
    ``derivations/NAME.md`` builds from here as it does from the checkout,
    and the build cache lands here, not in the checkout."""
    work = tmp_path_factory.mktemp("bundled")
    # with its subfolders: a document may use one below it (preambles/)
    shutil.copytree(DERIVATIONS, work / "derivations", ignore=shutil.ignore_patterns(".*"))
    return work


@pytest.fixture(scope="session")
def bundled(bundled_folder, tmp_path_factory):
    """``bundled(STEM, *OPTIONS)``: derivations/STEM.md built once per session
    into html, json and a standalone tex (plots included).

    Without options the build is cold (the cache starts empty) and fills the
    cache, so a later command on the same document (``check``, another
    format) is warm.  With options (``--set NAME=VALUE``) the build runs with
    ``--no-cache``: nothing in it is taken from, or left to, another build.
    """
    builds: dict[tuple, Built] = {}

    def get(stem: str, *options: str) -> Built:
        key = (stem, *options)
        if key not in builds:
            out = tmp_path_factory.mktemp(stem)
            cache = ("--no-cache",) if options else ()
            run = run_anomark("build", f"derivations/{stem}.md", "-o", out, "--format", "html,json,tex",
                              "--standalone", *cache, *options, cwd=bundled_folder)
            record_path = out / f"{stem}.json"
            record = json.loads(record_path.read_text(encoding="utf-8")) if record_path.exists() else {}
            builds[key] = Built(stem, run.returncode, run.stderr, record, out)
        return builds[key]

    return get


def _document_of(item) -> str | None:
    """The bundled document a parametrized test is about, if any."""
    for value in getattr(getattr(item, "callspec", None), "params", {}).values():
        stem = Path(str(value)).stem if str(value).endswith(".md") else None
        if stem and (DERIVATIONS / f"{stem}.md").exists():
            return stem
    return None


def pytest_collection_modifyitems(items):
    """Under xdist (``--dist loadgroup``) the tests about one bundled document
    run on one worker, so that each document is built once and the documents
    are spread over the workers; other tests that read bundled builds share
    one more group."""
    for item in items:
        stem = _document_of(item)
        if stem is not None:
            item.add_marker(pytest.mark.xdist_group(f"doc-{stem}"))
        elif "bundled" in getattr(item, "fixturenames", ()):
            item.add_marker(pytest.mark.xdist_group("bundled"))
