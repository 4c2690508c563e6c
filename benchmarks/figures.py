"""CPU per figure kind and per design for the design pages' figures, as drawn now and as drawn
before the figures were made cheap (a new matplotlib figure for every plot, the histograms
too).  The "before" rows use the same code inside ``docgen.plots.fresh_figures()`` with the
histograms drawn by matplotlib (``plots._histogram_figure``): byte for byte the old output.

    python benchmarks/figures.py [--repeats 3]

Designs: the demo record's (designs/) and one generated design (generate.design_text(7, 3)).
Results are solved once, outside the timing; only the page sections (figures and tables) are
timed.  A script, not a test: CI times nothing.
"""

from __future__ import annotations

import argparse
import collections
import sys
import tempfile
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager, nullcontext
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

KINDS = ("frequency_response", "curves", "waveform", "spectrum", "histogram", "drift")


def solved(folder: Path) -> list[tuple[Any, dict[str, Any]]]:
    """(design, rounded results) of every design under the demo record and a generated one."""
    from generate import design_text

    from docgen import pipeline
    from docgen.record import load_record
    from docgen.units import round_results

    (folder / "generated-7.md").write_text(design_text(7, 3), encoding="utf-8")
    out = []
    for root in (HERE.parent / "designs", folder):
        record = load_record(root)
        for design in record.designs:
            try:
                out.append((design, round_results(pipeline.run(design,
                                                                record.models_for(design)))))
            except Exception as exc:  # noqa: BLE001 - a design that fails is left out
                print(f"  {design.path}: not solved ({exc})")
    return out


@contextmanager
def counted(cpu: dict[str, float], calls: collections.Counter) -> Iterator[None]:
    """Add each plot function's CPU seconds and calls to ``cpu`` and ``calls``."""
    from docgen import plots

    originals = {name: getattr(plots, name) for name in KINDS}

    def wrap(name: str, function: Callable[..., str]) -> Callable[..., str]:
        def timed(*args: Any, **kwargs: Any) -> str:
            start = time.process_time()
            try:
                return function(*args, **kwargs)
            finally:
                cpu[name] += time.process_time() - start
                calls[name] += 1
        return timed

    for name, function in originals.items():
        setattr(plots, name, wrap(name, function))
    try:
        yield
    finally:
        for name, function in originals.items():
            setattr(plots, name, function)


@contextmanager
def as_before() -> Iterator[None]:
    """Every figure on a new matplotlib figure, the histograms drawn by matplotlib."""
    from docgen import plots

    direct = plots.histogram

    def histogram(samples: Any, *, unit: str, label: str, bins: int = 30, counts: Any = None,
                  edges: Any = None, marks: Any = ()) -> str:
        if counts is None or edges is None:
            import numpy as np

            counts, edges = np.histogram(np.asarray(samples, dtype=float), bins=bins)
        return plots._histogram_figure(counts, edges, unit=unit, label=label, marks=marks)

    plots.histogram = histogram
    try:
        with plots.fresh_figures():
            yield
    finally:
        plots.histogram = direct


def measure(designs: list[tuple[Any, dict[str, Any]]], repeats: int
            ) -> tuple[dict[str, float], collections.Counter, dict[str, float]]:
    """CPU per kind, calls per kind (both summed over ``repeats`` passes) and CPU per design
    (mean of the passes) of all its sections."""
    from docgen.site.sections import build_sections

    cpu: dict[str, float] = collections.defaultdict(float)
    calls: collections.Counter = collections.Counter()
    per_design: dict[str, float] = collections.defaultdict(float)
    with counted(cpu, calls):
        for _ in range(repeats):
            for design, results in designs:
                start = time.process_time()
                build_sections(design, results)
                per_design[Path(design.path).name] += (time.process_time() - start) / repeats
    return cpu, calls, per_design


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    from docgen.site.sections import build_sections

    with tempfile.TemporaryDirectory() as folder:
        designs = solved(Path(folder))
    for design, results in designs:  # imports and the kept figures, outside the timing
        build_sections(design, results)
        with as_before():
            build_sections(design, results)
    rows = {}
    for name, context in (("before", as_before), ("now", nullcontext)):
        with context():
            rows[name] = measure(designs, args.repeats)
    print(f"{len(designs)} designs, {args.repeats} passes; CPU ms per figure (calls per pass)")
    print(f"{'figure kind':20s} {'before':>10s} {'now':>10s}")
    for kind in KINDS:
        counts = rows["now"][1][kind]
        if counts:
            before = 1000 * rows["before"][0][kind] / rows["before"][1][kind]
            now = 1000 * rows["now"][0][kind] / counts
            print(f"{kind:20s} {before:10.1f} {now:10.1f}   ({counts // args.repeats})")
    print("CPU ms per design, all its sections (figures and tables)")
    for name, now in rows["now"][2].items():
        print(f"{name:32s} {1000 * rows['before'][2][name]:8.0f} {1000 * now:8.0f}")
    before, now = (sum(rows[k][2].values()) / len(designs) for k in ("before", "now"))
    print(f"{'mean':32s} {1000 * before:8.0f} {1000 * now:8.0f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
