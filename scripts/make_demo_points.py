"""Write scenes/cap_bore_inspection.csv: invented CMM scan of a produced gearbox end-cap bore.

The bore (limits 8.000 - 8.022 mm, length 12, perpendicularity ⌀0.015 (M) to A) is tilted
0.015 mm over its length along 35 degrees, and the reamer, deflected at entry, opened its upper
half on one side: one wall stays straight, the other moves out 0.015 mm at the top face, so the
size grows from ⌀8.005 to ⌀8.020 while the section centres drift 0.0075 mm more than the tilt.
Three-lobed form (0.0005 mm) and probe noise (0.00015 mm) are added.
The derived median line (section centres) then needs more zone than t + bonus, while the axis
of the unrelated actual mating envelope (the feature axis, which ASME applies perpendicularity
to) stays within it and a gauge pin of the virtual condition still enters normal to A.

Seeded and deterministic: running it twice writes the same file.

    .venv/bin/python scripts/make_demo_points.py [OUT.csv]
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from geom.pointsfile import write_points  # noqa: E402

LENGTH = 12.0
SECTIONS = 24
PER_SECTION = 360
D_BOTTOM = 8.005
TILT, DRIFT = 0.015, 0.0075  # centre offsets at the top face: straight tilt and flare drift
DIRECTION_DEG = 35.0
LOBES, LOBE_AMP = 3, 0.0005
NOISE = 0.00015
SEED = 20261202


def flare(zeta: np.ndarray) -> np.ndarray:
    """0 over the lower half, rising smoothly to 1 at the top face."""
    return np.clip((zeta - 0.5) / 0.5, 0.0, None) ** 2


def make(seed: int = SEED) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    e = np.array([np.cos(np.radians(DIRECTION_DEG)), np.sin(np.radians(DIRECTION_DEG))])
    zs = np.linspace(0.25, LENGTH - 0.25, SECTIONS)
    pts, secs = [], []
    for i, z in enumerate(zs):
        zeta = z / LENGTH
        centre = (TILT * zeta + DRIFT * flare(zeta)) * e
        d = D_BOTTOM + 2 * DRIFT * flare(zeta)  # one wall stays straight, the other opens
        phi = (np.arange(PER_SECTION) + rng.uniform(-0.3, 0.3, PER_SECTION)) * 2 * np.pi / PER_SECTION
        r = d / 2 + LOBE_AMP * np.cos(LOBES * phi + 0.4 * zeta) + rng.normal(0.0, NOISE, PER_SECTION)
        xy = centre + np.c_[r * np.cos(phi), r * np.sin(phi)]
        pts.append(np.c_[xy, np.full(PER_SECTION, z)])
        secs += [i + 1] * PER_SECTION
    return np.vstack(pts), np.array(secs)


def main(argv: list[str]) -> int:
    out = Path(argv[0]) if argv else ROOT / "scenes" / "cap_bore_inspection.csv"
    xyz, secs = make()
    write_points(out, xyz, secs)
    print(f"wrote {out}: {len(xyz)} points in {SECTIONS} sections")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
