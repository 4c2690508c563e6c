"""Nonlinear devices in normalised polarity: evaluation, derivatives and step limiting.

Each model builder binds a device's ``(S,)`` parameter arrays and temperature and returns
``evaluate(u) -> (f, df/du)``: the terminal currents ``f`` (S, T) of the n-type form and their
derivatives by the controlling voltages ``u`` (S, C), with ``u = polarity · P · v`` for the
terminal voltages ``v`` and the fixed projection ``P`` given here.  The stamping code in
:mod:`docgen.solve.mna` turns them into Newton companions; the operating-point figures and the
small-signal analyses reuse the same functions, so the equations exist once.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

import numpy as np

from docgen.solve import devices as physics

Array = np.ndarray
Evaluate = Callable[[Array], tuple[Array, Array]]
Limit = Callable[[Array, Array], Array]

POLARITY = {"npn": 1.0, "pnp": -1.0, "njfet": 1.0, "pjfet": -1.0, "nmos": 1.0, "pmos": -1.0}

DIODE_PROJECTION = np.array([[1.0, -1.0]])  # u = v_anode − v_cathode
BIPOLAR_PROJECTION = np.array([[0.0, 1.0, -1.0], [-1.0, 1.0, 0.0]])  # vBE, vBC from (c, b, e)
FET_PROJECTION = np.array([[0.0, 1.0, -1.0], [1.0, 0.0, -1.0]])  # vGS, vDS from (d, g, s)


def diode_model(values: Mapping[str, Array], temperature_k: Array) -> tuple[Evaluate, Limit]:
    """The diode's normalised evaluation ``u -> (f, df/du)`` and its limiting function."""
    n_vt = values["ideality"] * physics.thermal_voltage(temperature_k)
    i_sat = physics.saturation_current_at(values["saturation_current"], temperature_k,
                                          values["bandgap_energy"],
                                          values["saturation_current_exponent"],
                                          values["ideality"])
    v_crit = physics.critical_voltage(i_sat, n_vt)

    def evaluate(u: Array) -> tuple[Array, Array]:
        i, g = physics.diode(u[:, 0], i_sat, n_vt, values["breakdown_voltage"])
        return np.stack([i, -i], -1), np.stack([g, -g], -1)[:, :, None]

    breakdown = values["breakdown_voltage"][:, None]
    finite = np.isfinite(breakdown)
    knee_crit = physics.critical_voltage(physics.BREAKDOWN_KNEE_CURRENT, n_vt)[:, None]

    def limit(u_new: Array, u_old: Array) -> Array:
        forward = physics.limit_junction(u_new, u_old, n_vt[:, None], v_crit[:, None])
        if not finite.any():
            return forward
        # the breakdown branch is the same exponential mirrored about −BV: limit it alike
        offset = np.where(finite, breakdown, 0.0)
        mirrored = -offset - physics.limit_junction(-(u_new + offset), -(u_old + offset),
                                                    n_vt[:, None], knee_crit)
        return np.where(finite & (u_new < -offset + knee_crit), mirrored, forward)

    return evaluate, limit


def bipolar_model(values: Mapping[str, Array], temperature_k: Array) -> tuple[Evaluate, Limit]:
    """The bipolar transistor's normalised evaluation ``u=(vBE, vBC) -> (f, df/du)``."""
    vt = physics.thermal_voltage(temperature_k)
    n_vt = values["ideality"] * vt
    i_sat = physics.saturation_current_at(values["saturation_current"], temperature_k,
                                          values["bandgap_energy"],
                                          values["saturation_current_exponent"],
                                          values["ideality"])
    beta_f = physics.beta_at(values["beta"], temperature_k, values["beta_temperature_exponent"])
    beta_r = physics.beta_at(values["beta_reverse"], temperature_k,
                             values["beta_temperature_exponent"])
    v_crit = physics.critical_voltage(i_sat, n_vt)

    def evaluate(u: Array) -> tuple[Array, Array]:
        r = physics.bipolar(u[:, 0], u[:, 1], i_sat, beta_f, beta_r, values["early_voltage"],
                            n_vt)
        return np.stack([r.ic, r.ib, r.ie], -1), r.jacobian

    def limit(u_new: Array, u_old: Array) -> Array:
        return physics.limit_junction(u_new, u_old, n_vt[:, None], v_crit[:, None])

    return evaluate, limit


