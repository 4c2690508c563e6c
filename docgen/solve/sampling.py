"""Random streams for the spread analysis: one independent stream per (design, part, value).

Public API::

    stream_seed(design, part, name, seed) -> int          # stable across runs and machines
    unit_draws(design, part, name, seed, boards, distribution) -> (boards,) array
    draw(variations, boards, seed, distribution, design) -> {(part, name): (boards,) array}
    design_name(path) -> str                              # the design's file name, no folder

Each varied value draws from its own ``numpy.random.Generator`` (PCG64) seeded by SHA-256 of
``design / part / name / seed`` (``hashlib``, never the salted built-in ``hash``), so:

- adding, removing or reordering parts never changes any other part's draws (two revisions of
  a design compare board for board);
- board ``i`` of a stream is the same whatever the number of boards (draws are taken in order).

Distributions (DEVELOPERS.md, "tolerance distribution"):

- ``uniform`` (default): uniform between the value's low and high end (its tolerance, or the
  model's production range);
- ``normal``: mean at the middle of the range, the range's half-width at 3σ (so 99.73 % of
  boards fall inside it; the tails are kept, not cut off).

The design is named by its file name without folders, so the same file read as
``designs/x.md`` or ``/abs/path/designs/x.md`` gives the same boards.
"""

from __future__ import annotations

import hashlib
from collections.abc import Iterable
from pathlib import PurePath
from typing import Literal, Protocol

import numpy as np

Array = np.ndarray
Distribution = Literal["uniform", "normal"]
DISTRIBUTIONS: tuple[str, ...] = ("uniform", "normal")
#: The range's half-width sits at this many standard deviations for the normal distribution.
SIGMAS_AT_TOLERANCE = 3.0


class Varied(Protocol):
    """What :func:`draw` needs of a varied value (:class:`docgen.elaborate.Variation` fits)."""

    part: str
    name: str
    low: float
    high: float


def design_name(path: str) -> str:
    """The design's identity for seeding: its file name without the folders."""
    return PurePath(str(path).replace("\\", "/")).name


def stream_seed(design: str, part: str, name: str, seed: int) -> int:
    """A 128-bit seed from SHA-256 of the design, part, value name and bench seed."""
    text = f"{design_name(design)}/{part}/{name}/{int(seed)}"
    return int.from_bytes(hashlib.sha256(text.encode("utf-8")).digest()[:16], "little")


def unit_draws(design: str, part: str, name: str, seed: int, boards: int,
               distribution: Distribution = "uniform") -> Array:
    """The stream's first ``boards`` draws, standardised: uniform on [0, 1) or standard normal."""
    generator = np.random.Generator(np.random.PCG64(stream_seed(design, part, name, seed)))
    if distribution == "uniform":
        return generator.random(boards)
    if distribution == "normal":
        return generator.standard_normal(boards)
    raise ValueError(f"unknown distribution '{distribution}' (use one of {DISTRIBUTIONS})")


def scale(unit: Array, low: float, high: float, distribution: Distribution) -> Array:
    """Standardised draws placed within ``low .. high`` by the distribution's rule."""
    if distribution == "uniform":
        return low + unit * (high - low)
    middle, half = 0.5 * (low + high), 0.5 * (high - low)
    return middle + unit * (half / SIGMAS_AT_TOLERANCE)


def draw(variations: Iterable[Varied], boards: int, seed: int,
         distribution: Distribution, design: str) -> dict[tuple[str, str], Array]:
    """Solver overrides ``{(part, name): (boards,) values}`` for every varied value."""
    return {(v.part, v.name): scale(unit_draws(design, v.part, v.name, seed, boards,
                                               distribution), v.low, v.high, distribution)
            for v in variations}
