"""Helpers shared by the reader tests."""

from __future__ import annotations

import dataclasses

from docgen.design import Design

#: fields that hold positions or raw text, not meaning.
POSITION_FIELDS = ("span", "spans", "metric_span", "limit_span", "source", "blocks", "warnings",
                   "text")


def meaning(design: Design) -> object:
    """A design without positions or raw text: what neatening must keep."""
    def strip(obj: object) -> object:
        if dataclasses.is_dataclass(obj):
            return tuple((f.name, strip(getattr(obj, f.name))) for f in dataclasses.fields(obj)
                         if f.name not in POSITION_FIELDS)
        if isinstance(obj, (tuple, list)):
            return tuple(strip(o) for o in obj)
        if hasattr(obj, "items"):
            return tuple(sorted((k, strip(v)) for k, v in obj.items()))
        return obj
    return strip(design)
