"""Noise: every source of the circuit transferred to the output, summed in power (``noise``).

Public API::

    sources = noise_sources(network, freq)   # list[NoiseSource], each (S, K) pattern, (S, F) PSD
    out = output_noise(network, freq, output_net, sources)  # (S, F) V²/Hz per source, stacked
    analyse(ctx) -> dict                     # the ``noise`` section

Sources (one-sided power spectral densities, formulas in :mod:`docgen.solve.spectra`), all at
the bench temperature:

- every resistor: thermal 4kT/R as a current across it; the signal's ``source=`` resistance,
  a supply's internal resistance and an inductor's winding resistance as a thermal voltage 4kTR
  in their branch; the bench load is noiseless (DEVELOPERS.md);
- bipolar: collector shot 2q·IC (c–e), base shot 2q·IB·(1 + fc/f) (inner base–e, fc the model's
  ``flicker_corner``), thermal noise of the base resistance;
- diodes: shot 2q·I across the junction (with the same 1/f corner), thermal noise of the series
  resistance;
- FETs: channel noise 8kT·gm/3·(1 + fc/f) in saturation, 4kT·gds in the triode region (d–s);
- op-amps: input voltage noise en²·(1 + fc/f) in series with the input pair, and input current
  noise in² from each input to ground (uncorrelated; the model's ``flicker_corner`` applies to
  the voltage noise only, as docgen.params documents).

Each source is a right-hand side pattern of the small-signal network; one adjoint solve per
frequency (all frequencies batched) gives the output's sensitivity to every row, so every source
costs one dot product.  Sources are uncorrelated and add in power.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.elaborate import Device
from docgen.solve import mna, phasor, spectra
from docgen.solve.curves import log_sweep
from docgen.solve.linearise import SmallSignal, nominal_network, opamp_gain_at
from docgen.solve.operating_point import part_quantities
from docgen.solve.response import endpoints, singular, sweep, transfer

Array = np.ndarray


@dataclass(frozen=True)
class NoiseSource:
    """One uncorrelated noise source.

    :param part: the part it belongs to.
    :param mechanism: what makes it (``thermal``, ``collector shot`` ...).
    :param pattern: ``(S, K)`` right-hand side of unit amplitude (current into a node row,
        voltage on a branch row).
    :param psd: ``(S, F)`` its power spectral density (A²/Hz or V²/Hz to match the pattern).
    """

    part: str
    mechanism: str
    pattern: Array
    psd: Array


class _Builder:
    """Collects the sources of one network on one frequency grid."""

    def __init__(self, network: SmallSignal, freq: Array):
        self.network, self.freq = network, np.asarray(freq, dtype=float)
        self.problem = network.solution.problem
        self.kelvin = self.problem.temperature_k[:, None]  # (S, 1)
        self.sources: list[NoiseSource] = []

    def local(self, device: Device) -> tuple[int, ...]:
        return self.problem.layout.local[device.name]

    def add(self, device: Device, mechanism: str, rows: dict[int, Array | float],
            psd: Array) -> None:
        """A source with network ``rows`` → coefficient (never the solver's ground slot)."""
        pattern = np.zeros((self.network.samples, self.network.size))
        for row, coefficient in rows.items():
            pattern[:, row] += coefficient
        psd = np.broadcast_to(psd, (self.network.samples, len(self.freq)))
        self.sources.append(NoiseSource(device.name, mechanism, pattern, psd))

    def across(self, device: Device, mechanism: str, a: int, b: int, psd: Array) -> None:
        """A current source between local unknowns ``a`` and ``b``."""
        ground = self.problem.layout.size
        rows = {k: v for k, v in ((a, 1.0), (b, -1.0)) if k != ground}
        if a == b:
            return  # both ends on one net: no current flows
        self.add(device, mechanism, rows, psd)

    def thermal(self, device: Device, mechanism: str, a: int, b: int, resistance: Array) -> None:
        """Thermal current 4kT/R between ``a`` and ``b`` (skipped where R is zero)."""
        safe = np.where(resistance > 0, resistance, np.inf)[:, None]
        self.across(device, mechanism, a, b, spectra.thermal_current_psd(safe, self.kelvin))

    def flicker(self, corner: Array) -> Array:
        return spectra.flicker_factor(self.freq[None, :], corner[:, None])


def _resistor(b: _Builder, device: Device) -> None:
    if device.bench:
        return  # the bench load is noiseless by convention
    resistance = mna.resistance_at(b.problem.values[device.name], b.problem.temperature_c)
    b.thermal(device, "thermal", *b.local(device)[:2], resistance)


def _branch_resistance(b: _Builder, device: Device) -> None:
    key = {"signal": "source", "supply": "resistance", "inductor": "resistance"}[device.kind]
    resistance = b.problem.values[device.name][key]
    if np.all(resistance <= 0):
        return
    what = {"signal": "thermal (source resistance)", "supply": "thermal (internal resistance)",
            "inductor": "thermal (winding resistance)"}[device.kind]
    psd = 4.0 * spectra.BOLTZMANN * b.kelvin * resistance[:, None]
    b.add(device, what, {b.local(device)[2]: 1.0}, psd)


def _bipolar(b: _Builder, device: Device) -> None:
    local, values = b.local(device), b.problem.values[device.name]
    collector, base, emitter = local[:3]
    inner = local[3] if len(local) == 4 else base
    figures = part_quantities(b.network.solution, device.name)
    b.across(device, "collector shot", collector, emitter,
             spectra.shot_current_psd(figures["ic_a"])[:, None])
    base_shot = spectra.shot_current_psd(figures["ib_a"])[:, None]
    b.across(device, "base shot", inner, emitter,
             base_shot * b.flicker(values["flicker_corner"]))
    if inner != base:
        b.thermal(device, "base resistance thermal", base, inner, values["base_resistance"])


def _diode(b: _Builder, device: Device) -> None:
    local, values = b.local(device), b.problem.values[device.name]
    junction = local[2] if len(local) == 3 else local[0]
    current = b.network.solution.currents[device.name][:, 0]
    b.across(device, "shot", junction, local[1],
             spectra.shot_current_psd(current)[:, None] * b.flicker(values["flicker_corner"]))
    if junction != local[0]:
        b.thermal(device, "series resistance thermal", local[0], junction,
                  values["series_resistance"])


def _fet(b: _Builder, device: Device) -> None:
    drain, _, source = b.local(device)[:3]
    values = b.problem.values[device.name]
    figures = part_quantities(b.network.solution, device.name)
    saturated = (figures["region"] == "saturation")[:, None]
    channel = np.where(saturated,
                       spectra.channel_current_psd(figures["gm_s"][:, None], b.kelvin),
                       4.0 * spectra.BOLTZMANN * b.kelvin * figures["gds_s"][:, None])
    b.across(device, "channel", drain, source, channel * b.flicker(values["flicker_corner"]))


def _opamp(b: _Builder, device: Device) -> None:
    values = b.problem.values[device.name]
    in_p, in_n = b.local(device)[:2]
    en = values["voltage_noise_density"][:, None]
    if np.any(en > 0):
        gain = opamp_gain_at(b.network.solution, device.name).d_dvd
        b.add(device, "input voltage noise", {b.network.pole_row(device.name): gain},
              en**2 * b.flicker(values["flicker_corner"]))
    current = values["current_noise_density"][:, None] ** 2
    if np.any(current > 0):
        ground = b.problem.layout.size
        for pin, name in ((in_p, "in+"), (in_n, "in−")):
            b.across(device, f"input current noise ({name})", pin, ground, current)


_SOURCES = {
    "resistor": _resistor,
    "signal": _branch_resistance,
    "supply": _branch_resistance,
    "inductor": _branch_resistance,
    "npn": _bipolar,
    "pnp": _bipolar,
    "diode": _diode,
    "njfet": _fet,
    "pjfet": _fet,
    "nmos": _fet,
    "pmos": _fet,
    "opamp": _opamp,
}


def noise_sources(network: SmallSignal, freq: Array) -> list[NoiseSource]:
    """Every noise source of the network on the grid ``freq`` (circuit order, then mechanism)."""
    builder = _Builder(network, freq)
    for device in network.solution.circuit.devices:
        make = _SOURCES.get(device.kind)
        if make is not None:
            make(builder, device)
    return builder.sources


def output_noise(
    network: SmallSignal, freq: Array, output_net: str, sources: list[NoiseSource]
) -> Array:
    """Each source's output noise PSD in V²/Hz, stacked: ``(len(sources), S, F)``."""
    probe = network.unit(network.row(output_net))
    sensitivity = phasor.adjoint(network.G, network.C, np.asarray(freq, dtype=float), probe)
    if not sources:
        return np.zeros((0, network.samples, len(freq)))
    patterns = np.stack([s.pattern for s in sources])  # (P, S, K)
    gains = np.einsum("sfk,psk->psf", sensitivity, patterns)
    return np.abs(gains) ** 2 * np.stack([s.psd for s in sources])


def noise_band(bench: Any) -> tuple[float, float]:
    """The integration band: the bench's ``noise band``, else the response sweep."""
    if bench.noise_band is not None:
        return float(bench.noise_band[0]), float(bench.noise_band[1])
    return float(bench.f_start), float(bench.f_stop)


def _number(value: float) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def _figures(
    freq: Array, total: Array, source_power: Array, kelvin: float, signal_rms: float,
    gain_at_signal: float, source_resistance: float,
) -> dict[str, Any]:
    """SNR and noise figure from the output noise (per source already summed)."""
    out: dict[str, Any] = {}
    output_rms = float(spectra.rms(freq, total))
    out["output_rms_v"] = _number(output_rms)
    snr = spectra.snr_db(signal_rms * gain_at_signal, output_rms)
    out["snr_db"] = snr
    out["snr_reason"] = None if snr is not None else "no signal or no noise at the output"
    source_band = float(spectra.integrate_band(freq, source_power))
    figure = spectra.noise_figure_db(float(spectra.integrate_band(freq, total)), source_band,
                                     kelvin)
    out["figure_db"] = figure
    if figure is not None:
        out["figure_reason"] = None
    elif source_resistance <= 0:
        out["figure_reason"] = ("the signal has no source resistance (source=0 Ω), so there is "
                                "no source noise to compare with: the noise figure is undefined")
    else:
        out["figure_reason"] = ("none of the source resistance's noise reaches the output, so "
                                "the noise figure is undefined")
    return out


def _spot_figure(network: SmallSignal, freq_hz: float, input_part: str, output_net: str
                 ) -> float | None:
    """The IEEE spot noise figure at one frequency (per-hertz powers instead of band powers)."""
    freq = np.array([freq_hz])
    sources = noise_sources(network, freq)
    per_source = output_noise(network, freq, output_net, sources)[:, 0, 0]
    source = sum(p for s, p in zip(sources, per_source, strict=True) if s.part == input_part)
    return spectra.noise_figure_db(float(per_source.sum()), float(source),
                                   float(network.solution.problem.temperature_k[0]))


def noise_grid(bench: Any) -> tuple[Array, slice]:
    """The noise grid and the slice of it that is the band.

    Inside the band: the band's own log-spaced grid (its ends are grid points); outside it, the
    response sweep's points, so densities are reported wherever the response is.
    """
    low, high = noise_band(bench)
    band = log_sweep(low, high, bench.points_per_decade)
    response_grid = sweep(bench)
    below = response_grid[response_grid < low * (1 - 1e-9)]
    above = response_grid[response_grid > high * (1 + 1e-9)]
    return np.concatenate([below, band, above]), slice(len(below), len(below) + len(band))


def analyse(ctx: Any) -> dict[str, Any]:
    """The ``noise`` section for the nominal design (see docs/results.md)."""
    input_part, output_net = endpoints(ctx)
    network = nominal_network(ctx)
    bench = ctx.circuit.bench
    freq, band = noise_grid(bench)
    sources = noise_sources(network, freq)
    try:
        per_source = output_noise(network, freq, output_net, sources)[:, 0]  # (P, F), sample 0
    except np.linalg.LinAlgError as exc:
        raise singular(ctx, input_part) from exc
    total = per_source.sum(axis=0)
    gain = np.abs(transfer(network, freq, input_part, output_net)[0])
    with np.errstate(divide="ignore", invalid="ignore"):
        input_density = np.sqrt(total) / gain
    signal = network.solution.problem.values[input_part]
    signal_rms = float(signal["value"][0]) / math.sqrt(2.0)
    gain_at_signal = float(np.abs(transfer(network, np.array([float(signal["frequency"][0])]),
                                           input_part, output_net)[0, 0]))
    is_source = np.array([s.part == input_part for s in sources], dtype=bool)
    source_power = per_source[is_source].sum(axis=0) if is_source.any() else np.zeros_like(total)
    in_band = freq[band]
    input_rms = float(spectra.rms(in_band, input_density[band] ** 2))
    powers = {(s.part, s.mechanism): float(spectra.integrate_band(in_band, p[band]))
              for s, p in zip(sources, per_source, strict=True)}
    return {
        "freq_hz": [float(f) for f in freq],
        "band_hz": list(noise_band(bench)),
        "figure_at_signal_db": _spot_figure(network, float(signal["frequency"][0]), input_part,
                                            output_net),
        "temperature_c": float(network.solution.problem.temperature_c[0]),
        "output_density_v_per_rthz": [float(v) for v in np.sqrt(total)],
        "input_density_v_per_rthz": [_number(v) for v in input_density],
        "input_rms_v": _number(input_rms),
        "input_rms_reason": None if math.isfinite(input_rms) else (
            "the gain is zero somewhere in the band, so the input-referred noise is unbounded"),
        "signal_rms_v": signal_rms,
        **_figures(in_band, total[band], source_power[band],
                   float(network.solution.problem.temperature_k[0]), signal_rms, gain_at_signal,
                   float(signal["source"][0])),
        "contributors": [c for c in spectra.rank_contributors(powers) if c["share"] > 0],
    }