def fet_model(kind: str, values: Mapping[str, Array]) -> Evaluate:
    """The FET's normalised evaluation ``u=(vGS, vDS) -> (f, df/du)`` (square law)."""
    if kind in ("njfet", "pjfet"):
        vp = values["pinch_off_voltage"]
        k, vth = values["drain_saturation_current"] / vp**2, -vp
    else:
        k, vth = values["transconductance_coefficient"], values["threshold_voltage"]
    lam = values["channel_length_modulation"]

    def evaluate(u: Array) -> tuple[Array, Array]:
        r = physics.square_law(u[:, 0], u[:, 1], k, vth, lam)
        zero = np.zeros_like(r.current)
        current = np.stack([r.current, zero, -r.current], -1)
        d_dgs = np.stack([r.gm, zero, -r.gm], -1)
        d_dds = np.stack([r.gds, zero, -r.gds], -1)
        return current, np.stack([d_dgs, d_dds], -1)

    return evaluate


def fet_threshold(kind: str, values: Mapping[str, Array]) -> Array:
    """The square law's threshold in normalised polarity (−|VP| for a JFET, |VT| for a MOSFET)."""
    if kind in ("njfet", "pjfet"):
        return -values["pinch_off_voltage"]
    return values["threshold_voltage"]


def opamp_residual(values: Mapping[str, Array], x_local: Array, source_scale: Array | float,
                   vd_at: Array | None = None) -> tuple[Array, Array]:
    """The op-amp's equations at ``x_local`` = (in+, in−, out, v+, v−, output current).

    Rows: currents leaving each pin's net into the op-amp, then the output branch equation
    ``v_out − E + Ro·i_out = 0``.  Input bias currents flow into the inputs and leave through
    v−; the quiescent current flows v+ → v−; the output current comes from v+ when sourcing and
    goes to v− when sinking.  Returns the residual ``(S, 6)`` and its Jacobian ``(S, 6, 6)``.
    With ``vd_at`` the output stage is linearised at that differential input instead of the
    one in ``x_local`` (the solver's limiting of the output stage).
    """
    vin_p, vin_n, vout, vpos, vneg, iout = (x_local[:, i] for i in range(6))
    bias_p = values["input_bias_current"] + values["input_offset_current"] / 2.0
    bias_n = values["input_bias_current"] - values["input_offset_current"] / 2.0
    quiescent = values["supply_current"] * source_scale
    vd = vin_p - vin_n + values["input_offset_voltage"] * source_scale
    at = vd if vd_at is None else vd_at
    e = physics.opamp_output(at, vpos, vneg, values["open_loop_gain"], values["output_headroom"])
    output = e.voltage + e.d_dvd * (vd - at)
    sourcing = iout > 0
    residual = np.stack([
        bias_p * source_scale, bias_n * source_scale, -iout,
        quiescent + np.where(sourcing, iout, 0.0),
        -(quiescent + np.where(sourcing, 0.0, -iout) + (bias_p + bias_n) * source_scale),
        vout - output + values["output_resistance"] * iout,
    ], -1)
    jac = np.zeros(x_local.shape + (6,))
    jac[:, 2, 5] = -1.0
    jac[:, 3, 5] = np.where(sourcing, 1.0, 0.0)
    jac[:, 4, 5] = np.where(sourcing, 0.0, 1.0)
    jac[:, 5, 0], jac[:, 5, 1] = -e.d_dvd, e.d_dvd
    jac[:, 5, 2], jac[:, 5, 3], jac[:, 5, 4] = 1.0, -e.d_dvpos, -e.d_dvneg
    jac[:, 5, 5] = values["output_resistance"]
    return residual, jac


def limit_opamp(values: Mapping[str, Array], x_local: Array, vd_new: Array, vd_old: Array
                ) -> Array:
    """Keep a Newton step from throwing the op-amp's output stage deep into its limit.

    A step that would take the output stage beyond the edge of its linear range is first
    linearised just inside that edge, where the stage has its full gain; only a second step
    the same way (from that edge) may go on into the limit.  A comparator that really
    saturates gets there in two steps, while a feedback stage does not bounce rail to rail.
    """
    gain = values["open_loop_gain"]
    inset = 4.0 * physics.OUTPUT_KNEE
    high = x_local[:, 3] - values["output_headroom"] - inset
    low = x_local[:, 4] + values["output_headroom"] + inset
    y_new, y_old = gain * vd_new, gain * vd_old
    sensible = high > low  # rails not yet established (first iteration from 0 V): no limit
    tiny = 1e-6 * inset
    above = sensible & (y_new > high) & (y_old < high - tiny)
    below = sensible & (y_new < low) & (y_old > low + tiny)
    return np.where(above, high / gain, np.where(below, low / gain, vd_new))
