"""The terminal printers of the ac and noise sections: figures, reasons and contributors show."""

from __future__ import annotations

from response_helpers import results

from docgen.report import render


def test_terminal_output_has_response_and_noise_with_reasons():
    out = results("""
VS  signal    1 V 1 kHz source=1k : in gnd
R1  resistor  1k                  : in out
C1  capacitor 100n                : out gnd
""", bench="input VS\noutput out\nnoise band 20 Hz .. 20 kHz")
    text = render(out)
    assert "Small-signal response: VS → out" in text
    assert "high corner (−3.01 dB)" in text and "795.9 Hz" in text
    # An absent corner prints as "none" with its reason as a note, never a made-up number.
    assert "low corner: no low corner: the stage is direct-coupled" in text
    assert "Noise over 20 Hz .. 20 kHz" in text
    assert "noise figure (T0 = 290 K)" in text
    assert "thermal (source resistance)" in text
