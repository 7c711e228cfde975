"""The teaching sweep as the window plays and exports it, without Qt: which feature a focus
sweeps (a mate's hole, the feature looked at, or the lone feature), the steps the play control
walks through (:func:`geom.sweep.size_sweep`), the three steps of the lesson (MMC, LMC, both:
the opening stays at the VC), the default file names of the exports, and the
sweep export job the window runs in a separate process (``python -m viewer.windowlogic.teaching``,
like the report: the off-screen renderer stays apart from the window's OpenGL context).

>>> default_export_path("/work/cap.toml", "mate1", "sweep", ".gif", "/tmp")
'/work/cap_mate1_sweep.gif'
>>> default_export_path(None, "bore", "picture", ".png", "/tmp")
'/tmp/scene_bore_picture.png'
"""

from __future__ import annotations

import re
import signal
import sys
from dataclasses import dataclass
from pathlib import Path

from geom import boundaries as B
from geom.analysis import term
from geom.model import Kind, Material, Scene
from geom.sweep import SweepStep, size_sweep

PLAY_STEPS = 25  # the play control's default number of steps (the report's sweep has as many)
PLAY_MAX_STEPS = 400  # as many as viewer.animate.MAX_FRAMES: a longer lesson is a mistake
CANCELLED = 130  # the job's exit status when stopped (as the report command's)


def sweep_target(scene: Scene, focus: tuple[str, object]) -> tuple[int | str, str] | None:
    """(subject, feature id) that the focus sweeps: for a mate its hole; for a feature in a mate
    that feature within its mate (subject: the mate's index); for a lone feature the feature
    itself (subject: its id). None for an inspection, a fastener, an empty scene or a feature
    with a single size (nothing to sweep)."""
    kind, key = focus
    if kind == "mate":
        subject, fid = key, scene.mates[key].hole
    elif kind == "feature":
        fid = key
        subject = next((i for i, m in enumerate(scene.mates) if fid in (m.hole, m.pin)), fid)
    else:
        return None
    f = scene.feature(fid)
    if f.mmc == f.lmc:
        return None
    return subject, fid


def play_steps(scene: Scene, focus: tuple[str, object], steps: int = PLAY_STEPS,
               turns: float = 0.0) -> tuple[str, tuple[SweepStep, ...]] | None:
    """(feature id, steps from MMC to LMC) for the play control, or None when the focus has no
    size to sweep. A feature in a mate starts at its worst case in the mate (a pin tilts
    opposite to the hole)."""
    target = sweep_target(scene, focus)
    if target is None:
        return None
    subject, fid = target
    in_mate = isinstance(subject, int)
    return fid, size_sweep(scene.feature(fid), int(steps), float(turns), role_in_mate=in_mate)


@dataclass(frozen=True)
class LessonStep:
    """One step of the three-step lesson: the what-if state set and the note shown with it."""

    state: B.FeatureState
    note: str


def lesson_target(scene: Scene, focus: tuple[str, object]) -> str | None:
    """The feature the lesson steps: the focused mate's hole (or the feature looked at), when its
    tolerance is at MMC (where the boundary presented stays put); None otherwise."""
    target = sweep_target(scene, focus)
    if target is None:
        return None
    f = scene.feature(target[1])
    if f.tolerance is None or f.tolerance.material is not Material.MMC:
        return None
    return f.id


