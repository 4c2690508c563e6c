"""A JFET common-source stage: gain and channel noise against the square-law hand formulas.

References: Sedra & Smith, *Microelectronic Circuits* (square law: gm = 2·√(ID·IDSS)/|VP|,
common-source gain −gm·RD with ro infinite); channel noise 8kT·gm/3 (Gray, Hurst, Lewis &
Meyer) and Johnson–Nyquist 4kTR, k from scipy.constants.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from response_helpers import curve, results
from scipy import constants

STAGE = """
VDD supply    15 V                   : vdd gnd
VS  signal    10 mV 1 kHz offset=-1  : g gnd
RD  resistor  2k2                    : vdd d
J1  njfet     square                 : d=d g=g s=gnd
"""
MODEL = "square njfet drain_saturation_current=6m pinch_off_voltage=2"
BENCH = "input VS\noutput d\nnoise band 1 kHz .. 10 kHz"


def test_common_source_gain_and_channel_noise():
    out = results(STAGE, models=MODEL, bench=BENCH)
    drain_current = out["op"]["parts"]["J1"]["id_a"]
    gm = 2 * math.sqrt(drain_current * 6e-3) / 2.0
    ac = out["ac"]
    assert 10 ** (ac["gain_at_signal_db"] / 20) == pytest.approx(gm * 2.2e3, rel=1e-6)
    assert abs(ac["phase_at_signal_deg"]) == pytest.approx(180.0, abs=1e-6)
    # The gate is driven by a 0 Ω source: the output noise is the channel's through RD plus RD's
    # own thermal noise.
    kt = constants.k * (25.0 + constants.zero_Celsius)
    expected = math.sqrt(8 * kt * gm / 3 * 2.2e3**2 + 4 * kt * 2.2e3)
    density = curve(out["noise"], "output_density_v_per_rthz")
    assert np.allclose(density, expected, rtol=1e-6)
    mechanisms = [c["mechanism"] for c in out["noise"]["contributors"]]
    assert mechanisms[0] == "channel"
