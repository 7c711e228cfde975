"""Start-up cost of `matezone analyze` against `python -c "import numpy, shapely"` (target <= 1.5x).

Run: .venv/bin/python benchmarks/bench_analyze.py [repeats]
Prints the median wall time of each command over the repeats and their ratio.
"""

import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SCENE = ROOT / "scenes" / "gearbox_endcap_dowel.toml"


def median_time(cmd, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 15
    base = median_time([sys.executable, "-c", "import numpy, shapely"], repeats)
    text = median_time([sys.executable, "-m", "matezone.cli", "analyze", str(SCENE)], repeats)
    js = median_time([sys.executable, "-m", "matezone.cli", "analyze", str(SCENE), "--json"], repeats)
    print(f"python -c 'import numpy, shapely'   {base * 1000:7.1f} ms (median of {repeats})")
    print(f"matezone analyze (text)             {text * 1000:7.1f} ms  ratio {text / base:.2f}")
    print(f"matezone analyze --json             {js * 1000:7.1f} ms  ratio {js / base:.2f}")
    print("target: ratio <= 1.5")


if __name__ == "__main__":
    main()
