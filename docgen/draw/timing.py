"""Speed figures for the schematic drawer (called by ``benchmarks/draw.py``, never by tests)."""

from __future__ import annotations

import time
from collections.abc import Iterable
from pathlib import Path


def draw_timings(paths: Iterable[str | Path], repeats: int = 3) -> list[dict[str, object]]:
    """For each design file: the best of ``repeats`` times (seconds) of the whole job
    (``draw`` and its SVG, including any layout tried and set aside) and of each stage of the
    layout finally used (lay out and wire, build the drawing, read it back, write the SVG)."""
    from docgen.draw import draw, layout, readback
    from docgen.draw.hints import read_hints
    from docgen.draw.render import to_drawing, to_svg
    from docgen.reader import read_file

    rows = []
    for path in paths:
        design = read_file(str(path))
        if not design.parts:
            continue
        best: dict[str, float] = {}
        style = "amplifier"
        for _ in range(repeats):
            start = time.perf_counter()
            schematic = draw(design)  # the whole job, as the site runs it
            schematic.svg()
            total = time.perf_counter() - start
            style = schematic.placement.style
            start = time.perf_counter()
            placement = layout(design, hints=read_hints(design), style=style)
            laid = time.perf_counter()
            drawing = to_drawing(placement)
            built = time.perf_counter()
            readback.check(design, drawing)
            checked = time.perf_counter()
            to_svg(drawing)
            written = time.perf_counter()
            for key, value in (("layout", laid - start), ("drawing", built - laid),
                               ("read-back", checked - built), ("svg", written - checked),
                               ("total", total)):
                best[key] = min(best.get(key, value), value)
        rows.append({"design": Path(path).stem, "parts": len(design.parts), "layout used": style,
                     **best})
    return rows


def print_draw_timings(paths: Iterable[str | Path]) -> None:
    """Print :func:`draw_timings` as an aligned table in milliseconds."""
    rows = draw_timings(paths)
    print(f"{'design':<28} {'parts':>5}  {'layout':>7} {'drawing':>7} {'read-back':>9} "
          f"{'svg':>6} {'total':>7}  layout used")
    for row in rows:
        ms = {k: f"{1000 * float(row[k]):.0f}" for k in
              ("layout", "drawing", "read-back", "svg", "total")}
        print(f"{row['design']:<28} {row['parts']:>5}  {ms['layout']:>7} {ms['drawing']:>7} "
              f"{ms['read-back']:>9} {ms['svg']:>6} {ms['total']:>7}  {row['layout used']}")
