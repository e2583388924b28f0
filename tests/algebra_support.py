"""Small builders shared by the algebra tests."""
from __future__ import annotations

from compiler.algebra.bundles import BundleTable
from compiler.algebra.graded import Ring


def table(truncate: int = 12) -> BundleTable:
    """A bundle table over a ring with no symbols."""
    return BundleTable(Ring([], truncate))


def whitney_sum(ranks) -> tuple[BundleTable, list[str]]:
    """Real bundles A0, A1, ... of the given ranks and B split as their sum."""
    t = table()
    names = [f"A{k}" for k in range(len(ranks))]
    for name, r in zip(names, ranks):
        t.declare(name, "real", r)
    t.declare("B", "real", sum(ranks))
    t.split("B", names)
    return t, names
