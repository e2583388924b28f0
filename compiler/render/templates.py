"""Where the report templates are read from: the one place that finds them.

The templates' source lives in the checkout's top-level ``templates/``;
packaging maps that folder to the package ``compiler.templates`` (see
pyproject.toml), so a wheel, a plain ``pip install .`` and an editable
install all reach them through importlib.resources.  Run straight from a
checkout without any install (``PYTHONPATH=.``), that package does not
exist and the checkout's folder is the only copy there is.

Compiling the report template costs a build more than rendering it, so
the command line may name a folder where compiled templates are kept
(``keep_compiled``).  Each is stored with an HMAC made with the user's
secret and loaded only if it verifies: compiled templates are code, and
only this user's own builds may have written them.
"""
from __future__ import annotations

import contextlib
import hashlib
import hmac
import os
import tempfile
from importlib import resources
from importlib.abc import Traversable
from pathlib import Path


def template_root() -> Traversable:
    """The folder holding ``report.html.j2`` and its companions."""
    try:
        return resources.files("compiler.templates")
    except ModuleNotFoundError:  # a bare checkout on PYTHONPATH: no install mapped the folder
        return Path(__file__).resolve().parents[2] / "templates"


def loader():
    """A Jinja loader over the template folder, wherever it was installed
    (jinja2 loads only when something is rendered)."""
    import jinja2

    root = template_root()

    def load(name: str) -> str | None:
        entry = root.joinpath(name)
        return entry.read_text(encoding="utf-8") if entry.is_file() else None

    return jinja2.FunctionLoader(load)


#: The compiled-template store the command line set up, or None (compile every time).
_compiled = None


def environment(**options):
    """A Jinja environment over the templates, keeping compiled ones where allowed."""
    import jinja2

    return jinja2.Environment(loader=loader(), bytecode_cache=_compiled, **options)


@contextlib.contextmanager
def keep_compiled(folder: Path, secret: bytes):
    """While rendering, keep compiled templates in ``folder``, each signed with ``secret``."""
    global _compiled
    import jinja2

    class SignedStore(jinja2.BytecodeCache):
        def _file(self, bucket) -> Path:
            return folder / f"{bucket.key}.template"

        def load_bytecode(self, bucket) -> None:
            try:
                data = self._file(bucket).read_bytes()
            except OSError:
                return
            mac, body = data[:32], data[32:]
            if hmac.compare_digest(mac, hmac.new(secret, body, hashlib.sha256).digest()):
                bucket.bytecode_from_string(body)

        def dump_bytecode(self, bucket) -> None:
            body = bucket.bytecode_to_string()
            tmp = None
            try:  # whole or not at all; a read-only folder just means compiling next time
                folder.mkdir(parents=True, exist_ok=True, mode=0o700)
                fd, tmp = tempfile.mkstemp(dir=folder, prefix=".tmp-")
                with os.fdopen(fd, "wb") as handle:
                    handle.write(hmac.new(secret, body, hashlib.sha256).digest() + body)
                os.replace(tmp, self._file(bucket))
                tmp = None
            except OSError:
                pass
            finally:
                if tmp is not None:
                    with contextlib.suppress(OSError):
                        os.unlink(tmp)

    _compiled = SignedStore()
    try:
        yield
    finally:
        _compiled = None
