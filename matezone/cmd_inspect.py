"""``matezone inspect``: judge a produced part from inspection values or measured points.

Thin: reads the scene, calls :func:`geom.inspect.inspect_feature`, prints text or JSON.
Bad input (a missing feature, a malformed points file, ...) becomes one message and exit 2.
"""

from __future__ import annotations

import json
import sys


def run(args, load) -> int:
    from geom.fitting import FitError
    from geom.inspect import InspectError, inspect_feature, inspection_to_json, render_inspection
    from geom.pointsfile import PointsError
    from geom.readout import CAUTION
    from matezone.cli import UserError

    scene = load(args.scene)
    try:
        res = inspect_feature(scene, args.feature, points=args.points,
                              bonus_basis=getattr(args, "bonus_basis", "unrelated"))
    except (InspectError, PointsError, FitError) as e:
        raise UserError(str(e)) from None
    if args.json:
        out = inspection_to_json(res)
        out["title"] = scene.title
        out["caution"] = CAUTION
        print(json.dumps(out, indent=2, ensure_ascii=False))
    else:
        for w in res.warnings:
            print(f"matezone: warning: {w}", file=sys.stderr)
        sys.stdout.write(render_inspection(res, title=f"{scene.title}: inspection of '{res.feature.id}'"))
        sys.stdout.write("\n" + CAUTION + "\n")
    return 0
