"""The pipeline for one design: read → elaborate → solve (each analysis) → check.

Results are one plain JSON-serialisable dict (see ``docs/results.md`` and
``docgen/schema/results.schema.json``).  Each analysis is a function ``analyse(ctx) -> dict``
registered in :data:`ANALYSES` by module path; it reads the design, the circuit and the sections
computed before it, and returns its own section.  Nothing downstream re-solves anything.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import Any

from docgen.design import Design, ModelDef
from docgen.diagnostics import DocgenError

Results = dict[str, Any]

#: (section name, "module:function") in the order they run; each may read earlier sections.
ANALYSES: list[tuple[str, str]] = [
    ("op", "docgen.solve.operating_point:analyse"),
    ("ac", "docgen.solve.response:analyse"),
    ("noise", "docgen.solve.noise:analyse"),
    ("transient", "docgen.solve.transient:analyse"),
    ("feedback", "docgen.solve.feedback:analyse"),
    ("spread", "docgen.solve.spread:analyse"),
    ("checks", "docgen.check.requirements:analyse"),
    ("cautions", "docgen.check.ratings:analyse"),
    ("estimates", "docgen.check.estimates:analyse"),
]


@dataclass
class Context:
    """What an analysis sees: the design, its elaborated circuit and the results so far.

    :param only: if not ``None``, the names of the sections the caller needs (``docgen check``
        asks only for what the requirements use); an analysis not named may be skipped.
    """

    design: Design
    circuit: Any
    library: Mapping[str, ModelDef]
    results: Results
    only: frozenset[str] | None = None
    options: dict[str, Any] = field(default_factory=dict)


def _resolve(target: str) -> Callable[[Context], Any] | None:
    module_name, func_name = target.split(":")
    try:
        module = importlib.import_module(module_name)
    except ModuleNotFoundError as exc:
        if exc.name and module_name.startswith(exc.name):
            return None  # that analysis is not part of this build of docgen
        raise
    return getattr(module, func_name)


def run(
    design: Design,
    library: Mapping[str, ModelDef],
    *,
    only: frozenset[str] | None = None,
    options: dict[str, Any] | None = None,
) -> Results:
    """Solve and check one design page; return its results dict.

    A :class:`DocgenError` from elaboration propagates (the design cannot be solved at all);
    one from an analysis is recorded under ``errors`` and later analyses still run where they
    can, so a page shows what could be computed.  Any other exception from an analysis (a
    docgen bug) is recorded there too, as an error naming the analysis.
    """
    from docgen.elaborate import elaborate

    results: Results = {"schema": "docgen-results/1", "design": design_summary(design)}
    circuit = elaborate(design, library)
    ctx = Context(design, circuit, library, results, only, options or {})
    errors: list[dict[str, Any]] = []
    results["errors"] = errors  # visible while later analyses run (the checks cite failures)
    for name, target in ANALYSES:
        if only is not None and name not in only:
            continue
        func = _resolve(target)
        if func is None:
            continue
        try:
            section = func(ctx)
        except DocgenError as exc:
            errors.extend({"analysis": name, **d.to_json()} for d in exc.diagnostics)
            continue
        except Exception as exc:  # noqa: BLE001 - a bug in one analysis must not hide the rest
            errors.append(_crash(design, name, exc))
            continue
        if section is not None:
            results[name] = section
    results["errors"] = results.pop("errors")  # kept as the last key
    return results


def _crash(design: Design, name: str, exc: Exception) -> dict[str, Any]:
    """An error entry for an analysis that failed with an unexpected exception (a docgen bug)."""
    return {"analysis": name, "path": design.path, "line": 1, "col": 1, "severity": "error",
            "message": f"docgen failed in the '{name}' analysis: {type(exc).__name__}: {exc}",
            "hint": "this is a docgen bug; please report it with the design file"}


def design_summary(design: Design) -> dict[str, Any]:
    """The header facts every page and table shows."""
    h = design.header
    return {
        "path": design.path,
        "title": h.title,
        "status": h.status,
        "owner": h.owner,
        "reviewers": list(h.reviewers),
        "approved": h.approved,
        "tags": list(h.tags),
        "summary": h.summary,
        "replaced_by": h.replaced_by,
    }
