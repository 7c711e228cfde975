"""The teaching sweep as a moving picture: a feature's size run from MMC to LMC (and its tilt
direction round) at ONE locked exaggeration and ONE camera, its size, bonus, tolerance allowed
and virtual condition printed on every frame, written as an animated GIF or an MP4.

Pure and headless (off-screen PyVista, imageio with its ffmpeg plugin for MP4): result in,
frames or a file out. The numbers come from :func:`geom.sweep.size_sweep`; the pictures from the
3D builders with the exaggeration fixed before the first frame, so a constant virtual condition
is drawn constant.
"""

from __future__ import annotations

import os
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from geom.analysis import SceneResult, term
from geom.boundaries import worst_case_state
from geom.sweep import SweepStep, size_sweep

FORMATS = (".gif", ".mp4")
MAX_FRAMES = 400  # about a minute at 6 frames a second: a longer lesson is a mistake


class AnimationError(ValueError):
    """A sweep that cannot be made, with what was expected."""


@dataclass(frozen=True)
class Sweep:
    """What a sweep shows: the subject, the swept feature, the steps, the locked scale."""

    subject: int | str  # a mate index or a lone feature id
    feature_id: str  # the feature whose size moves
    steps: tuple[SweepStep, ...]
    exaggeration: float
    captions: tuple[str, ...]  # one per step, the numbers ticking beside the picture


def plan_sweep(res: SceneResult, subject: int | str, feature_id: str | None = None, steps: int = 25,
               turns: float = 0.0, exaggeration: float | None = None) -> Sweep:
    """The sweep of mate ``subject`` (an index; its hole moves unless ``feature_id`` names the
    pin) or of the lone feature ``subject`` (an id). The other feature of a mate stays at its
    worst case. The exaggeration is fixed here for every frame."""
    from viewer.exaggeration import auto_exaggeration

    sc = res.scene
    if isinstance(subject, int) and not isinstance(subject, bool):
        if not 0 <= subject < len(sc.mates):
            raise AnimationError(f"mate {subject + 1} does not exist: the scene has {len(sc.mates)} mate(s)")
        m = sc.mates[subject]
        ids = (m.hole, m.pin)
        fid = feature_id or m.hole
        if fid not in ids:
            raise AnimationError(f"feature {fid!r} is not in mate {subject + 1} ({m.hole} with {m.pin})")
        k = exaggeration or auto_exaggeration(res, mate_index=subject)
        in_mate = True
    else:
        fid = feature_id or subject
        if fid != subject:
            raise AnimationError(f"a lone feature sweep moves that feature ({subject!r}), not {fid!r}")
        if fid not in {f.id for f in sc.features}:
            raise AnimationError(f"no feature {fid!r} in the scene")
        k = exaggeration or auto_exaggeration(res, feature_id=fid)
        in_mate = False
    f = sc.feature(fid)
    if f.lmc == f.mmc:
        raise AnimationError(f"feature {fid!r} has a single size: there is nothing to sweep")
    try:
        st = size_sweep(f, steps, turns, role_in_mate=in_mate)
    except ValueError as e:
        raise AnimationError(str(e)) from None
    if len(st) > MAX_FRAMES:
        raise AnimationError(f"expected at most {MAX_FRAMES} steps, got {len(st)}")
    return Sweep(subject, fid, st, float(k), tuple(caption(res, fid, s) for s in st))


def caption(res: SceneResult, feature_id: str, step: SweepStep) -> str:
    """The numbers of one step, in the scene's standard's terms and its display precision."""
    sc = res.scene
    u, std = sc.units, sc.standard
    f = sc.feature(feature_id)
    b = term("bonus", std)[0]
    parts = [f"{feature_id} size {u.fmt(step.size)}", f"{b} {u.fmt(step.bonus)}",
             f"tolerance allowed {u.fmt(step.tolerance_allowed)}"]
    if step.virtual_condition is not None and f.tolerance is not None:
        vc = term(f"vc_{f.tolerance.material.name}", std)[0]
        parts.append(f"{vc} {u.fmt(step.virtual_condition)}")
    opening = "clear opening" if f.kind.value == "hole" else "envelope"
    parts.append(f"{opening} {u.fmt(step.presented)} {u.value}")
    return "; ".join(parts)


