"""Reading a frequency response: midband, −3 dB corners, unity-gain frequency, anchored phase.

Pure numpy/scipy functions over a log-spaced sweep; they know nothing about circuits.  Each
corner is first bracketed between two sweep points and then narrowed on successively finer grids
(in log-frequency) of a callable that re-evaluates the response at any frequency, so the answer
does not depend on the sweep density.  Without a callable the crossing is interpolated linearly
in (log f, dB) between the sweep points.

Conventions (DEVELOPERS.md "Shared decisions"):

- midband gain is the largest |H| over the sweep;
- a corner is where the gain is 3.01 dB (a factor √2) below midband;
- a corner outside the sweep, or one that cannot be measured honestly, is ``None`` with a reason;
- the midband is *flat* when the gain stays within 1 dB of its largest value over at least one
  octave (docgen's own criterion).  If it is not flat and the largest value sits at a sweep edge,
  the gain is still changing there and the corners are not reported (the reason says to widen the
  sweep); an interior peak that is not flat (a resonance) still gives corners 3.01 dB below the
  peak, with a note;
- the unity-gain frequency is the first frequency above midband where the gain falls through
  0 dB;
- phase is unwrapped over the sweep and shifted by whole turns so that the phase at midband lies
  in (−180°, 180°].
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from docgen.units import format_eng

#: 20·log10(√2): the "−3 dB" drop in exact form.
CORNER_DROP_DB = 20.0 * math.log10(math.sqrt(2.0))
#: a midband is flat when the gain stays within this many dB of its maximum ...
FLAT_WITHIN_DB = 1.0
#: ... over at least this frequency ratio (one octave).
FLAT_SPAN_RATIO = 2.0

#: a gain peaking at 0 dB within this margin (a passive network) has no unity-gain frequency.
UNITY_MARGIN_DB = 1e-6

#: the reason given for every figure of a response that is zero over the whole sweep.
NO_TRANSFER = "no signal reaches the output: the gain is zero over the whole sweep"

#: grid points per refinement round of a crossing or a peak, ...
REFINE_POINTS = 17
#: ... the most rounds, ...
REFINE_ROUNDS = 12
#: ... and the bracket width (decades) at which refinement stops (≈ 2e-10 relative in f).
REFINE_WIDTH = 1e-10

GainFunction = Callable[[np.ndarray], np.ndarray]


@dataclass(frozen=True, slots=True)
class Midband:
    """The midband of a response.

    :param index: sweep index of the largest gain.
    :param gain_db: that gain.
    :param freq_hz: its frequency.
    :param flat: whether the gain stays within 1 dB of it over at least an octave.
    :param at_edge: ``"start"``/``"stop"`` if the largest gain is the first/last sweep point.
    :param note: a sentence for the reader when the midband is not flat, else ``None``.
    """

    index: int
    gain_db: float
    freq_hz: float
    flat: bool
    at_edge: str | None
    note: str | None


def magnitude_db(transfer: np.ndarray) -> np.ndarray:
    """20·log10|H|, with −inf where H is exactly zero (no warning)."""
    magnitude = np.abs(np.asarray(transfer))
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(magnitude)


def anchored_phase_deg(transfer: np.ndarray, anchor_index: int) -> np.ndarray:
    """Unwrapped phase in degrees, shifted by whole turns so that ``phase[anchor_index]`` lies
    in (−180°, 180°]."""
    phase = np.degrees(np.unwrap(np.angle(np.asarray(transfer))))
    anchor = phase[anchor_index]
    turns = math.ceil((anchor - 180.0) / 360.0)
    # ceil keeps exactly +180° and moves exactly −180° up to +180°.
    return phase - 360.0 * turns


def find_midband(
    freq: np.ndarray, gain_db: np.ndarray, evaluate_db: GainFunction | None = None
) -> Midband:
    """The largest gain of the sweep, whether it is flat, and a note when it is not.

    With ``evaluate_db`` an interior maximum is refined between its neighbours (finer grids in
    log-frequency), so a sharp resonance is not under-read by a coarse sweep.
    """
    index = int(np.argmax(gain_db))
    peak, peak_freq = float(gain_db[index]), float(freq[index])
    if evaluate_db is not None and 0 < index < len(freq) - 1:
        peak_freq, peak = _refine_peak(freq[index - 1], freq[index + 1], evaluate_db, peak_freq,
                                       peak)
    near = gain_db >= peak - FLAT_WITHIN_DB
    low, high = index, index
    while low > 0 and near[low - 1]:
        low -= 1
    while high < len(freq) - 1 and near[high + 1]:
        high += 1
    flat = freq[high] / freq[low] >= FLAT_SPAN_RATIO
    at_edge = "start" if index == 0 else "stop" if index == len(freq) - 1 else None
    note = None
    if not flat and at_edge is not None:
        trend = "falling" if at_edge == "start" else "rising"
        note = (f"no flat midband in the sweep: the gain is still {trend} at the sweep {at_edge}; "
                "the midband figure is the gain there (widen the sweep)")
    elif not flat:
        peak_text = format_eng(peak_freq, "Hz", 4)
        note = (f"no flat midband: the gain peaks at {peak_text} and stays within "
                f"{FLAT_WITHIN_DB:g} dB of the peak for less than an octave; corners are measured "
                "3.01 dB below the peak")
    return Midband(index, peak, peak_freq, bool(flat), at_edge, note)


def _grid(log_a: float, log_b: float) -> np.ndarray:
    return np.linspace(log_a, log_b, REFINE_POINTS)


def _refine_peak(
    f_below: float, f_above: float, evaluate_db: GainFunction, f_sweep: float, g_sweep: float
) -> tuple[float, float]:
    """The maximum of the gain between two frequencies (never below the sweep's own value).

    Each round evaluates a grid across the bracket in one batched call and keeps the two grid
    steps around its best point, until the bracket is narrower than :data:`REFINE_WIDTH`.
    """
    best_f, best_g = f_sweep, g_sweep
    log_a, log_b = math.log10(f_below), math.log10(f_above)
    for _ in range(REFINE_ROUNDS):
        grid = _grid(log_a, log_b)
        gains = np.asarray(evaluate_db(10.0**grid), dtype=float)
        k = int(np.argmax(gains))
        if gains[k] > best_g:
            best_f, best_g = float(10.0 ** grid[k]), float(gains[k])
        log_a, log_b = grid[max(k - 1, 0)], grid[min(k + 1, REFINE_POINTS - 1)]
        if log_b - log_a < REFINE_WIDTH:
            break
    return best_f, best_g


def crossing(
    f_below: float,
    f_above: float,
    level_db: float,
    gain_below_db: float,
    gain_above_db: float,
    evaluate_db: GainFunction | None = None,
) -> float:
    """The frequency between two sweep points where the gain equals ``level_db``.

    The two points must bracket the level.  With ``evaluate_db`` (gain in dB at an array of
    frequencies) the bracket is narrowed on successively finer log-spaced grids (one batched
    evaluation per round, a factor 16 narrower each time) to :data:`REFINE_WIDTH`; the crossing
    is then interpolated linearly in (log f, dB) inside the final bracket.
    """
    log_a, log_b = math.log10(f_below), math.log10(f_above)
    gain_a, gain_b = gain_below_db, gain_above_db
    if evaluate_db is not None:
        for _ in range(REFINE_ROUNDS):
            if log_b - log_a < REFINE_WIDTH:
                break
            grid = _grid(log_a, log_b)
            gains = np.asarray(evaluate_db(10.0**grid), dtype=float)
            side = gains >= level_db
            flips = np.flatnonzero(side[1:] != side[:-1])
            if not len(flips):  # the level is not crossed on this grid: keep what we have
                break
            k = int(flips[0])
            log_a, log_b, gain_a, gain_b = grid[k], grid[k + 1], gains[k], gains[k + 1]
    fraction = (level_db - gain_a) / (gain_b - gain_a)
    if not math.isfinite(fraction):
        fraction = 0.5
    return 10.0 ** (log_a + min(max(fraction, 0.0), 1.0) * (log_b - log_a))


def _walk(gain_db: np.ndarray, start: int, step: int, level_db: float) -> int | None:
    """First index from ``start`` in direction ``step`` whose gain is below ``level_db``."""
    index = start
    while 0 <= index + step < len(gain_db):
        index += step
        if gain_db[index] < level_db:
            return index
    return None


def find_corner(
    freq: np.ndarray,
    gain_db: np.ndarray,
    midband: Midband,
    side: str,
    evaluate_db: GainFunction | None = None,
    dc_gain_db: float | None = None,
) -> tuple[float | None, str | None]:
    """The low (``side="low"``) or high (``side="high"``) −3.01 dB corner, or ``None`` and why.

    ``dc_gain_db`` (the gain at 0 Hz, ``None`` if unknown) lets a missing low corner be told
    apart: a direct-coupled stage keeps its gain down to DC.
    """
    if not math.isfinite(midband.gain_db):
        return None, NO_TRANSFER
    edge = "start" if side == "low" else "stop"
    if not midband.flat and midband.at_edge is not None and midband.at_edge != edge:
        return None, ("not measured: the gain is still changing at the sweep "
                      f"{midband.at_edge}, so the midband is not known; widen the sweep")
    level = midband.gain_db - CORNER_DROP_DB
    step = -1 if side == "low" else 1
    index = _walk(gain_db, midband.index, step, level)
    if index is None:
        if side == "low" and dc_gain_db is not None and dc_gain_db >= level:
            return None, (f"no low corner: the stage is direct-coupled (gain at DC "
                          f"{format_eng(dc_gain_db, 'dB')}, within 3.01 dB of midband)")
        limit = freq[0] if side == "low" else freq[-1]
        where = "below the sweep start" if side == "low" else "above the sweep stop"
        limit_text = format_eng(limit, "Hz", 4)
        return None, f"{where} ({limit_text}): the gain stays within 3.01 dB of midband there"
    return _bracketed(freq, gain_db, midband, index, index - step, level, evaluate_db), None


def _bracketed(freq: np.ndarray, gain_db: np.ndarray, midband: Midband, outer: int, inner: int,
               level: float, evaluate_db: GainFunction | None) -> float:
    """The crossing of ``level`` between sweep points ``outer`` (below it) and ``inner``.

    When ``inner`` is the midband point, its refined peak stands in for it: a sharp peak may lie
    between sweep points, above a level its sweep neighbours never reach.
    """
    f_inner, g_inner = freq[inner], gain_db[inner]
    if inner == midband.index:
        f_inner, g_inner = midband.freq_hz, midband.gain_db
    if f_inner < freq[outer]:
        return crossing(f_inner, freq[outer], level, g_inner, gain_db[outer], evaluate_db)
    return crossing(freq[outer], f_inner, level, gain_db[outer], g_inner, evaluate_db)


def find_unity_gain(
    freq: np.ndarray,
    gain_db: np.ndarray,
    midband: Midband,
    evaluate_db: GainFunction | None = None,
) -> tuple[float | None, str | None]:
    """The first frequency above midband where the gain falls through 0 dB, or ``None`` and why."""
    if not math.isfinite(midband.gain_db):
        return None, NO_TRANSFER
    if midband.gain_db <= UNITY_MARGIN_DB:
        midband_text = format_eng(midband.gain_db, "dB")
        return None, f"the gain never rises above 0 dB (midband {midband_text})"
    index = _walk(gain_db, midband.index, 1, 0.0)
    if index is None:
        stop_text = format_eng(freq[-1], "Hz", 4)
        return None, f"above the sweep stop ({stop_text}): the gain is still above 0 dB"
    return _bracketed(freq, gain_db, midband, index, index - 1, 0.0, evaluate_db), None


def log_sweep(f_start: float, f_stop: float, points_per_decade: int) -> np.ndarray:
    """Log-spaced frequencies from ``f_start`` to ``f_stop`` inclusive, ``points_per_decade``
    per decade (at least two points)."""
    decades = math.log10(f_stop / f_start)
    count = max(2, int(math.ceil(decades * points_per_decade - 1e-9)) + 1)
    freq = np.logspace(math.log10(f_start), math.log10(f_stop), count)
    freq[0], freq[-1] = f_start, f_stop  # exactly the ends asked for, not 10**log10(f)
    return freq
