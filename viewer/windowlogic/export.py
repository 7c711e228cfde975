"""The report export as the window runs it, without Qt: the ``matezone report`` command line
for the scene shown (saved to a temporary file), and the one message a failed or cancelled run
ends with (the command's own last line, as the command line prints it)."""

from __future__ import annotations


def scene_file_name(label: str) -> str:
    """The name the scene is saved under for the command: its own when it is a ``.toml`` file.

    >>> scene_file_name("cap.toml"), scene_file_name("<unsaved scene>")
    ('cap.toml', 'scene.toml')
    """
    return label if label.endswith(".toml") else "scene.toml"


def report_command(python: str, scene_path: str, folder: str, view: str, bonus_basis: str,
                   sizes: dict[str, float], points: dict[str, str]) -> list[str]:
    """``python -m matezone.cli report`` on ``scene_path`` into ``folder`` with the window's
    camera, bonus basis, what-if sizes (``--size ID=VALUE``, every digit kept) and points files
    (``--points ID=PATH``). Every path is used as given: pass absolute paths, the command does
    not run in the window's working folder."""
    cmd = [python, "-m", "matezone.cli", "report", scene_path, "--out", folder,
           "--view", view, "--bonus-basis", bonus_basis]
    for fid, size in sizes.items():
        cmd += ["--size", f"{fid}={size!r}"]
    for fid, path in points.items():
        cmd += ["--points", f"{fid}={path}"]
    return cmd


def not_written(folder: str) -> str:
    """The message of a report cancelled before the command could say so itself."""
    return f"cancelled; nothing was written to {folder!r} (a previous report there is unchanged)"


def failure_message(stderr: str, code: int, cancelled: bool, folder: str) -> str:
    """The one message of a run that exited with ``code`` != 0: the command's last line without
    its ``matezone:`` prefix; for a cancelled run stopped before it could say so
    (:func:`not_written`); else the exit status.

    >>> failure_message("matezone: report folder holds other files\\n", 2, False, "/r")
    'report folder holds other files'
    >>> failure_message("", 1, False, "/r")
    'matezone report exited with status 1'
    """
    lines = [x.strip() for x in stderr.strip().splitlines() if x.strip()]
    msg = lines[-1].removeprefix("matezone: ") if lines else ""
    if cancelled and (code < 0 or not msg):  # stopped before the command could say so
        msg = not_written(folder)
    return msg or f"matezone report exited with status {code}"
