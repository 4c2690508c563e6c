"""Speed of the spread batch against numpy's raw batched solver (printed; never a test).

Run: ``python -m docgen.solve.spread_benchmark [DESIGN] [SAMPLES]`` (default: the demo
common-emitter stage ``designs/hydrophone-preamp.md``, 10 000 samples), or call
:func:`benchmark` from the benchmark script.

Measured: draw every tolerance and model range (:mod:`docgen.solve.sampling`), solve the
operating point of all samples from the nominal point, linearise, and solve the gain at three
frequencies (a decade below, at and a decade above the signal) as one batched complex solve —
exactly the path :func:`docgen.solve.board_metrics.evaluate` takes.  The reference is
``numpy.linalg.solve`` alone on random well-conditioned systems of the same shapes: the real
``(S, M, M)`` system once per Newton iteration the batch needed, plus the complex
``(S, 3, K, K)`` one.  The ratio is docgen's time over numpy's: the price of assembling the
equations, limiting and bookkeeping.  Times are the best of ``repeats`` runs.
"""

from __future__ import annotations

import sys
import time
from typing import Any

import numpy as np

DEFAULT = "designs/hydrophone-preamp.md"


def _best(run: Any, repeats: int) -> tuple[float, Any]:
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = run()
        best = min(best, time.perf_counter() - start)
    return best, result


def _raw_numpy(samples: int, size: int, iterations: int, ac_size: int, frequencies: int,
               repeats: int) -> float:
    rng = np.random.default_rng(0)
    real = rng.standard_normal((samples, size, size)) + size * np.eye(size)
    rhs = rng.standard_normal((samples, size, 1))
    shape = (samples, frequencies, ac_size, ac_size)
    complex_matrix = (rng.standard_normal(shape) + 1j * rng.standard_normal(shape)
                      + ac_size * np.eye(ac_size))
    complex_rhs = np.ones((samples, frequencies, ac_size, 1), dtype=complex)

    def run() -> None:
        for _ in range(iterations):
            np.linalg.solve(real, rhs)
        np.linalg.solve(complex_matrix, complex_rhs)

    return _best(run, repeats)[0]


def benchmark(path: str = DEFAULT, samples: int = 10_000, repeats: int = 3) -> dict[str, float]:
    """Time the spread batch and numpy's raw solves; print both and the ratio; return them."""
    from docgen.elaborate import elaborate, variations
    from docgen.metrics import parse
    from docgen.record import load_record
    from docgen.solve import board_metrics, sampling
    from docgen.solve.operating_point import solve_op

    record = load_record(path, ["designs"])
    design = record.designs[0]
    circuit = elaborate(design, record.models_for(design))
    ports = (circuit.bench.input, circuit.bench.output)
    signal_hz = float(circuit.device(ports[0]).values["frequency"])
    metrics = [parse(f"gain at {f!r} Hz") for f in (signal_hz / 10, signal_hz, signal_hz * 10)]
    nominal = solve_op(circuit)
    varied = variations(circuit)

    def run() -> Any:
        overrides = sampling.draw(varied, samples, circuit.bench.seed,
                                  circuit.bench.distribution, design.path)
        return board_metrics.evaluate(circuit, metrics, overrides, ports=ports, start=nominal)

    ours, batch = _best(run, repeats)
    solution = batch.solution
    size = solution.problem.layout.size
    iterations = int(solution.dc.iterations.max())
    from docgen.solve.linearise import linearise

    ac_size = linearise(nominal).size
    raw = _raw_numpy(samples, size, iterations, ac_size, len(metrics), repeats)
    figures = {"samples": samples, "seconds": ours, "raw_numpy_seconds": raw,
               "ratio": ours / raw, "newton_iterations": iterations, "unknowns": size,
               "converged": int(batch.converged.sum())}
    print(f"{path}: {samples} samples, {len(varied)} varied values, {size} unknowns, "
          f"{iterations} Newton iterations, {figures['converged']} converged")
    print(f"  spread batch (draw + operating point + gain at 3 frequencies): {ours:.3f} s "
          f"({samples / ours:,.0f} samples/s)")
    print(f"  numpy raw batched solves, same shapes and iteration count:     {raw:.3f} s "
          f"({samples / raw:,.0f} samples/s)")
    print(f"  ratio docgen / numpy: {ours / raw:.2f}  (targets for 10 000 samples: under 1 s, "
          "ratio under 5)")
    return figures


if __name__ == "__main__":
    benchmark(*(sys.argv[1:2] or [DEFAULT]), *(int(a) for a in sys.argv[2:3]))
