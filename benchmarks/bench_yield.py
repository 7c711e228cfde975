"""Cost of the statistical fit (geom.yieldmc): 10^6 assemblies of a single mate (the valve demo's
guide pin) and 10^5 assemblies of two 4-member patterns with pilots (the pump cover demo).
Target: 10^6 single-mate assemblies in well under 10 s on one core; the pattern run is printed
beside it (no target: each assembly solves a disc-intersection margin by bisection).
Single thread: numpy's elementwise work used here runs on one core; set OMP_NUM_THREADS=1 (and
OPENBLAS_NUM_THREADS=1) to be sure no BLAS thread pool helps.

Run: OMP_NUM_THREADS=1 .venv/bin/python benchmarks/bench_yield.py
"""

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from geom import load  # noqa: E402
from geom.yieldmc import run_yield  # noqa: E402

TARGET_MATE_S = 10.0


def timed(scene, kind, n):
    t0 = time.perf_counter()
    r = run_yield(scene, kind, 0, samples=n, seed=1)
    return time.perf_counter() - t0, r


def main():
    valve = load(ROOT / "scenes" / "valve_body_guide_pin.toml")
    pump = load(ROOT / "scenes" / "pump_cover_bolts.toml")
    run_yield(valve, samples=1000)  # imports and warm-up
    t, r = timed(valve, "mate", 10 ** 6)
    print(f"single mate, 10^6 assemblies: {t:.2f} s (target {TARGET_MATE_S:g} s, ratio {t / TARGET_MATE_S:.2f}); "
          f"P(interference) {r.p_interference:.3g}")
    t, r = timed(pump, "interface", 10 ** 5)
    print(f"two patterns of 4 with pilots, 10^5 assemblies: {t:.2f} s ({1e6 * t / 1e5:.1f} us per assembly); "
          f"P(interference) {r.p_interference:.3g}")


if __name__ == "__main__":
    main()
