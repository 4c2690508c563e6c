"""Timing helpers for ``benchmarks/run.py``: medians, child processes, the machine line."""

from __future__ import annotations

import json
import os
import platform
import resource
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent


def _spin(seconds: float) -> int:
    """Count loop turns for ``seconds`` (a CPU-bound probe)."""
    end, turns = time.perf_counter() + seconds, 0
    while time.perf_counter() < end:
        turns += 1
    return turns


def parallel_capacity(seconds: float = 0.5) -> float:
    """How many cores' worth of work two busy processes get, against one (2.0 on two idle
    cores; near 1.0 when other work holds a core): what ``--jobs 2`` can gain right now."""
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(2) as pool:
        one = pool.submit(_spin, seconds).result()
        two = sum(pool.map(_spin, [seconds, seconds]))
    return two / one


def machine() -> str:
    """Cores, Python, numpy and scipy versions, and the load at the start."""
    import numpy
    import scipy

    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    return (f"machine: {os.cpu_count()} cores ({platform.machine()}), Python "
            f"{platform.python_version()}, numpy {numpy.__version__}, scipy {scipy.__version__}, "
            f"load average {load:.1f} at start, parallel capacity x{parallel_capacity():.2f} "
            f"(two busy processes against one)")


def median(values: Sequence[float]) -> float:
    """The median, or NaN for no values."""
    return statistics.median(values) if values else float("nan")


def timed(run: Callable[[], Any]) -> tuple[float, float, Any]:
    """Wall and CPU seconds of one call (CPU of this process only), and its result."""
    wall, cpu = time.perf_counter(), time.process_time()
    result = run()
    return time.perf_counter() - wall, time.process_time() - cpu, result


#: where a frozen copy of docgen lives for this run (see :func:`freeze_code`), if any
FROZEN: dict[str, str] = {}


def freeze_code(folder: Path) -> None:
    """Copy the docgen package as it is now into ``folder`` and run every later command with
    it.  Others edit the shared working tree while a long run goes on, and the site cache's key
    covers docgen's own files: without a frozen copy, a "no-change" rebuild would solve again."""
    import compileall
    import shutil

    import docgen

    source = Path(docgen.__file__).resolve().parent
    shutil.copytree(source, folder / "docgen", ignore=shutil.ignore_patterns("__pycache__"))
    # compiled as an installed package is (pip compiles on install); without it, a shell with
    # PYTHONDONTWRITEBYTECODE set would compile docgen's modules in every timed process
    compileall.compile_dir(folder / "docgen", quiet=1)
    FROZEN["PYTHONPATH"] = str(folder)


def docgen_command(*args: str) -> list[str]:
    """A ``docgen`` command line (the frozen copy when there is one)."""
    return [sys.executable, "-c", "import sys; from docgen.cli import main; sys.exit(main())",
            *args]


def command(args: Sequence[str], cwd: Path | str | None = None) -> tuple[float, float, str]:
    """Run a command in a fresh process: wall seconds, CPU seconds of it and its children
    (user + system), and its stdout.  Raise with its stderr when it exits above 1 (exit 1 is a
    failing requirement, which a benchmark record may well have)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(list(args), cwd=cwd, capture_output=True, text=True,
                          env={**os.environ, **FROZEN})
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode > 1:
        raise RuntimeError(f"{' '.join(args)} exited {done.returncode}:\n{done.stderr[-2000:]}")
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, done.stdout


def child(*args: str, cwd: Path | str | None = None) -> dict[str, Any]:
    """Run ``benchmarks/run.py --child ARGS`` in a fresh process; return the JSON it prints."""
    _, _, out = command([sys.executable, str(HERE / "run.py"), "--child", *args], cwd=cwd)
    return json.loads(out.strip().splitlines()[-1])
