"""Speed of the 3D scene builders: ``build_mate_scene`` and ``build_feature_scene`` for every demo
scene in ``scenes/``. No display needed.

    .venv/bin/python benchmarks/bench_scene3d.py [ROUNDS]

For each mate (and each feature) prints the first call (nothing of that scene built yet in this
process) and the warm time per call: the median over ROUNDS what-if states that differ from one
call to the next (the hole's size swept through its limits, as a slider does), so the
state-dependent geometry is recomputed every time. Target: warm ``build_mate_scene`` well under
10 ms. Prints figures; asserts nothing. Run it without ``MATEZONE_CHECK_SHARED=1`` (that debug
switch of :mod:`viewer.memo` fingerprints every shared mesh on every hand-out); it says so if set.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import geom  # noqa: E402
from geom.boundaries import FeatureState  # noqa: E402
from viewer.scene3d import build_feature_scene, build_mate_scene  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
ROUNDS = int(sys.argv[1]) if len(sys.argv) > 1 else 40


def _sweep(f, i: int, direction: float) -> FeatureState:
    lo, hi = f.limits
    return FeatureState(size=lo + (hi - lo) * (i % 20) / 19, share=1.0, direction_deg=direction)


def _timed(fn) -> tuple[float, float]:
    """(wall, CPU) seconds of one call; on a shared machine the CPU time is the steadier one."""
    t0, c0 = time.perf_counter(), time.process_time()
    fn()
    return time.perf_counter() - t0, time.process_time() - c0


def _median(ts) -> tuple[float, float]:
    return statistics.median(t[0] for t in ts), statistics.median(t[1] for t in ts)


def _row(name: str, what: str, first, ts) -> str:
    (w, c) = _median(ts)
    return f"{name:<34} {what:<30} {first[0] * 1e3:7.1f} {first[1] * 1e3:7.1f} {w * 1e3:8.2f} {c * 1e3:8.2f}"


def main() -> int:
    from viewer import memo

    if memo.CHECK_SHARED:
        print("note: MATEZONE_CHECK_SHARED=1 is set: every shared mesh is fingerprinted, figures are slower")
    paths = sorted((ROOT / "scenes").glob("*.toml"))
    results = [(p.name, geom.analyse_scene(geom.load(p))) for p in paths]
    # interpreter warm-up (imports, first numpy / VTK calls) on a state no benchmark uses
    name0, res0 = results[0]
    build_mate_scene(res0, 0, exaggeration=1.2345)
    print(f"{'':<34} {'':<30} {'first call, ms':>15} {'warm, ms (median)':>18}")
    print(f"{'scene':<34} {'what':<30} {'wall':>7} {'cpu':>7} {'wall':>8} {'cpu':>8}")
    warm_mates = []
    for name, res in results:
        sc = res.scene
        for i, m in enumerate(sc.mates):
            hole, pin = sc.feature(m.hole), sc.feature(m.pin)
            first = _timed(lambda: build_mate_scene(res, i))
            ts = [_timed(lambda j=j: build_mate_scene(res, i, states={hole.id: _sweep(hole, j, 0.0),
                                                                     pin.id: _sweep(pin, j, 180.0)}))
                  for j in range(1, ROUNDS + 1)]
            warm_mates.append(_median(ts))
            print(_row(name, f"mate {m.hole}/{m.pin}", first, ts))
        for f in sc.features:
            first = _timed(lambda: build_feature_scene(res, f.id))
            ts = [_timed(lambda j=j: build_feature_scene(res, f.id, state=_sweep(f, j, 0.0)))
                  for j in range(1, ROUNDS + 1)]
            print(_row("", f"feature {f.id}", first, ts))
    for i, how in ((0, "wall"), (1, "CPU")):
        vals = [w[i] for w in warm_mates]
        print(f"build_mate_scene warm ({how}): worst demo mate {max(vals) * 1e3:.2f} ms, median over mates "
              f"{statistics.median(vals) * 1e3:.2f} ms (target: well under 10 ms)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
