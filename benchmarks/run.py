"""docgen's speed: one table of medians, cold and warm, with references and targets.

Run: ``python benchmarks/run.py`` from the repository root (a full run takes long: the
generated 200-design record is built cold twice); ``--quick`` for a run of about a minute
(two demo designs, fewer repeats, a small generated record); ``--only`` to pick parts
(``analyses spread draw site generated check``).  Never run by CI; nothing here asserts a time.

*Cold* means a fresh process (and an empty cache where there is one); *warm* means the same
work again with modules imported (or, for builds, the cache filled).  Every figure is the
median over ``--repeats`` runs unless the row says otherwise; ``cpu`` columns are user +
system seconds of the process and its children, which matter when the machine is shared.
See DEVELOPERS.md "Benchmarks" for what each row measures and the figures on the team machine.
"""

from __future__ import annotations

import argparse
import json
import shutil
import sys
import tempfile
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent))

import measure  # noqa: E402 - benchmarks/ is not a package
from measure import child, command, docgen_command, median  # noqa: E402

PARTS = ("analyses", "spread", "draw", "site", "generated", "check")
REPO = Path(__file__).resolve().parent.parent
SPREAD_DESIGN = "designs/hydrophone-preamp.md"


class Table:
    """Rows of (part, item, cold, warm, reference, target) printed as they come."""

    def __init__(self) -> None:
        print(f"{'part':<10} {'item':<46} {'cold':>9} {'warm':>9} {'reference':>11}  target / note")

    def row(self, part: str, item: str, cold: float | None, warm: float | None,
            reference: str = "", note: str = "") -> None:
        """Print one row; seconds are printed with a unit that fits."""
        print(f"{part:<10} {item[:46]:<46} {_seconds(cold):>9} {_seconds(warm):>9} "
              f"{reference:>11}  {note}", flush=True)


def _seconds(value: float | None) -> str:
    if value is None or value != value:
        return "-"
    return f"{value * 1e3:.1f} ms" if value < 1 else f"{value:.2f} s"


def demo_designs(quick: bool) -> list[str]:
    """The demo designs with a circuit (two in a quick run)."""
    paths = sorted(str(p.relative_to(REPO)) for p in (REPO / "designs").glob("*.md")
                   if "```circuit" in p.read_text(encoding="utf-8"))
    return [p for p in paths if "preamp" in p][:2] if quick else paths


# -- analyses ---------------------------------------------------------------------------------


def bench_analyses(table: Table, args: argparse.Namespace) -> None:
    """Operating point, response, noise, 400-point sweep, steady state per demo design."""
    for path in demo_designs(args.quick):
        runs = [child("stages", path, str(args.repeats), str(int(args.sections)), args.clock,
                      cwd=REPO)
                for _ in range(args.cold_repeats)]
        names = list(runs[0]["cold"])
        for name in names:
            cold = median([r["cold"][name] for r in runs])
            warm = median([w[name] for r in runs for w in r["warm"]])
            reference = ""
            if name == "sweep 400" and runs[0]["raw sweep 400"]:
                raw = median([r["raw sweep 400"] for r in runs])
                reference = f"{_seconds(raw)} np"
            table.row("analyses", f"{Path(path).stem}: {name}", cold, warm, reference,
                      f"{runs[0]['unknowns']} unknowns" if name == "sweep 400" else "")


# -- tolerance batch --------------------------------------------------------------------------


def bench_spread(table: Table, args: argparse.Namespace) -> None:
    """Samples per second at 1k/10k/100k against numpy's raw batched solves."""
    sizes = (1000, 10_000) if args.quick else (1000, 10_000, 100_000)
    for samples in sizes:
        runs = [child("spread", SPREAD_DESIGN, str(samples), str(args.repeats), cwd=REPO)
                for _ in range(1 if samples > 10_000 else args.cold_repeats)]
        cold = median([r["cold"]["seconds"] for r in runs])
        warm = median([w["seconds"] for r in runs for w in r["warm"]])
        raw = median([w["raw_numpy_seconds"] for r in runs for w in r["warm"]])
        target = " (targets < 1 s, ratio < 5)" if samples == 10_000 else ""
        table.row("spread", f"{samples} samples: {samples / warm:,.0f} samples/s warm", cold,
                  warm, f"{_seconds(raw)} np",
                  f"ratio {warm / raw:.1f}, {runs[0]['cold']['newton_iterations']} Newton "
                  f"iterations, {runs[0]['cold']['unknowns']} unknowns{target}")


