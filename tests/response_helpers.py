"""Helpers for the response and noise tests: run a few blocks of the design format through the
real pipeline (reader → elaborate → operating point → ac → noise)."""

from __future__ import annotations

import math

import numpy as np
from scipy import constants
from solver_helpers import _BUILTINS, design_text

from docgen import pipeline
from docgen.reader import read_text

TWO_PI = 2.0 * math.pi


def results(circuit: str, models: str = "", bench: str = "") -> dict:
    """The op, ac and noise sections of a design made of the given blocks (errors raise)."""
    design = read_text(design_text(circuit, models, bench), "test.md")
    out = pipeline.run(design, _BUILTINS, only=frozenset({"op", "ac", "noise"}))
    assert not out["errors"], out["errors"]
    return out


def thermal_voltage(celsius: float = 25.0) -> float:
    """VT = kT/q from scipy.constants."""
    return constants.k * (celsius + constants.zero_Celsius) / constants.e


def parallel(*resistances: float) -> float:
    """R1‖R2‖… (Ohm's law)."""
    return 1.0 / sum(1.0 / r for r in resistances)


def curve(section: dict, key: str) -> np.ndarray:
    """A results curve as an array (``None`` → NaN)."""
    return np.array([np.nan if v is None else v for v in section[key]], dtype=float)
