"""The slow part of a build, for one design: solve, check, plot, draw → a cacheable bundle.

Runs in worker processes (:class:`concurrent.futures.ProcessPoolExecutor`).  Each worker loads
the record once (:func:`init_worker`), because designs hold read-only mappings that do not
pickle; tasks then name a design by its path.  A failure of any kind in one design becomes
diagnostics in its bundle and never stops the others.
"""

from __future__ import annotations

import contextlib
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


def compute_bundle(design: Design, library: Mapping[str, ModelDef],
                   helper: bool = False) -> dict[str, Any]:
    """Results, page sections (with figures) and schematic for one design.

    :param helper: draw the schematic in a second (forked) process while this one plots: a
        build that solves one design has a core to spare, and in a fresh process the
        schematic (0.35-0.5 s with its first-use costs) is nearly as long as all the figures.
        The bundle is the same.
    """
    from docgen import pipeline
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
    if results is None:
        _draw(design, results, bundle)
        return bundle
    # the published text is made once and cached with the bundle: a no-change rebuild then
    # copies it instead of re-encoding (indented JSON is the slow encoder)
    bundle["results_json"] = results_text(results)
    if helper and _with_helper(design, results, bundle):
        return bundle
    _plot(design, results, bundle, builders())
    _draw(design, results, bundle)
    return bundle


def builders() -> list[Any]:
    """The page's section builders in page order (:data:`docgen.site.sections.BUILDERS`)."""
    from docgen.site import more_sections, spread_sections  # noqa: F401 - register builders
    from docgen.site.sections import BUILDERS

    return list(BUILDERS)


def _plot(design: Design, results: dict[str, Any], bundle: dict[str, Any],
          chosen: list[Any]) -> None:
    """``bundle["sections"]`` from the builders ``chosen``; a crash becomes an error entry."""
    try:
        bundle["sections"] = [s for builder in chosen if (s := builder(design, results))
                              is not None]
    except Exception as exc:  # noqa: BLE001
        bundle["errors"].append(_internal_error(design, "plotting", exc))
        bundle["internal_error"] = True


def _helper_work() -> dict[str, Any]:
    """In the forked helper: the schematic's fields of the bundle."""
    design, results = _WORKER["helper"]
    part: dict[str, Any] = {"schematic": None, "schematic_problem": None}
    _draw(design, results, part)
    return part


def _preload() -> None:
    """Import the plotting and drawing libraries (before forking, so the helper has them)."""
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot  # noqa: F401

    with contextlib.suppress(ImportError):  # a build without the drawer says so on the page
        import docgen.draw  # noqa: F401


def _with_helper(design: Design, results: dict[str, Any], bundle: dict[str, Any]) -> bool:
    """Draw the schematic in a forked helper while this process plots (see
    :func:`compute_bundle`); ``False`` if no helper could be had (nothing done then)."""
    import multiprocessing
    import sys
    from concurrent.futures import ProcessPoolExecutor
    from concurrent.futures.process import BrokenProcessPool

    if not sys.platform.startswith("linux"):
        return False  # the helper inherits the design by forking (it does not pickle)
    _preload()
    _WORKER["helper"] = (design, results)
    try:
        with ProcessPoolExecutor(1, mp_context=multiprocessing.get_context("fork")) as pool:
            future = pool.submit(_helper_work)
            _plot(design, results, bundle, builders())
            bundle.update(future.result())
    except (OSError, BrokenProcessPool):
        bundle["sections"], bundle["errors"] = [], []  # as before: the caller does it all
        bundle.pop("internal_error", None)
        return False
    finally:
        _WORKER.pop("helper", None)
    return True


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
