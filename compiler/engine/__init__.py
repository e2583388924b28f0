"""The engine: runs a document's statements in order and records every step.

``run`` holds the loop, its limits and its error policy; ``scope`` the names
and the algebra; ``handlers`` one function per statement kind, by family;
``layer``, ``cache`` and ``entries`` the build cache around the steps.

The run loop (and with it the algebra) is imported on first use, so that a
rebuild with nothing to do, which reads only ``cache``, starts in a blink.
"""
__all__ = ["BuildOptions", "build", "parse"]


def __getattr__(name: str):
    if name in __all__:
        from . import run
        return getattr(run, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
