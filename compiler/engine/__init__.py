"""The engine: runs a document's statements in order and records every step.

``run`` holds the loop, its limits and its error policy; ``scope`` the names
and the algebra; ``handlers`` one function per statement kind, by family;
``layer``, ``cache`` and ``entries`` the build cache around the steps.
"""
from .run import BuildOptions, build, parse

__all__ = ["BuildOptions", "build", "parse"]
