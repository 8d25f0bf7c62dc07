"""Circuit tags in the order people read them: "D-2" before "D-10" (natural order), not
as text ("D-10" before "D-2"). Plain Python; every list of circuits (schedule, CSV export,
labels, checklists, the record) sorts by `tag_key`."""

from __future__ import annotations

import re

_RUNS = re.compile(r"([0-9]+)")


def tag_key(tag: str) -> tuple:
    """A sort key: runs of ASCII digits compare as numbers, the rest as case-folded text;
    "D-02" and "D-2" tie on the number and then keep a fixed order."""
    key = []
    for run in _RUNS.split(tag or ""):
        if not run:
            continue
        if run.isdigit():
            key.append((0, int(run), run))
        else:
            key.append((1, 0, run.casefold()))
    return tuple(key)


def natural_by_tag(circuits) -> list:
    """The circuits (or anything with a `tag`) in natural tag order."""
    return sorted(circuits, key=lambda circuit: tag_key(circuit.tag))
