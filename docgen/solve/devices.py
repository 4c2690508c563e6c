"""Device equations with a leading batch axis: currents and their derivatives.

Every function takes parameters and voltages as numpy arrays shaped ``(S,)`` (one value per
sample; scalars broadcast) and returns arrays of the same leading shape.  Voltages and currents
are in *normalised polarity*: the n-type form of each device (npn, n-channel).  The p-type
device is the same equations with every terminal voltage and current negated; the stamping code
in :mod:`docgen.solve.mna` applies that sign, so nothing here is written twice.

Published models (their names kept):

- Shockley diode equation with emission coefficient, plus an optional reverse breakdown
  branch; the ohmic series resistance is an internal node added by the stamping code.
- Ebers–Moll transport form for bipolar transistors, with forward and reverse current gain and
  the forward Early effect applied to the transport current (Sedra & Smith, *Microelectronic
  Circuits*: ``iC = IS·exp(vBE/VT)·(1 + vCE/VA)`` in the active region).
- Shichman–Hodges square law for JFETs and enhancement MOSFETs with channel-length modulation.
- Temperature: ``VT = kT/q`` (scipy.constants), saturation current with the bandgap and
  exponent of T, current gain as a power of T.

The derivatives returned here are the small-signal conductances at the operating point; the
small-signal analyses reuse them (``bipolar`` gives gm, gπ and go directly).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from docgen.solve.physical import BOLTZMANN, ELEMENTARY_CHARGE, ZERO_CELSIUS

#: Reference temperature of model parameters (25 °C), in kelvin.
T_REFERENCE = ZERO_CELSIUS + 25.0

#: Conductance across every junction and channel, so a device in cut-off never leaves a node
#: without a path (common practice in nodal solvers; 1 pS changes no result a bench can see).
JUNCTION_GMIN = 1e-12

#: Above this exponent the exponential continues as a straight line (no overflow, still
#: monotonic and smooth to first order); e^80 A/A is far beyond any real junction.
EXP_LIMIT = 80.0

#: Current at the breakdown voltage of a diode's reverse breakdown branch.
BREAKDOWN_KNEE_CURRENT = 1e-3

#: Width of the smooth op-amp output limit (softplus knee), in volts.
OUTPUT_KNEE = 0.02

Array = np.ndarray


def thermal_voltage(temperature_k: Array | float) -> Array:
    """VT = kT/q in volts (Boltzmann constant and elementary charge, exact in the SI)."""
    return np.asarray(temperature_k, dtype=float) * BOLTZMANN / ELEMENTARY_CHARGE


def saturation_current_at(
    saturation_current: Array | float,
    temperature_k: Array | float,
    bandgap_ev: Array | float,
    exponent: Array | float,
    ideality: Array | float,
) -> Array:
    """Saturation current at ``temperature_k`` from its value at 25 °C.

    IS(T) = IS·(T/T0)^(XTI/n)·exp((Eg/(n·VT))·(T/T0 − 1)), the usual junction form (Gray,
    Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated Circuits*, from memory).
    """
    ratio = np.asarray(temperature_k, dtype=float) / T_REFERENCE
    n_vt = np.asarray(ideality) * thermal_voltage(temperature_k)
    return (
        np.asarray(saturation_current)
        * ratio ** (np.asarray(exponent) / np.asarray(ideality))
        * np.exp(np.asarray(bandgap_ev) / n_vt * (ratio - 1.0))
    )


def beta_at(beta: Array | float, temperature_k: Array | float, exponent: Array | float) -> Array:
    """Current gain at ``temperature_k``: β·(T/T0)^exponent."""
    return np.asarray(beta) * (np.asarray(temperature_k, dtype=float) / T_REFERENCE) ** exponent


def limited_exp(x: Array) -> tuple[Array, Array]:
    """exp(x) and its derivative, continued as a straight line above :data:`EXP_LIMIT`."""
    x = np.asarray(x, dtype=float)
    clipped = np.minimum(x, EXP_LIMIT)
    value = np.exp(clipped)
    over = x > EXP_LIMIT
    return np.where(over, value * (1.0 + x - EXP_LIMIT), value), value


def junction(v: Array, saturation_current: Array, n_vt: Array) -> tuple[Array, Array]:
    """Shockley equation I = IS·(exp(v/(n·VT)) − 1): current and conductance dI/dv."""
    e, de = limited_exp(v / n_vt)
    return saturation_current * (e - 1.0), saturation_current * de / n_vt


def critical_voltage(saturation_current: Array, n_vt: Array) -> Array:
    """The junction voltage above which limiting starts: n·VT·ln(n·VT/(√2·IS))."""
    return n_vt * np.log(n_vt / (np.sqrt(2.0) * saturation_current))


def limit_junction(v_new: Array, v_old: Array, n_vt: Array, v_critical: Array) -> Array:
    """Logarithmic junction-voltage limiting between Newton iterations.

    Above the critical voltage a forward step larger than 2·n·VT is replaced by the step that
    changes the junction *current* linearly — the classic damping of the exponential that keeps
    Newton from overshooting into overflow.  Steps below the critical voltage pass unchanged.
    """
    big_step = (v_new > v_critical) & (np.abs(v_new - v_old) > 2.0 * n_vt)
    if not big_step.any():  # the usual case near convergence (and every time step)
        return v_new
    from_forward = 1.0 + (v_new - v_old) / n_vt
    safe_arg = np.where(from_forward > 0, from_forward, 1.0)
    stepped = np.where(from_forward > 0, v_old + n_vt * np.log(safe_arg), v_critical)
    from_reverse = n_vt * np.log(np.maximum(v_new / n_vt, 1e-300))
    limited = np.where(v_old > 0, stepped, from_reverse)
    return np.where(big_step, limited, v_new)


def limit_channel(u_new: Array, u_old: Array, threshold: Array) -> Array:
    """Damp Newton steps of a FET's (vGS, vDS) so the square law is entered gradually.

    A gate step is at most 1 V plus the present overdrive, and a channel that was off turns on
    at most 0.5 V past threshold in one step; a drain step is at most 1 V plus the present
    |vDS|, and a sign reversal of vDS stops at 0.5 V the other way.  Steps inside those
    bounds pass unchanged, so the converged point is the true one.
    """
    vgs_new, vds_new = u_new[..., 0], u_new[..., 1]
    vgs_old, vds_old = u_old[..., 0], u_old[..., 1]
    overdrive = vgs_old - threshold
    gate_room = 1.0 + np.abs(overdrive)
    vgs = np.clip(vgs_new, vgs_old - gate_room, vgs_old + gate_room)
    turning_on = (overdrive <= 0) & (vgs > threshold + 0.5)
    vgs = np.where(turning_on, np.maximum(threshold + 0.5, vgs_old), vgs)
    drain_room = 1.0 + np.abs(vds_old)
    vds = np.clip(vds_new, vds_old - drain_room, vds_old + drain_room)
    reversed_ = (np.sign(vds) * np.sign(vds_old) < 0) & (np.abs(vds) > 0.5)
    vds = np.where(reversed_, 0.5 * np.sign(vds), vds)
    return np.stack([vgs, vds], axis=-1)


class DiodeCurrent(NamedTuple):
    """Junction current (anode to cathode) and its conductance."""

    current: Array
    conductance: Array


def diode(
    v: Array,
    saturation_current: Array,
    n_vt: Array,
    breakdown_voltage: Array | float = np.inf,
) -> DiodeCurrent:
    """Shockley diode (junction only) with an optional reverse breakdown branch.

    The breakdown branch is −I_knee·exp(−(v + BV)/(n·VT)): it carries
    :data:`BREAKDOWN_KNEE_CURRENT` at v = −BV and grows exponentially beyond.
    """
    current, conductance = junction(v, saturation_current, n_vt)
    bv = np.asarray(breakdown_voltage, dtype=float)
    if np.any(np.isfinite(bv)):
        finite = np.isfinite(bv)
        e, de = limited_exp(-(v + np.where(finite, bv, 0.0)) / n_vt)
        knee = np.where(finite, BREAKDOWN_KNEE_CURRENT, 0.0)
        current = current - knee * e
        conductance = conductance + knee * de / n_vt
    return DiodeCurrent(current + JUNCTION_GMIN * v, conductance + JUNCTION_GMIN)


class BipolarCurrents(NamedTuple):
    """Ebers–Moll terminal currents (into c, b, e; npn polarity) and their derivatives.

    ``jacobian`` is shaped ``(S, 3, 2)``: the derivative of each terminal current (c, b, e)
    with respect to vBE and vBC; ``d_dvbe`` and ``d_dvbc`` are its two columns.
    """

    ic: Array
    ib: Array
    ie: Array
    jacobian: Array

    @property
    def d_dvbe(self) -> Array:
        """``(S, 3)`` ∂(ic, ib, ie)/∂vBE."""
        return self.jacobian[..., 0]

    @property
    def d_dvbc(self) -> Array:
        """``(S, 3)`` ∂(ic, ib, ie)/∂vBC."""
        return self.jacobian[..., 1]


def bipolar(
    vbe: Array,
    vbc: Array,
    saturation_current: Array,
    beta_forward: Array,
    beta_reverse: Array,
    early_voltage: Array,
    n_vt: Array,
) -> BipolarCurrents:
    """Ebers–Moll transport model with the forward Early effect (npn polarity).

    Transport current iT = (ICC − IEC)·(1 + vCE/VA) with ICC = IS·(exp(vBE/nVT) − 1) and
    IEC = IS·(exp(vBC/nVT) − 1); iC = iT − IEC/βR, iB = ICC/βF + IEC/βR, iE = −(iC + iB).
    """
    icc, gcc = junction(vbe, saturation_current, n_vt)
    iec, gec = junction(vbc, saturation_current, n_vt)
    inverse_va = 1.0 / np.asarray(early_voltage, dtype=float)
    early = 1.0 + (vbe - vbc) * inverse_va
    it = (icc - iec) * early
    dit_dvbe = gcc * early + (icc - iec) * inverse_va
    dit_dvbc = -gec * early - (icc - iec) * inverse_va
    ic = it - iec / beta_reverse - JUNCTION_GMIN * vbc
    ib = icc / beta_forward + iec / beta_reverse + JUNCTION_GMIN * (vbe + vbc)
    d = np.empty(np.shape(it) + (3, 2))  # (S, terminal c/b/e, control vBE/vBC)
    d[..., 0, 0] = dit_dvbe
    d[..., 0, 1] = dit_dvbc - gec / beta_reverse - JUNCTION_GMIN
    d[..., 1, 0] = gcc / beta_forward + JUNCTION_GMIN
    d[..., 1, 1] = gec / beta_reverse + JUNCTION_GMIN
    np.negative(d[..., 0, :] + d[..., 1, :], out=d[..., 2, :])
    return BipolarCurrents(ic, ib, -(ic + ib), d)


class ChannelCurrent(NamedTuple):
    """Drain current (n-channel polarity) and its derivatives gm = ∂iD/∂vGS, gds = ∂iD/∂vDS."""

    current: Array
    gm: Array
    gds: Array


def _square_law_forward(vgs: Array, vds: Array, k: Array, vth: Array, lam: Array
                        ) -> ChannelCurrent:
    overdrive = vgs - vth
    on = overdrive > 0
    saturated = vds >= overdrive
    clm = 1.0 + lam * vds
    sat_current = k * overdrive**2 * clm
    tri_current = k * (2.0 * overdrive * vds - vds**2) * clm
    current = np.where(on, np.where(saturated, sat_current, tri_current), 0.0)
    gm = np.where(on, np.where(saturated, 2.0 * k * overdrive, 2.0 * k * vds) * clm, 0.0)
    gds_sat = k * overdrive**2 * lam
    gds_tri = 2.0 * k * (overdrive - vds) * clm + k * (2.0 * overdrive * vds - vds**2) * lam
    gds = np.where(on, np.where(saturated, gds_sat, gds_tri), 0.0)
    return ChannelCurrent(current, gm, gds)


def square_law(vgs: Array, vds: Array, k: Array, vth: Array, lam: Array) -> ChannelCurrent:
    """Shichman–Hodges square law, symmetric in drain and source (n-channel polarity).

    Saturation iD = K·(vGS − Vth)²·(1 + λ·vDS); triode iD = K·(2(vGS − Vth)vDS − vDS²)·(1 + λ·vDS);
    zero below threshold.  With vDS < 0 the terminals swap roles.  For a JFET,
    K = IDSS/VP² and Vth = −|VP|.  A tiny conductance across the channel keeps cut-off solvable.
    """
    reverse = vds < 0
    forward = _square_law_forward(vgs, np.abs(vds), k, vth, lam)
    backward = _square_law_forward(vgs - vds, np.abs(vds), k, vth, lam)
    current = np.where(reverse, -backward.current, forward.current)
    gm = np.where(reverse, -backward.gm, forward.gm)
    gds = np.where(reverse, backward.gm + backward.gds, forward.gds)
    return ChannelCurrent(current + JUNCTION_GMIN * vds, gm, gds + JUNCTION_GMIN)


class OpampOutput(NamedTuple):
    """The op-amp's internal output voltage and its derivatives.

    ``d_dvd`` by the differential input, ``d_dvpos`` and ``d_dvneg`` by the supply pin voltages.
    """

    voltage: Array
    d_dvd: Array
    d_dvpos: Array
    d_dvneg: Array


def _softplus(z: Array) -> tuple[Array, Array]:
    """log(1 + e^z) and its derivative (the logistic function), overflow-safe."""
    return np.logaddexp(0.0, z), 0.5 * (1.0 + np.tanh(0.5 * z))


def opamp_output(
    vd: Array,
    v_positive: Array,
    v_negative: Array,
    open_loop_gain: Array,
    headroom: Array,
    knee: float = OUTPUT_KNEE,
) -> OpampOutput:
    """Behavioural op-amp output: A0·vd, limited smoothly to the supply pins minus headroom.

    E = y − s·softplus((y − hi)/s) + s·softplus((lo − y)/s) with y = A0·vd, hi = v+ − h,
    lo = v− + h and knee width s: exactly linear between the limits, flat beyond, with a smooth
    bend of width s so Newton's method converges.
    """
    y = open_loop_gain * vd
    high = v_positive - headroom
    low = v_negative + headroom
    over, s_over = _softplus((y - high) / knee)
    under, s_under = _softplus((low - y) / knee)
    voltage = y - knee * over + knee * under
    d_dy = 1.0 - s_over - s_under
    return OpampOutput(voltage, d_dy * open_loop_gain, s_over, s_under)
