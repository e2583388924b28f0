"""The build cache: each step's outcome kept as signed JSON beside the document.

A step's key is made of its statement, the keys of the values it reads, the
declarations so far, the conventions, the truncation and the tool's code (the
run loop computes it).  Every entry carries an HMAC over its key and its
whole content, made with a secret kept outside the document folder (see
``key_folder``), so a cache that this user's own builds did not write (one
edited by hand, or shipped with a shared folder) is never trusted: an entry
that does not verify is ignored and the step recomputed.  Reading an entry
runs no code (no pickle, no parsing of expressions).  The cache is never
needed for correctness; an unreadable file or entry is ignored and rebuilt.
"""
from __future__ import annotations

import contextlib
import hashlib
import hmac
import json
import os
import secrets
import tempfile
from pathlib import Path

CACHE_DIR = ".anomark-cache"
FORMAT = 2
#: Where the signing secret lives, if set (tests point it at a temporary folder).
KEY_ENV = "ANOMARK_KEY_DIR"


def _fingerprint() -> str:
    """The tool's own code, so a changed anomark never reuses old results
    even when its version number has not moved."""
    h = hashlib.sha256()
    for path in sorted(Path(__file__).parents[1].rglob("*.py")):
        h.update(path.read_bytes())
    return h.hexdigest()[:16]


CODE = _fingerprint()


def digest(*parts) -> str:
    """A stable key from JSON-ready parts."""
    text = json.dumps(parts, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:32]


def key_folder() -> Path:
    """``$ANOMARK_KEY_DIR``, else ``${XDG_CACHE_HOME:-~/.cache}/anomark``."""
    if os.environ.get(KEY_ENV):
        return Path(os.environ[KEY_ENV])
    base = os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache"
    return Path(base) / "anomark"


def signing_key() -> bytes | None:
    """This user's secret, created (mode 0600) on first use; None if it
    cannot be had or may have been written by someone else (no cache then)."""
    folder = key_folder()
    path = folder / "key"
    try:
        if not path.exists():
            folder.mkdir(parents=True, exist_ok=True, mode=0o700)
            fd, tmp = tempfile.mkstemp(dir=folder, prefix=".key-")  # mode 0600
            try:
                with os.fdopen(fd, "w") as handle:
                    handle.write(secrets.token_hex(32))
                os.link(tmp, path)  # atomic: a concurrent first build keeps its own
            except FileExistsError:
                pass
            finally:
                os.unlink(tmp)
        info = path.stat()
        if info.st_mode & 0o077 or info.st_uid != os.getuid():
            return None
        return bytes.fromhex(path.read_text(encoding="ascii").strip())
    except (OSError, ValueError):
        return None


def _canonical(key: str, entry) -> bytes:
    return json.dumps([key, entry], sort_keys=True, separators=(",", ":"),
                      ensure_ascii=True, allow_nan=False).encode("ascii")


def sign(secret: bytes, key: str, entry: dict) -> str:
    """The MAC of ``entry`` stored under ``key``."""
    return hmac.new(secret, _canonical(key, entry), hashlib.sha256).hexdigest()


class StepCache:
    """Verified entries read from the last build; entries written by this one."""

    def __init__(self, document: str, enabled: bool):
        path = Path(document)
        self.file = path.parent / CACHE_DIR / f"{path.name}.json"
        self.secret = signing_key() if enabled else None
        self.enabled = self.secret is not None
        self.old: dict = self._load() if self.enabled else {}
        self.new: dict = {}

    def _load(self) -> dict:
        try:
            data = json.loads(self.file.read_text(encoding="utf-8"))
        except (OSError, ValueError, RecursionError):  # RecursionError: deeply nested data
            return {}
        if not isinstance(data, dict) or data.get("format") != FORMAT:
            return {}
        entries = data.get("entries")
        return entries if isinstance(entries, dict) else {}

    def get(self, key: str) -> dict | None:
        """The entry under ``key`` if this user's builds wrote it, else None."""
        signed = self.old.get(key)
        if not isinstance(signed, dict) or set(signed) != {"mac", "entry"}:
            return None
        mac, entry = signed["mac"], signed["entry"]
        try:
            good = isinstance(mac, str) and hmac.compare_digest(mac, sign(self.secret, key, entry))
        except (TypeError, ValueError, RecursionError):
            return None
        return entry if good and isinstance(entry, dict) else None

    def put(self, key: str, entry: dict) -> None:
        if not self.enabled:
            return
        try:
            self.new[key] = {"mac": sign(self.secret, key, entry), "entry": entry}
        except ValueError:  # a plot point out of float range: not kept, recomputed next time
            pass

    def save(self) -> None:
        """Write the entries of this build whole, or leave the old file."""
        if self.enabled:
            write_json(self.file, {"format": FORMAT, "entries": self.new})


def write_json(file: Path, data: dict) -> None:
    write_file(file, json.dumps(data).encode("utf-8"))


def write_file(file: Path, data: bytes) -> None:
    """Write whole or leave the old file; a read-only folder or a full disk
    just means nothing is kept."""
    tmp = None
    try:
        file.parent.mkdir(parents=True, exist_ok=True, mode=0o700)
        fd, tmp = tempfile.mkstemp(dir=file.parent, prefix=".tmp-")
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
        os.replace(tmp, file)
        tmp = None
    except OSError:
        pass
    finally:
        if tmp is not None:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
