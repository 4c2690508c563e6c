"""Time for the bench sine's steady state of each demo design (prints; never asserts).

:func:`benchmark` is what ``benchmarks/transient.py`` runs: for each design page in a folder it
solves the operating point and small-signal network (not timed), then times
:func:`docgen.solve.transient.bench_steady_state` (the bench amplitude alone) and the whole
``transient`` section (with the swing search), and prints steps, periods and the rule used.
"""

from __future__ import annotations

import time
from pathlib import Path

DEFAULT = "designs"


def benchmark(folder: str = DEFAULT) -> list[dict[str, object]]:
    """Print and return one row per design: seconds for the bench sine and the full section."""
    from docgen import pipeline
    from docgen.elaborate import elaborate
    from docgen.record import load_record
    from docgen.solve import transient

    record = load_record(Path(folder))
    rows: list[dict[str, object]] = []
    print(f"{'design':32} {'bench s':>8} {'steps':>6} {'periods':>7} {'rule':>12} "
          f"{'section s':>9}")
    for page in record.designs:
        if page.kind != "design":
            continue
        models = record.models_for(page)
        results = pipeline.run(page, models, only=frozenset({"op", "ac", "noise"}))
        if results["errors"] or "ac" not in results:
            print(f"{Path(page.path).name:32} (no small-signal solution)")
            continue
        ctx = pipeline.Context(page, elaborate(page, models), models, results)
        started = time.perf_counter()
        run = transient.bench_steady_state(ctx)
        bench = time.perf_counter() - started
        started = time.perf_counter()
        transient.analyse(ctx)
        section = time.perf_counter() - started
        row = {"design": Path(page.path).name, "bench_s": bench, "steps": run.steps,
               "periods": run.periods, "method": run.method, "section_s": section}
        rows.append(row)
        print(f"{row['design']:32} {bench:8.3f} {run.steps:6d} {run.periods:7d} "
              f"{run.method:>12} {section:9.3f}")
    return rows
