"""The cache as a layer around a step: replay a verified entry, or compute and store.

Handlers never see the cache.  In ``recompute`` mode every step is computed
and compared with what the cache holds; a disagreement becomes an *error*
check on the step, so it is printed at the step's location.
"""
from __future__ import annotations

import json
from typing import Callable

from .. import names as names_pass
from ..results import CheckResult, Step
from .cache import StepCache
from .entries import precision, restore_step, step_entry, value_from_data, value_to_data


#: The check a step gets when recomputing it disagrees with its cache entry.
DISAGREES = "recomputed, the step disagrees with the cache"


class CacheLayer:
    """Steps of the cached statement kinds pass through here; ``restored`` counts replays."""

    def __init__(self, scope, cache: StepCache, recompute: bool):
        self.scope = scope
        self.cache = cache
        self.recompute = recompute
        self.restored = 0

    def step(self, key: str, s, blank: Callable[[], Step], compute: Callable[[Step], None]) -> Step:
        """The step for statement ``s`` under cache key ``key``."""
        entry = self.cache.get(key)
        if entry is not None and not self.recompute:
            step = blank()
            if self._restore(step, s, entry):
                self.cache.put(key, entry)
                self.restored += 1
                return step
        step = blank()
        compute(step)
        if step.status == "error" or not self.cache.enabled:  # --no-cache: nothing to keep
            return step
        fresh = self._entry(step)
        if fresh is None:
            return step
        self.cache.put(key, fresh)
        if self.recompute and entry is not None:
            disagreement = _disagreement(json.loads(json.dumps(fresh)), entry)
            if disagreement:
                step.checks.append(CheckResult(DISAGREES, "error",
                                               f"the cache holds a different {disagreement}"))
        return step

    def _restore(self, step: Step, s, entry: dict) -> bool:
        """Fill a step and bind its outputs from an entry; False if the
        entry is unusable in any way (it is then recomputed)."""
        scope = self.scope
        try:
            restore_step(step, entry)
            outputs, keys = entry["outputs"], entry["keys"]
            if not isinstance(outputs, dict) or set(outputs) != set(step.outputs):
                return False
            values = {name: value_from_data(scope.ring, name, step.line, data, scope.specs)
                      for name, data in outputs.items()}
            exact_to = {name: precision(entry["exact_to"][name]) for name in outputs}
            if (not isinstance(keys, dict) or set(keys) != set(outputs)
                    or not all(isinstance(k, str) for k in keys.values())):
                return False
        except Exception:  # a malformed entry can be anything: never trust, recompute
            return False
        for name in names_pass.references(s):
            if name in scope.bindings and scope.bindings[name].kind == "bundle":
                scope.note_class_use(name, s.line)
        shown = {v.name: v for v in step.values}
        for name, value in values.items():
            # The key the value had when computed: a rebuilt sympy tree may
            # differ in shape (sympy distributes numbers), never in value.
            scope.bind(name, "value", value, step.line, shown.get(name), key=keys[name],
                       exact_to=exact_to[name])
        return True

    def _entry(self, step: Step) -> dict | None:
        """The entry for a computed step, or None if a value cannot be kept."""
        try:
            outputs = {name: value_to_data(self.scope.bindings[name].value) for name in step.outputs}
        except ValueError:
            return None
        entry = step_entry(step, outputs)
        entry["keys"] = {name: self.scope.keys[name] for name in outputs}
        entry["exact_to"] = {name: self.scope.bindings[name].exact_to for name in outputs}
        return entry


def _disagreement(fresh: dict, cached: dict) -> str:
    """What differs between a recomputed entry and the cached one ('' if nothing)."""
    if fresh.get("checks") != cached.get("checks"):
        def statuses(entry):
            checks = entry.get("checks")
            return ", ".join(str(c.get("status")) for c in checks if isinstance(c, dict)) \
                if isinstance(checks, list) else "?"
        return f"check outcome ({statuses(cached)}; recomputed: {statuses(fresh)})"
    for part in ("outputs", "exact_to", "values", "remainder", "table", "plot", "summary", "keys"):
        if fresh.get(part) != cached.get(part):
            return {"outputs": "value", "values": "shown value",
                    "exact_to": "known precision"}.get(part, part)
    return ""
