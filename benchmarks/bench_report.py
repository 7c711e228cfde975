"""How long a full report for one mate takes, against one bare off-screen PyVista render.

Both are timed in fresh processes, as a user runs them (imports and the off-screen GL context
included), with the same window size (1600 x 1200):

* bare: ``import pyvista``, a plate and a cylinder, one off-screen screenshot to PNG;
* report: ``matezone report scenes/sensor_bracket_interference.toml --out DIR`` (one mate:
  the 3D picture, three 2D views as PNG/SVG/PDF, the PDF page, results.json).

It also prints an in-process breakdown of the report's steps (warm imports), so a slow step
shows. Target: report <= 4 x bare.

    .venv/bin/python benchmarks/bench_report.py [--repeat 3]
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SCENE = ROOT / "scenes" / "sensor_bracket_interference.toml"
SIZE = (1600, 1200)

BARE = f"""
import pyvista as pv
p = pv.Plotter(off_screen=True, window_size={SIZE!r})
p.add_mesh(pv.Box((-20, 20, -20, 20, -4, 0)), color="#BFC6CE")
p.add_mesh(pv.Cylinder(center=(0, 0, 4), direction=(0, 0, 1), radius=3.0, height=8.0, resolution=96), color="#3B78C4")
p.screenshot(r"{{out}}")
p.close()
"""


def _timed(cmd: list[str]) -> float:
    t = time.perf_counter()
    subprocess.run(cmd, check=True, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    return time.perf_counter() - t


def breakdown(out: Path) -> list[tuple[str, float]]:
    """In-process times of the report's parts (imports warm)."""
    from geom import analyse_scene, load
    from viewer import figures as F
    from viewer import report as R
    from viewer import scene3d

    res = analyse_scene(load(SCENE))
    item = R.report_items(res)[0]
    st = R.item_states(res, item, None)
    rows = []
    t = time.perf_counter()
    s3 = scene3d.build_mate_scene(res, 0, states=st)
    scene3d.render_image(s3, out / "a.png", size=SIZE)
    rows.append(("3D picture (build + render)", time.perf_counter() - t))
    t = time.perf_counter()
    img = R.page_image_3d(s3, "iso")
    rows.append(("3D picture for the page (render + crop)", time.perf_counter() - t))
    for name in F.VIEWS_2D:
        t = time.perf_counter()
        fig, _ = F.draw_view(name, res, 0, st)
        for ext in ("png", "svg", "pdf"):
            F.save_figure(fig, out / f"b_{name}.{ext}")
        rows.append((f"2D {name}: draw + PNG/SVG/PDF", time.perf_counter() - t))
    t = time.perf_counter()
    from matplotlib.backends.backend_pdf import PdfPages

    with F.style_context(), PdfPages(out / "c.pdf") as pp:
        pp.savefig(R.build_page(res, item, st, img, 1, 1))
    rows.append(("PDF page (build + save)", time.perf_counter() - t))
    return rows


def main(argv=None) -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args(argv)
    py = sys.executable
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        bare = [_timed([py, "-c", BARE.format(out=tmp / "bare.png")]) for _ in range(a.repeat)]
        rep = [_timed([py, "-m", "matezone.cli", "report", str(SCENE), "--out", str(tmp / f"r{i}")])
                 for i in range(a.repeat)]
        b, r = statistics.median(bare), statistics.median(rep)
        print(f"bare off-screen render (plate + cylinder, {SIZE[0]}x{SIZE[1]}, fresh process): {b:.2f} s")
        print(f"full report for one mate (matezone report, fresh process):              {r:.2f} s")
        print(f"ratio report / bare: {r / b:.2f}  (target <= 4)")
        print("in-process breakdown (warm imports):")
        for name, dt in breakdown(tmp):
            print(f"  {name:<42} {dt:6.2f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