# -- drawing ----------------------------------------------------------------------------------


def bench_draw(table: Table, args: argparse.Namespace) -> None:
    """Schematic layout and drawing (layout, symbols, read-back, SVG) per demo design."""
    paths = demo_designs(args.quick)
    runs = [child("draw", str(args.repeats), *paths, cwd=REPO) for _ in range(args.cold_repeats)]
    for index, path in enumerate(paths):
        first = runs[0]["cold"][index]
        cold = median([r["cold"][index]["total"] for r in runs])
        warm = median([w[index]["total"] for r in runs for w in r["warm"]])
        table.row("draw", f"{Path(path).stem} ({first['parts']} parts)", cold, warm, "",
                  f"layout {_seconds(median([w[index]['layout'] for w in runs[0]['warm']]))}"
                  f", {first['layout used']}")


# -- site builds ------------------------------------------------------------------------------


def _build(designs: Path, work: Path, jobs: int) -> tuple[float, float, str]:
    return command(docgen_command("build", str(designs), "--out", str(work / "site"), "--cache",
                                  str(work / "cache"), "--jobs", str(jobs), "--quiet"),
                   cwd=designs.parent)


def _first_design(designs: Path) -> Path:
    return sorted(p for p in designs.glob("*.md") if "```circuit" in p.read_text())[0]


def _touch_one(designs: Path, round_number: int) -> None:
    """Add a sentence to the first design's notes (a one-design change the solve never reads:
    the bundle is reused, the page is rendered again)."""
    first = _first_design(designs)
    first.write_text(first.read_text() + f"\nBenchmark edit {round_number}.\n")


def _nudge_one(designs: Path, round_number: int) -> str:
    """Move the first resistor of the first design to its E24 neighbour, up on even rounds and
    back down on odd ones (a one-design change that is solved, plotted and drawn again)."""
    from docgen.site.benchmark import nudge_value

    return nudge_value(_first_design(designs), up=round_number % 2 == 0)


def build_rows(table: Table, label: str, designs: Path, work: Path, jobs: int,
               repeats: int) -> dict[str, float]:
    """Cold, no-change and one-design builds of ``designs`` (each a fresh ``docgen build``):
    one-design twice, after an edit of the notes and after a value change."""
    names = ("cold", "no-change", "notes", "value")
    figures: dict[str, list[tuple[float, float]]] = {name: [] for name in names}
    nudged = ""
    for attempt in range(repeats):
        for folder in ("site", "cache"):
            shutil.rmtree(work / folder, ignore_errors=True)
        figures["cold"].append(_build(designs, work, jobs)[:2])
        figures["no-change"].append(_build(designs, work, jobs)[:2])
        _touch_one(designs, attempt)
        figures["notes"].append(_build(designs, work, jobs)[:2])
        nudged = _nudge_one(designs, attempt)
        figures["value"].append(_build(designs, work, jobs)[:2])
    medians = {k: median([w for w, _ in v]) for k, v in figures.items()}
    cpu = {k: median([c for _, c in v]) for k, v in figures.items()}
    table.row("site", f"{label} --jobs {jobs}: cold build", medians["cold"], None, "",
              f"cpu {cpu['cold']:.1f} s")
    table.row("site", f"{label} --jobs {jobs}: no-change rebuild", None, medians["no-change"],
              "", f"cpu {cpu['no-change']:.2f} s (target < 1 s on the demo record)")
    table.row("site", f"{label} --jobs {jobs}: one-design rebuild, notes", None,
              medians["notes"], "", f"cpu {cpu['notes']:.2f} s (target < 3 s on the demo "
              "record; a sentence added: bundle reused)")
    table.row("site", f"{label} --jobs {jobs}: one-design rebuild, a value", None,
              medians["value"], "", f"cpu {cpu['value']:.2f} s (target < 3 s on the demo "
              f"record; {nudged}: solved again)")
    return medians


