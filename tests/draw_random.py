"""Seeded random circuits for the drawing tests: bridges, transistors and op-amps, not only
series chains.  Only connectivity matters to a drawing, so values are arbitrary."""

from __future__ import annotations

import random

from draw_circuits import design, part

from docgen.design import Design

TWO_TERMINAL = ("resistor", "resistor", "resistor", "capacitor", "capacitor", "diode",
                "inductor", "current")
PREFIX = {"resistor": "R", "capacitor": "C", "diode": "D", "inductor": "L", "current": "I"}
TRANSISTORS = {"npn": "cbe", "pnp": "cbe", "njfet": "dgs", "pjfet": "dgs", "nmos": "dgs",
               "pmos": "dgs"}


def random_design(seed: int) -> Design:
    """One random circuit: a supply, a source, a bridge or two, devices and passives."""
    rng = random.Random(seed)
    nets = [f"n{i}" for i in range(rng.randint(3, 7))]
    rails = ["vcc", "gnd"] + (["vee"] if rng.random() < 0.3 else [])
    parts = [part(1, "VP", "supply", 12, "vcc", "gnd"),
             part(2, "VS", "signal", 1e-3, nets[0], "gnd", frequency=1e3)]
    if "vee" in rails:
        parts.append(part(3, "VN", "supply", 12, "gnd", "vee"))
    anywhere = nets + rails
    counter = 0

    def name(prefix: str) -> str:
        nonlocal counter
        counter += 1
        return f"{prefix}{counter}"

    if rng.random() < 0.5:  # a Wheatstone bridge between two nets and the rails
        a, b = rng.sample(nets, 2) if len(nets) > 1 else (nets[0], nets[0])
        for x, y in (("vcc", a), ("vcc", b), (a, "gnd"), (b, "gnd"), (a, b)):
            parts.append(part(10, name("R"), "resistor", 1e3, x, y))
    for _ in range(rng.randint(0, 3)):
        kind = rng.choice(list(TRANSISTORS))
        pins = rng.sample(anywhere, 3)
        parts.append(part(20, name("Q"), kind, None,
                          *(f"{t}={n}" for t, n in zip(TRANSISTORS[kind], pins, strict=True))))
    if rng.random() < 0.35:
        a, b, c = (rng.choice(nets) for _ in range(3))
        low = "vee" if "vee" in rails else "gnd"
        parts.append(part(30, name("U"), "opamp", None, f"in+={a}", f"in-={b}", f"out={c}",
                          "v+=vcc", f"v-={low}"))
    for _ in range(rng.randint(2, 8)):
        x, y = rng.sample(anywhere, 2)
        if x in rails and y in rails:
            y = rng.choice(nets)
        kind = rng.choice(TWO_TERMINAL)
        parts.append(part(40, name(PREFIX[kind]), kind, None if kind == "diode" else 1e3,
                          x, y))
    return design(f"random-{seed}", parts, rng.choice(nets))
