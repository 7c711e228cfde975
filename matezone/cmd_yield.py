"""``matezone yield SCENE [--samples N] [--seed S] [--json]``: the statistical fit of every mate
and interface of a scene (geom only: no VTK, no Qt, no matplotlib)."""

from __future__ import annotations

import json
import sys


def run(args, load) -> int:
    from geom.readout import CAUTION
    from geom.yieldmc import run_yield, targets
    from geom.yieldout import yield_text, yield_to_json
    from geom.yieldspec import MAX_SAMPLES
    from matezone.cli import UserError

    if args.samples is not None and not 1 <= args.samples <= MAX_SAMPLES:
        raise UserError(f"--samples: expected a whole number from 1 to {MAX_SAMPLES}, got {args.samples}")
    if args.seed is not None and args.seed < 0:
        raise UserError(f"--seed: expected a whole number >= 0, got {args.seed}")
    scene = load(args.scene)
    todo = targets(scene)
    if not todo:
        raise UserError(f"{args.scene}: no [[mate]] or [[interface]] to run a statistical fit on")
    results = []
    for kind, i, _label in todo:
        try:
            results.append(run_yield(scene, kind, i, samples=args.samples, seed=args.seed))
        except ValueError as e:
            raise UserError(f"{args.scene}: {kind} {i + 1}: {e}") from None
    if args.json:
        print(json.dumps({"scene": scene.title, "units": scene.units.value,
                          "runs": [yield_to_json(r) for r in results], "caution": CAUTION},
                         indent=2, ensure_ascii=False))
    else:
        lines = [scene.title, ""]
        for r in results:
            lines += yield_text(r, scene.units)[:-1] + [""]
        lines.append(CAUTION)
        sys.stdout.write("\n".join(lines) + "\n")
    return 0