def bench_site(table: Table, args: argparse.Namespace) -> None:
    """The demo record (the scripted demo repository with its history)."""
    from docgen.demo_repo import make_demo_repo

    with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
        repo = make_demo_repo(Path(folder) / "demo")
        for jobs in (2,) if args.quick else (1, 2):
            build_rows(table, "demo", repo / "designs", Path(folder), jobs,
                       1 if args.quick else args.repeats)


def bench_generated(table: Table, args: argparse.Namespace) -> None:
    """A generated record of distinct designs with revisions in git, at two sizes."""
    from generate import make_record

    if args.scaling:
        bench_scaling(table, args)
        return
    count, revisions = args.designs, args.revisions
    sizes = [count] if args.quick else sorted({max(1, count // 4), count})
    cold: dict[tuple[int, int], float] = {}
    for size in sizes:
        for jobs in (1, 2) if size == count and not args.quick else (2,):
            with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
                designs = make_record(Path(folder) / "record", size, revisions)
                label = f"{size} generated x {revisions} revisions"
                cold[size, jobs] = build_rows(table, label, designs, Path(folder), jobs, 1)["cold"]
    if len(sizes) == 2:
        small, big = sizes
        table.row("site", f"scaling {small} -> {big} designs, --jobs 2", None, None, "",
                  f"cold time x{cold[big, 2] / cold[small, 2]:.2f} for x{big / small:.0f} "
                  f"designs (linear: x{big / small:.0f}); target < 5 min at 200 with 2 jobs")
    if (count, 1) in cold and (count, 2) in cold:
        table.row("site", f"cores: {count} designs --jobs 1 / --jobs 2", None, None, "",
                  f"speed-up x{cold[count, 1] / cold[count, 2]:.2f}")


def bench_scaling(table: Table, args: argparse.Namespace) -> None:
    """Cold builds only, at each ``--scaling`` size with ``--jobs 1`` and ``--jobs 2``: wall,
    CPU and CPU per design revision, each size against the smallest (near-linear is the
    target), and the 200-design figure extrapolated from the largest size's CPU."""
    from generate import make_record

    revisions = args.revisions
    first: dict[int, tuple[int, float, float]] = {}
    for size in sorted(args.scaling):
        for jobs in (1, 2):
            with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
                designs = make_record(Path(folder) / "record", size, revisions)
                wall, cpu, _ = _build(designs, Path(folder), jobs)
            base_size, base_wall, base_cpu = first.setdefault(jobs, (size, wall, cpu))
            per = cpu / (size * revisions)
            table.row("site", f"{size} generated x {revisions} --jobs {jobs}: cold", wall,
                      None, "", f"cpu {cpu:.1f} s, {per:.3f} s cpu per design revision; "
                      f"x{wall / base_wall:.2f} wall, x{cpu / base_cpu:.2f} cpu for "
                      f"x{size / base_size:g} designs; 200 designs at this rate: "
                      f"{per * 200 * revisions / 60:.1f} cpu-min")


# -- docgen check -----------------------------------------------------------------------------


def bench_check(table: Table, args: argparse.Namespace) -> None:
    """``docgen check`` on the demo record, process start included (the pre-commit path)."""
    from docgen.demo_repo import make_demo_repo

    repeats = 1 if args.quick else args.repeats
    with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
        repo = make_demo_repo(Path(folder) / "demo")
        # cold: every design solved (no gate cache); warm: nothing changed since the last check
        cold = [command(docgen_command("check", "--no-cache"), cwd=repo) for _ in range(repeats)]
        command(docgen_command("check"), cwd=repo)  # fills the gate cache
        warm = [command(docgen_command("check"), cwd=repo) for _ in range(repeats)]
        start = [command([sys.executable, "-c", "import docgen.cli"], cwd=repo)
                 for _ in range(args.repeats)]
    table.row("check", "docgen check (demo record, end to end)", median([w for w, _, _ in cold]),
              median([w for w, _, _ in warm]), "",
              f"cpu {median([c for _, c, _ in cold]):.2f} s cold, "
              f"{median([c for _, c, _ in warm]):.2f} s warm (target < 2 s)")
    table.row("check", "  of which: python + import docgen.cli", median([w for w, _, _ in start]),
              None, "", f"cpu {median([c for _, c, _ in start]):.2f} s")


# -- child processes (cold figures) -----------------------------------------------------------


def run_child(argv: list[str]) -> None:
    """The work of one fresh process; prints one JSON line for the parent."""
    kind, rest = argv[0], argv[1:]
    if kind == "stages":
        import stages

        out: Any = stages.measure(rest[0], int(rest[1]), bool(int(rest[2])), rest[3])
    elif kind == "spread":
        out = _spread_child(rest[0], int(rest[1]), int(rest[2]))
    elif kind == "draw":
        from docgen.draw.timing import draw_timings

        passes = [draw_timings(rest[1:], repeats=1) for _ in range(max(2, int(rest[0])))]
        out = {"cold": passes[0], "warm": passes[1:]}
    else:
        raise SystemExit(f"unknown child {kind}")
    print(json.dumps(out))


def _spread_child(path: str, samples: int, repeats: int) -> dict[str, Any]:
    import contextlib
    import io

    from docgen.solve.spread_benchmark import benchmark

    with contextlib.redirect_stdout(io.StringIO()):  # the table prints the figures instead
        passes = [benchmark(path, samples, repeats=1) for _ in range(max(2, repeats))]
    return {"cold": passes[0], "warm": passes[1:]}


def parse(argv: list[str] | None) -> argparse.Namespace:
    """The script's options."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true",
                        help="a short run: two designs, 3 repeats, 1k/10k samples, builds once "
                        "with --jobs 2 only, a generated record of 2 designs x 2 revisions")
    parser.add_argument("--only", nargs="+", choices=PARTS, default=None, metavar="PART",
                        help=f"run only these parts ({', '.join(PARTS)})")
    parser.add_argument("--repeats", type=int, default=None, help="runs per median (5; quick 3)")
    parser.add_argument("--designs", type=int, default=None,
                        help="designs in the generated record (200; quick 2)")
    parser.add_argument("--revisions", type=int, default=None,
                        help="revisions of each generated design (10; quick 2)")
    parser.add_argument("--scaling", type=int, nargs="+", default=None, metavar="DESIGNS",
                        help="the generated part builds only cold, at each of these design "
                        "counts (with --revisions each) and --jobs 1 and 2, to show scaling")
    parser.add_argument("--sections", action="store_true",
                        help="also time every further pipeline section per design (transient "
                        "with its swing search, feedback, spread, checks)")
    parser.add_argument("--clock", choices=("wall", "cpu"), default="wall",
                        help="what the analyses rows measure: wall time (default) or the "
                        "process's CPU time, steadier when the machine is shared")
    args = parser.parse_args(argv)
    args.repeats = args.repeats or (3 if args.quick else 5)
    args.cold_repeats = 2 if args.quick else 3
    args.designs = args.designs or (2 if args.quick else 200)
    args.revisions = args.revisions or (2 if args.quick else 10)
    return args


def main(argv: list[str] | None = None) -> int:
    """Print the machine, then the table part by part."""
    if argv is None and sys.argv[1:2] == ["--child"]:
        run_child(sys.argv[2:])
        return 0
    args = parse(argv)
    print(measure.machine(), flush=True)
    frozen = tempfile.TemporaryDirectory(prefix="docgen-bench-code-")
    measure.freeze_code(Path(frozen.name))
    print("docgen: a copy of the working tree's docgen/ taken at the start (others may edit it)")
    print(f"analyses rows: {args.clock} seconds; builds and check: wall, with CPU in the note")
    table = Table()
    benches = {"analyses": bench_analyses, "spread": bench_spread, "draw": bench_draw,
               "site": bench_site, "generated": bench_generated, "check": bench_check}
    for part in args.only or PARTS:
        benches[part](table, args)
    return 0


if __name__ == "__main__":
    sys.exit(main())
