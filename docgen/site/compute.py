"""The slow part of a build, for one design: solve, check, plot, draw → a cacheable bundle.

Runs in worker processes (:class:`concurrent.futures.ProcessPoolExecutor`).  Each worker loads
the record once (:func:`init_worker`), because designs hold read-only mappings that do not
pickle; tasks then name a design by its path.  A failure of any kind in one design becomes
diagnostics in its bundle and never stops the others.
"""

from __future__ import annotations

import json
import traceback
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from docgen.design import Design, ModelDef
from docgen.diagnostics import DocgenError

_WORKER: dict[str, Any] = {}


def _internal_error(design: Design, stage: str, exc: BaseException) -> dict[str, Any]:
    last = traceback.extract_tb(exc.__traceback__)[-1:] if exc.__traceback__ else []
    where = f" ({last[0].filename.rsplit('/', 1)[-1]}:{last[0].lineno})" if last else ""
    return {"path": design.path, "line": 1, "col": 1, "severity": "error",
            "message": f"docgen failed while {stage}: {type(exc).__name__}: {exc}{where}",
            "hint": "this is a docgen bug; please report it with the design file"}


def results_text(results: dict[str, Any]) -> str:
    """The published ``results.json``: sorted keys, one-space indent, UTF-8 text."""
    return json.dumps(results, sort_keys=True, indent=1, ensure_ascii=False) + "\n"


def compute_bundle(design: Design, library: Mapping[str, ModelDef]) -> dict[str, Any]:
    """Results, page sections (with figures) and schematic for one design."""
    from docgen import pipeline
    from docgen.site.sections import build_sections
    from docgen.units import round_results

    bundle: dict[str, Any] = {"path": design.path, "results": None, "errors": [],
                              "sections": [], "schematic": None, "schematic_problem": None}
    try:
        results = round_results(pipeline.run(design, library))
    except DocgenError as exc:
        bundle["errors"] = [d.to_json() for d in exc.diagnostics]
        results = None
    except Exception as exc:  # noqa: BLE001 - one design's crash must not stop the build
        bundle["errors"] = [_internal_error(design, "solving", exc)]
        bundle["internal_error"] = True
        results = None
    bundle["results"] = results
    if results is not None:
        # the published text is made once and cached with the bundle: a no-change rebuild
        # then copies it instead of re-encoding (indented JSON is the slow encoder)
        bundle["results_json"] = results_text(results)
        try:
            bundle["sections"] = build_sections(design, results)
        except Exception as exc:  # noqa: BLE001
            bundle["errors"].append(_internal_error(design, "plotting", exc))
            bundle["internal_error"] = True
    _draw(design, results, bundle)
    return bundle


def _draw(design: Design, results: dict[str, Any] | None, bundle: dict[str, Any]) -> None:
    try:
        from docgen.draw import draw_svg
    except ImportError:
        bundle["schematic_problem"] = "the schematic drawer is not part of this build"
        return
    nets = ((results or {}).get("op") or {}).get("nets")
    try:
        bundle["schematic"] = draw_svg(design, op_voltages=nets if isinstance(nets, dict)
                                       else None)
        bundle["schematic_with_op"] = isinstance(nets, dict)
    except DocgenError as exc:
        bundle["schematic_problem"] = "; ".join(d.message for d in exc.diagnostics)
    except Exception as exc:  # noqa: BLE001
        bundle["schematic_problem"] = f"docgen could not draw it ({type(exc).__name__}: {exc})"
        bundle["internal_error"] = True


def init_worker(designs_dir: str) -> None:
    """Process-pool initialiser: load the record once per worker."""
    from docgen.site.record_view import read_record

    _WORKER["record"] = read_record(Path(designs_dir))


def compute_in_worker(source_rel: str) -> tuple[str, dict[str, Any]]:
    """Task for the pool: the bundle of the design at ``source_rel``."""
    view = _WORKER["record"]
    entry = view.entries[source_rel]
    return source_rel, compute_bundle(entry.design, view.models_for(entry.design))
