"""Per-design analysis timings, measured inside one fresh process (``run.py --child stages``).

Pass 0 is *cold*: the first call in a new process, so it pays for importing the analysis and
for any first-use set-up.  Later passes are *warm*: a new pipeline context each time (nothing
solved is reused), modules already imported.  Stages timed, in pipeline order:

- ``op``, ``ac``, ``noise``: the pipeline's own sections (``ac`` builds the nominal
  small-signal network, which ``noise`` then shares, as in a real run);
- ``sweep 400``: the gain, input and output impedance at 400 log-spaced frequencies over the
  bench range on that network; its reference is ``numpy.linalg.solve`` alone on the same
  ``(400, K, K)`` complex systems (twice: the signal solve and the output-impedance probe);
- ``steady state``: the large-signal periodic steady state at the bench amplitude
  (:func:`docgen.solve.transient.bench_steady_state`);
- with ``--sections``: each further pipeline section as ``analyse`` computes it (``transient``
  with its swing search, ``feedback``, ``spread``, the checks).
"""

from __future__ import annotations

import time
from pathlib import Path
from typing import Any

import numpy as np

CHEAP = ("op", "ac", "noise", "sweep 400", "steady state")


def _sweep400(ctx: Any) -> tuple[Any, int]:
    from docgen.solve import curves
    from docgen.solve.linearise import nominal_network
    from docgen.solve.response import endpoints, port_curves

    bench = ctx.circuit.bench
    input_part, output_net = endpoints(ctx)
    freq = np.geomspace(bench.f_start, bench.f_stop, 400)
    network = nominal_network(ctx)
    return curves.magnitude_db(port_curves(network, freq, input_part, output_net)["gain"]), \
        network.size


def _raw_sweep(size: int, clock: Any, points: int = 400, repeats: int = 5) -> float:
    """Median seconds of numpy's solve of two ``(points, K, K)`` complex systems."""
    rng = np.random.default_rng(0)
    shape = (points, size, size)
    matrix = rng.standard_normal(shape) + 1j * rng.standard_normal(shape) + size * np.eye(size)
    rhs = np.ones((points, size, 1), dtype=complex)
    times = []
    for _ in range(repeats):
        start = clock()
        np.linalg.solve(matrix, rhs)
        np.linalg.solve(matrix, rhs)
        times.append(clock() - start)
    return float(np.median(times))


def _one_pass(design: Any, library: Any, sections: bool, clock: Any
              ) -> tuple[dict[str, float], int]:
    from docgen import pipeline
    from docgen.elaborate import elaborate

    results: dict[str, Any] = {"schema": "docgen-results/1",
                               "design": pipeline.design_summary(design), "errors": []}
    ctx = pipeline.Context(design, elaborate(design, library), library, results)
    times: dict[str, float] = {}
    size = 0

    def stage(name: str, run: Any) -> Any:
        start = clock()
        try:
            value = run()
        except Exception as exc:  # noqa: BLE001 - a failing stage is reported, not fatal
            times[name] = float("nan")
            results["errors"].append({"analysis": name, "message": str(exc)})
            return None
        times[name] = clock() - start
        return value

    for name, target in pipeline.ANALYSES:
        if name in ("op", "ac", "noise") or sections:
            # resolved inside the timing: a cold pass pays for importing the analysis
            section = stage(name, lambda target=target: pipeline._resolve(target)(ctx))
            if section is not None:
                results[name] = section
        if name == "noise":
            swept = stage("sweep 400", lambda: _sweep400(ctx))
            size = swept[1] if swept else size
            from docgen.solve.transient import bench_steady_state

            stage("steady state", lambda: bench_steady_state(ctx))
    return times, size


def measure(path: str, repeats: int, sections: bool, clock: str = "wall") -> dict[str, Any]:
    """Cold (pass 0) and warm (passes 1..) seconds per stage for the design at ``path``;
    ``clock`` is ``wall`` or ``cpu`` (this process's CPU time: steadier on a shared machine)."""
    from docgen.record import load_record

    record = load_record(path, [str(Path(path).parent)])  # library pages beside the design
    design = record.designs[0]
    library = record.models_for(design)
    timer = time.process_time if clock == "cpu" else time.perf_counter
    passes = [_one_pass(design, library, sections, timer) for _ in range(max(2, repeats))]
    size = passes[0][1]
    return {"cold": passes[0][0], "warm": [p[0] for p in passes[1:]],
            "raw sweep 400": _raw_sweep(size, timer) if size else None, "unknowns": size}
