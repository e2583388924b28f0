"""One handler per statement kind, ``(scope, statement, step) -> None``, by family.

Declarations build the ring and always run; every other family depends only
on the names it reads, so the cache layer may replay its steps.
"""
from __future__ import annotations

from . import checks, declarations, display, gauge, matter, operations

HANDLERS = {**declarations.HANDLERS, **gauge.DECLARATIONS, **operations.HANDLERS, **gauge.OPERATIONS,
            **matter.HANDLERS, **display.HANDLERS, **checks.HANDLERS}

#: Statements whose outcome the cache keeps.
CACHED = frozenset(HANDLERS) - frozenset(declarations.HANDLERS) - frozenset(gauge.DECLARATIONS)
