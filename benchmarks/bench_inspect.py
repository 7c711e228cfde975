"""Speed of ``inspect``: evaluate 100,000 points (100 sections of 1,000) against the time
numpy.loadtxt takes to read the same CSV. Target: ratio <= 10. Prints figures; asserts nothing.

    .venv/bin/python benchmarks/bench_inspect.py
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from geom.inspect import inspect_feature  # noqa: E402
from geom.model import Characteristic, Feature, Kind, Material, Scene, Tolerance, Units  # noqa: E402
from geom.pointsfile import read_points, write_points  # noqa: E402


def make_points(nsec=100, per=1000, seed=1) -> np.ndarray:
    rng = np.random.default_rng(seed)
    out = []
    for z in np.linspace(0.1, 11.9, nsec):
        phi = (np.arange(per) + rng.uniform(-0.3, 0.3, per)) * 2 * np.pi / per
        r = 4.003 + 0.0008 * np.cos(3 * phi + z) + 0.00015 * z + rng.normal(0, 2e-4, per)
        c = np.array([0.001, -0.0007]) * z
        out.append(np.c_[c[0] + r * np.cos(phi), c[1] + r * np.sin(phi), np.full(per, z)])
    return np.vstack(out)


def best_of(fn, n=5) -> float:
    ts = []
    for _ in range(n):
        t0 = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t0)
    return min(ts)


def main() -> int:
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.015, material=Material.MMC, datums=("A",))
    scene = Scene("bench", Units.MM, features=(Feature("bore", Kind.HOLE, (8.0, 8.022), 12.0, tolerance=tol),))
    P = make_points()
    with tempfile.TemporaryDirectory() as d:
        csv = Path(d) / "points.csv"
        write_points(csv, P)
        inspect_feature(scene, "bore", points=csv)  # warm up (imports scipy)
        t_load = best_of(lambda: np.loadtxt(csv, delimiter=",", skiprows=1))
        t_read = best_of(lambda: read_points(csv))
        pts = read_points(csv)
        t_eval = best_of(lambda: inspect_feature(scene, "bore", points=pts))
        t_all = best_of(lambda: inspect_feature(scene, "bore", points=csv))
    print(f"points: {len(P):,} in 100 sections of 1,000")
    print(f"numpy.loadtxt of the CSV          {t_load * 1e3:8.1f} ms")
    print(f"read_points (checked parse)       {t_read * 1e3:8.1f} ms")
    print(f"inspect_feature on parsed points  {t_eval * 1e3:8.1f} ms   ratio to loadtxt {t_eval / t_load:5.2f}x")
    print(f"inspect_feature from the CSV      {t_all * 1e3:8.1f} ms   ratio to loadtxt {t_all / t_load:5.2f}x"
          "   (target <= 10x)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
