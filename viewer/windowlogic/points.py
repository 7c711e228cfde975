"""The measured-points files a scene names (``[feature.measured] points``), as the window reads
them: where a file is, whether geom may read it from the scene (only inside the scene's folder),
how its path is written into a scene, and which files an exported report reads."""

from __future__ import annotations

import os
from dataclasses import replace
from pathlib import Path

from geom.model import Scene


def inspection_errors() -> tuple[type, ...]:
    """The message-carrying errors ``matezone inspect`` turns into one line (same classes)."""
    from geom.fitting import FitError
    from geom.inspect import InspectError
    from geom.pointsfile import PointsError

    return (InspectError, PointsError, FitError)


def points_source(scene: Scene, fid: str, points: str | None = None) -> tuple[str | None, float | None]:
    """(absolute path, modification time) of the points an inspection of ``fid`` reads: ``points``
    if given, else the feature's ``[feature.measured] points`` resolved as geom.inspect resolves
    it (relative to the scene file). (None, None) for typed values."""
    if points is None:
        m = scene.feature(fid).measured
        if m is None or m.points is None:
            return None, None
        base = Path(scene.source).parent if scene.source else Path.cwd()
        path = Path(m.points) if Path(m.points).is_absolute() else base / m.points
    else:
        path = Path(points)
    path = path.resolve()
    try:
        return str(path), path.stat().st_mtime
    except OSError:
        return str(path), None


def scene_folder(scene: Scene) -> Path:
    """The folder a scene's points files must lie in (geom.inspect reads no file outside it)."""
    return (Path(scene.source).parent if scene.source else Path.cwd()).resolve()


def points_outside(scene: Scene, fid: str) -> bool:
    """True when the feature's recorded points file lies outside the scene's folder: geom.inspect
    refuses to read it from the scene file (a scene must not make the program read any file)."""
    path, _ = points_source(scene, fid)
    return path is not None and not Path(path).is_relative_to(scene_folder(scene))


def has_measured(scene: Scene, fid: str) -> bool:
    return scene.feature(fid).measured is not None


def points_entry(points_path: str, scene_path: str | None) -> str:
    """How a points file is written in ``[feature.measured] points``: relative to the scene
    file's folder when there is one (and the relative form exists), else absolute."""
    p = Path(points_path).resolve()
    if scene_path:
        try:
            return Path(os.path.relpath(p, Path(scene_path).resolve().parent)).as_posix()
        except ValueError:  # another drive
            pass
    return str(p)


def outside_warning(scene: Scene, fid: str) -> str:
    """The note shown when the window reads a points file outside the scene's folder."""
    path, _ = points_source(scene, fid)
    return (f"note: {path} is outside the scene's folder {scene_folder(scene)}: this window reads it "
            "because you picked it, but a scene file may only name points inside its own folder; copy "
            "the file there (or give it with `matezone inspect --points`)")


def report_points(scene: Scene, picked: set[str]) -> tuple[dict[str, str], list[str]]:
    """The points files an exported report reads, as the window reads them: (feature id ->
    absolute path of its ``[feature.measured] points`` file, messages for the files geom would
    refuse to read from the scene, those outside its folder that are not in ``picked``, the
    resolved paths the user picked in the window)."""
    points, refused = {}, []
    for f in scene.features:
        if f.measured is None or f.measured.points is None:
            continue
        path, _ = points_source(scene, f.id)
        if points_outside(scene, f.id) and path not in picked:
            refused.append(f"feature {f.id!r}: its points file {path} is outside the scene's folder "
                           f"{scene_folder(scene)}; a scene may only name points inside its own folder "
                           "(load the file with File > Load measured points…, or copy it there)")
            continue
        points[f.id] = path
    return points, refused


def rebase_points(scene: Scene, target: str) -> Scene:
    """The scene with each relative points file rewritten relative to ``target``'s folder (same
    files; a scene saved elsewhere still finds its measured points)."""
    feats = []
    for f in scene.features:
        m = f.measured
        if m is not None and m.points is not None and not Path(m.points).is_absolute():
            path, _ = points_source(scene, f.id)
            f = f.with_(measured=replace(m, points=points_entry(path, target)))
        feats.append(f)
    return replace(scene, features=tuple(feats))