def lesson_steps(scene: Scene, focus: tuple[str, object]) -> tuple[str, tuple[LessonStep, ...]] | None:
    """(feature id, three steps) of the lesson, or None (:func:`lesson_target`): the feature at
    MMC with all of its tolerance used, then at LMC with all of the larger tolerance used, then
    both side by side: the opening (a pin: its envelope) is the VC at either size. Every number
    comes from geom.boundaries; the last step keeps the LMC state in the views."""
    fid = lesson_target(scene, focus)
    if fid is None:
        return None
    f = scene.feature(fid)
    u, st = scene.units, scene.standard
    in_mate = any(fid in (m.hole, m.pin) for m in scene.mates)
    turn = B.worst_case_state(f, in_mate).direction_deg
    mm, lm, vc_t, bname = term("mmc", st)[0], term("lmc", st)[0], term("vc_MMC", st)[0], term("bonus", st)[0]
    what = "opening" if f.kind is Kind.HOLE else "envelope"
    vc = B.virtual_condition(f)
    states = (B.FeatureState(f.mmc, 1.0, turn), B.FeatureState(f.lmc, 1.0, turn))
    eff = [B.effective_size(f, s) for s in states]
    ta = [B.tolerance_allowed(f, s.size) for s in states]
    sign = "-" if f.kind is Kind.HOLE else "+"
    first = (f"1/3 {fid} at {mm} {u.fmt(f.mmc)}, all of t {u.fmt(ta[0])} used: the {what} is "
             f"{u.fmt(f.mmc)} {sign} {u.fmt(ta[0])} = {u.fmt(eff[0])}")
    second = (f"2/3 {fid} at {lm} {u.fmt(f.lmc)}: {bname} {u.fmt(B.bonus(f, f.lmc))}, so "
              f"{u.fmt(ta[1])} may be used: the {what} is {u.fmt(f.lmc)} {sign} {u.fmt(ta[1])} = {u.fmt(eff[1])}")
    both = (f"3/3 both: at {mm} {u.fmt(eff[0])}, at {lm} {u.fmt(eff[1])}: "
            f"the {what} stays at the {vc_t} {u.fmt(vc)}")
    return fid, (LessonStep(states[0], first), LessonStep(states[1], second), LessonStep(states[1], both))


def subject_label(scene: Scene, subject: int | str) -> str:
    """The subject's part of a file name: ``mate1`` for the first mate, else the feature id with
    every character a file name may not hold replaced by ``-``.

    >>> subject_label(None, 0), subject_label(None, "cap bore/1")
    ('mate1', 'cap-bore-1')
    """
    if isinstance(subject, int) and not isinstance(subject, bool):
        return f"mate{subject + 1}"
    return re.sub(r"[^A-Za-z0-9_.-]+", "-", str(subject)).strip("-.") or "feature"


def default_export_path(scene_path: str | None, subject: str, what: str, suffix: str, cwd: str) -> str:
    """``<scene stem>_<subject>_<what><suffix>`` in the scene file's folder (an unsaved scene:
    ``scene`` in ``cwd``)."""
    if scene_path:
        p = Path(scene_path)
        folder, stem = p.parent, p.stem
    else:
        folder, stem = Path(cwd), "scene"
    return str(folder / f"{stem}_{subject}_{what}{suffix}")


def sweep_command(python: str, scene_path: str, out: str, subject: int | str, feature_id: str,
                  steps: int, turns: float, view: str) -> list[str]:
    """The command line of the sweep export job (every path absolute: it runs in a temporary
    folder). A mate subject is passed as ``mate:<index>``, a lone feature as ``feature:<id>``."""
    kind = "mate" if isinstance(subject, int) and not isinstance(subject, bool) else "feature"
    return [python, "-m", "viewer.windowlogic.teaching", scene_path, out, f"{kind}:{subject}", feature_id,
            str(int(steps)), repr(float(turns)), view]


def _cancel(_sig, _frame):
    raise KeyboardInterrupt


def main(argv: list[str] | None = None) -> int:
    """The sweep export job: load the scene, write the sweep all or nothing (a stop by SIGTERM
    leaves no file behind), print progress lines on stdout and one message on stderr."""
    argv = list(sys.argv[1:] if argv is None else argv)
    signal.signal(signal.SIGTERM, _cancel)
    try:
        scene_path, out, subject, fid, steps, turns, view = argv
        from geom.analysis import analyse_scene
        from geom.scenefile import SceneError, load
        from viewer.animate import AnimationError, sweep_animation

        kind, _, key = subject.partition(":")
        sub: int | str = int(key) if kind == "mate" else key
        print(f"rendering {steps} frames of {fid}…", flush=True)
        try:
            res = analyse_scene(load(scene_path))
            path, sw = sweep_animation(res, sub, out, feature_id=fid, steps=int(steps), turns=float(turns),
                                       view=view)
        except (SceneError, AnimationError, OSError) as e:
            sys.stderr.write(f"matezone: {e}\n")
            return 2
        print(f"{len(sw.steps)} frames written", flush=True)
        return 0
    except KeyboardInterrupt:
        sys.stderr.write(f"matezone: cancelled; nothing was written to {argv[1] if len(argv) > 1 else '?'!r}\n")
        return CANCELLED
    except Exception as e:  # the window shows this one line
        sys.stderr.write(f"matezone: internal error while writing the sweep: {type(e).__name__}: {e}\n")
        return 1


if __name__ == "__main__":
    sys.exit(main())
