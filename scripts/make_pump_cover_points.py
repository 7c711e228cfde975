"""Write the invented CMM points of the demo scene scenes/pump_cover_cmm.toml (seeded: the same
files every run): the pilot bore (datum B) and four bolt holes of cover PC-9, one hole tilted so
that its top end governs. Invented demo data, not a measurement.

    python scripts/make_pump_cover_points.py [OUT_DIR]     (default scenes/pump_cover_cmm)
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

SEED = 20261203
LENGTH = 10.0  # the cover's thickness (the features' length)
ORIGIN = (0.012, -0.008)  # where the pilot bore's axis sits in the CMM's frame
# per hole: (basic x, basic y, diameter, axis offset at z = 0, axis offset at z = LENGTH) from basic
R45 = 36.0 / math.sqrt(2.0)
HOLES = [
    (R45, R45, 9.060, (0.020, 0.010), (0.020, 0.010)),
    (-R45, R45, 9.050, (-0.015, 0.020), (-0.015, 0.020)),
    (-R45, -R45, 9.040, (-0.010, -0.015), (-0.075, -0.075)),  # tilted: its top end governs
    (R45, -R45, 9.070, (0.010, -0.020), (0.010, -0.020)),
]
PILOT = 52.018


def cylinder(rng, bottom, top, diameter, rings=(1.0, 3.0, 5.0, 7.0, 9.0), n=36, form=0.0004):
    """Points on a cylinder whose axis runs from ``bottom`` (z = 0) to ``top`` (z = LENGTH), with a
    small seeded form error (radial, uniform in +-form/2)."""
    out = []
    b, t = np.array([*bottom, 0.0]), np.array([*top, LENGTH])
    d = (t - b) / np.linalg.norm(t - b)
    e1 = np.cross(d, [0.0, 1.0, 0.0])
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(d, e1)
    for z in rings:
        c = b + d * (z - b[2]) / d[2]
        for k in range(n):
            a = 2 * math.pi * k / n + rng.uniform(0, 0.05)
            r = diameter / 2 + rng.uniform(-form / 2, form / 2)
            out.append(c + r * (math.cos(a) * e1 + math.sin(a) * e2))
    return np.array(out)


def write(path: Path, P: np.ndarray, what: str) -> None:
    with open(path, "w", encoding="utf-8", newline="\n") as fh:
        fh.write("x,y,z\n")
        fh.write(f"# invented demo data for scenes/pump_cover_cmm.toml: {what} (seed {SEED})\n")
        np.savetxt(fh, P, delimiter=",", fmt="%.6f")


def main(out: Path) -> None:
    rng = np.random.default_rng(SEED)
    out.mkdir(parents=True, exist_ok=True)
    write(out / "pilot.csv", cylinder(rng, ORIGIN, ORIGIN, PILOT), "pilot bore datum B")
    for i, (x, y, dia, ob, ot) in enumerate(HOLES, start=1):
        bot = (ORIGIN[0] + x + ob[0], ORIGIN[1] + y + ob[1])
        top = (ORIGIN[0] + x + ot[0], ORIGIN[1] + y + ot[1])
        write(out / f"hole{i}.csv", cylinder(rng, bot, top, dia), f"bolt hole {i}")


if __name__ == "__main__":
    main(Path(sys.argv[1]) if len(sys.argv) > 1 else Path(__file__).resolve().parent.parent / "scenes" / "pump_cover_cmm")
