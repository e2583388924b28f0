"""A build's files: written whole or not at all, and the signed record that
lets a rebuild with nothing to do skip the build.

The record (``.anomark-cache/NAME.md.outputs.json`` beside the document)
holds the files that build wrote with their hashes, the documents it used,
its exit status and the lines it printed.  Its MAC covers all that together
with a key of every input: anomark's code and templates, the interpreter,
the document and each document it used, the options and where the files go.
When a rebuild computes the same key, the record verifies and the files are
untouched, the command line repeats what the build said and stops, without
loading the engine or the algebra.  Only this user's own builds can write a
record that verifies (the secret is the step cache's), so a shared folder
cannot make a document pass that was not built here.
"""
from __future__ import annotations

import contextlib
import hashlib
import hmac
import json
import os
import sys
import tempfile
from pathlib import Path

from .engine.cache import CACHE_DIR, CODE, digest, key_folder, sign, signing_key, write_file, write_json
from .render.templates import template_root

LIBRARY_KEY = "library/"


def _file_hash(path: Path) -> str | None:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def _source_hash(key: str) -> str | None:
    """The content of a used document, by the key the engine gave it."""
    if key.startswith(LIBRARY_KEY):
        return _file_hash(Path(__file__).parent / "library" / key[len(LIBRARY_KEY):])
    return _file_hash(Path(key))


def _templates() -> str:
    return digest(sorted((entry.name, hashlib.sha256(entry.read_bytes()).hexdigest())
                         for entry in template_root().iterdir() if entry.is_file()))


class Record:
    """What the last build of ``document`` wrote and said, if this user's builds made it."""

    def __init__(self, document: str, settings: list, enabled: bool):
        path = Path(document)
        self.file = path.parent / CACHE_DIR / f"{path.name}.outputs.json"
        self.document = path
        self.settings = settings
        self.secret = signing_key() if enabled else None

    def _key(self, sources) -> str | None:
        """The key of every input; None if one of them cannot be read."""
        hashes = [_file_hash(self.document)] + [_source_hash(key) for key in sources]
        if None in hashes:
            return None
        return digest(CODE, _templates(), sys.version, self.settings, list(sources), hashes)

    def current(self) -> dict | None:
        """The last build's entry if its inputs are these and its files are untouched."""
        if self.secret is None:
            return None
        try:
            data = json.loads(self.file.read_text(encoding="utf-8"))
            entry = data["entry"]
            key = self._key(entry["sources"])
            if key is None or not hmac.compare_digest(data["mac"], sign(self.secret, key, entry)):
                return None
            if not entry["files"] or any(_file_hash(Path(name)) != hashed
                                         for name, hashed in entry["files"].items()):
                return None
            return entry
        except (OSError, ValueError, KeyError, TypeError, AttributeError, RecursionError):
            return None

    def save(self, files: dict[Path, bytes], sources: list[str], status: int, lines: list[str],
             summary: str) -> None:
        """Keep what this build wrote and said, under the key of what it read."""
        key = self._key(sources) if self.secret is not None else None
        if key is None:
            return
        entry = {"files": {str(p): hashlib.sha256(data).hexdigest() for p, data in files.items()},
                 "sources": list(sources), "status": status, "lines": lines, "summary": summary}
        write_json(self.file, {"mac": sign(self.secret, key, entry), "entry": entry})


def template_store():
    """A store of compiled report templates in this user's anomark folder,
    beside the key, or None without a key.  Compiled templates are code: each
    is kept with an HMAC made with the user's secret and loaded only if it
    verifies, so only this user's own builds can have written one."""
    secret = signing_key()
    if secret is None:
        return None
    import jinja2  # only a build that renders gets here
    folder = key_folder() / "templates"

    def mac(body: bytes) -> bytes:
        return hmac.new(secret, body, hashlib.sha256).digest()

    class SignedStore(jinja2.BytecodeCache):
        def load_bytecode(self, bucket) -> None:
            try:
                data = (folder / f"{bucket.key}.template").read_bytes()
            except OSError:
                return
            if hmac.compare_digest(data[:32], mac(data[32:])):
                bucket.bytecode_from_string(data[32:])

        def dump_bytecode(self, bucket) -> None:
            body = bucket.bytecode_to_string()
            write_file(folder / f"{bucket.key}.template", mac(body) + body)

    return SignedStore()


def write_whole(files: dict[Path, bytes]) -> None:
    """Write every file to a temporary name first, then move them into place."""
    staged = []
    umask = os.umask(0)
    os.umask(umask)
    try:
        for target, data in files.items():
            target.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.")
            staged.append((tmp, target))
            with os.fdopen(fd, "wb") as handle:
                handle.write(data)
            os.chmod(tmp, 0o666 & ~umask)
        while staged:
            os.replace(*staged[0])
            staged.pop(0)
    finally:  # on any failure, no temporary file is left behind
        for tmp, _ in staged:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