def _scene_at(res: SceneResult, sw: Sweep, step: SweepStep):
    from viewer.scene3d import build_feature_scene, build_mate_scene

    if isinstance(sw.subject, int) and not isinstance(sw.subject, bool):
        m = res.scene.mates[sw.subject]
        states = {fid: worst_case_state(res.scene.feature(fid), True) for fid in (m.hole, m.pin)}
        states[sw.feature_id] = step.state
        return build_mate_scene(res, sw.subject, states, exaggeration=sw.exaggeration)
    return build_feature_scene(res, sw.feature_id, step.state, exaggeration=sw.exaggeration)


def render_frames(res: SceneResult, sw: Sweep, view: str = "iso", size=(960, 720)) -> list[np.ndarray]:
    """One (h, w, 3) uint8 image per step, all from the first step's camera, each with its
    caption and the locked scale at the foot of the picture."""
    import pyvista as pv

    from viewer import style as S
    from viewer.scene3d import add_to_plotter, apply_view, view_scene

    w, h = int(size[0]), int(size[1])
    pl = pv.Plotter(off_screen=True, window_size=(w, h))
    frames = []
    try:
        camera = None
        for step, text in zip(sw.steps, sw.captions):
            pl.clear()  # actors, texts and the scale bar of the previous step
            sc = view_scene(_scene_at(res, sw, step), view)
            add_to_plotter(pl, sc)
            if camera is None:
                apply_view(pl, sc, view)
                camera = (pl.camera_position, pl.camera.parallel_projection, pl.camera.parallel_scale,
                          pl.camera.view_angle)
            else:
                pl.camera_position = camera[0]
                pl.camera.parallel_projection = camera[1]
                pl.camera.parallel_scale = camera[2]
                pl.camera.view_angle = camera[3]
                pl.renderer.GetActiveCamera().SetWindowCenter(*sc.window_centre)
                pl.reset_camera_clipping_range()
            fs = max(7, int(round(h / 90)))
            pl.add_text(f"step {step.index + 1} of {len(sw.steps)}: {text}\n"
                        f"deviations x{sw.exaggeration:g}, locked for the whole sweep",
                        position=(int(0.012 * w), int(0.012 * h)), font_size=fs, color=S.TEXT,
                        font=S.FONT_FAMILY)
            pl.render()
            frames.append(np.asarray(pl.screenshot(return_img=True))[..., :3].copy())
    finally:
        pl.close()
    return frames


def write_animation(frames: list[np.ndarray], path, fps: float = 6.0) -> Path:
    """Write ``frames`` to ``path`` (.gif or .mp4, from its suffix), all or nothing: the file
    appears complete or not at all (a temporary file beside it, then a rename)."""
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in FORMATS:
        raise AnimationError(f"{path}: expected a file name ending in {' or '.join(FORMATS)}")
    if not frames:
        raise AnimationError(f"{path}: no frames to write")
    if not (0.5 <= fps <= 60):
        raise AnimationError(f"{path}: expected 0.5 to 60 frames a second, got {fps!r}")
    import imageio.v2 as imageio

    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}.", suffix=suffix, dir=folder)
    os.close(fd)
    try:
        if suffix == ".gif":
            imageio.mimsave(tmp, frames, format="GIF", duration=1000.0 / fps, loop=0)
        else:
            # H.264 in yuv420p, the form every player opens; sizes are kept even, not resized
            h, w = frames[0].shape[:2]
            even = [f[: h - h % 2, : w - w % 2] for f in frames]
            with imageio.get_writer(tmp, format="FFMPEG", fps=fps, codec="libx264", quality=7,
                                    pixelformat="yuv420p", macro_block_size=1) as out:
                for f in even:
                    out.append_data(f)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp made it private; the file is the user's like any other
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def sweep_animation(res: SceneResult, subject: int | str, path, *, feature_id: str | None = None,
                    steps: int = 25, turns: float = 0.0, fps: float = 6.0, view: str = "iso",
                    size=(960, 720)) -> tuple[Path, Sweep]:
    """Plan, render and write a sweep in one call; returns the file and what it shows."""
    if Path(path).suffix.lower() not in FORMATS:  # before any rendering
        raise AnimationError(f"{path}: expected a file name ending in {' or '.join(FORMATS)}")
    sw = plan_sweep(res, subject, feature_id, steps, turns)
    return write_animation(render_frames(res, sw, view, size), path, fps), sw
