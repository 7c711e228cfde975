"""Write a report folder so that it is always whole: the files go into a fresh temporary folder
beside the target, and only a complete report replaces the previous one.

* An interrupted or failed run (Ctrl-C, SIGTERM, disk full, a read-only folder, an exception)
  removes its temporary folder and leaves the previous report as it was.
* A target folder is replaced only when it is empty or holds a previous matezone report (its
  manifest lists every file it holds); a folder with other files is refused before anything is
  written, so no user file is deleted and no stale file of an earlier report survives.
* The target itself must not be a symbolic link, and nothing is written through a link: every
  file is created new inside the temporary folder.

The swap of the finished folder for the old one is two renames in the same parent folder with
SIGINT and SIGTERM held back between them, so the report folder is either the old one or the new
one. Pure file handling: the pictures and pages come from :func:`viewer.report.write_report`.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import tempfile
from contextlib import contextmanager
from pathlib import Path

MANIFEST = ".matezone-report.json"


class ReportDirError(Exception):
    """The report folder cannot be written; the message says why and that nothing was changed."""


def _manifest_ok(folder: Path) -> tuple[bool, list[str]]:
    """(is the folder empty or a previous report, the names not accounted for)."""
    names = sorted(os.listdir(folder))
    if not names:
        return True, []
    try:
        listed = set(json.loads((folder / MANIFEST).read_text(encoding="utf-8"))["files"])
    except (OSError, ValueError, KeyError, TypeError):
        return False, names
    extra = [n for n in names if n != MANIFEST and n not in listed]
    return not extra, extra


def check_target(out: Path) -> None:
    """Refuse a target that cannot be replaced safely (before any work is done)."""
    if out.is_symlink():
        raise ReportDirError(f"--out {str(out)!r}: is a symbolic link; give the folder it points to")
    if out.exists():
        if not out.is_dir():
            raise ReportDirError(f"--out {str(out)!r}: exists and is not a folder")
        ok, extra = _manifest_ok(out)
        if not ok:
            shown = ", ".join(extra[:3]) + (" ..." if len(extra) > 3 else "")
            raise ReportDirError(f"--out {str(out)!r}: the folder holds files that are not part of a matezone "
                                 f"report ({shown}); choose an empty or a new folder")
    parent = out.parent if str(out.parent) else Path(".")
    if len(out.name.encode()) > 200:
        raise ReportDirError(f"--out: the folder name is {len(out.name.encode())} bytes long; expected at most 200")
    if parent.exists() and not os.access(parent, os.W_OK):
        raise ReportDirError(f"--out {str(out)!r}: its parent folder {str(parent)!r} is not writable")


@contextmanager
def _signals_held():
    """Hold SIGINT and SIGTERM back for the duration (the two renames of the swap)."""
    sigs = {signal.SIGINT, signal.SIGTERM}
    try:
        old = signal.pthread_sigmask(signal.SIG_BLOCK, sigs)
    except (AttributeError, ValueError, OSError):
        old = None
    try:
        yield
    finally:
        if old is not None:
            signal.pthread_sigmask(signal.SIG_SETMASK, old)


def _install(tmp: Path, out: Path) -> None:
    old = None
    with _signals_held():
        if out.exists():
            old = Path(tempfile.mkdtemp(prefix=f".{out.name}.old-", dir=out.parent))
            os.rmdir(old)
            os.rename(out, old)
        os.rename(tmp, out)
    if old is not None:
        shutil.rmtree(old, ignore_errors=True)


def write_report_atomic(res, out, **kwargs) -> list[Path]:
    """:func:`viewer.report.write_report` into ``out``, all or nothing. Returns the files written
    (their paths inside ``out``). Raises :class:`ReportDirError` with one message on failure
    (the previous report is then unchanged); KeyboardInterrupt passes through after cleaning up.
    """
    from viewer.report import write_report

    out = Path(out)
    check_target(out)
    parent = out.parent if str(out.parent) else Path(".")
    try:
        parent.mkdir(parents=True, exist_ok=True)
        tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.new-", dir=parent))
    except OSError as e:
        raise ReportDirError(f"--out {str(out)!r}: cannot create a folder there ({e.strerror})") from None
    progress = kwargs.get("progress")
    if progress is not None:  # name the files where they will be, not in the temporary folder
        kwargs["progress"] = lambda msg: progress(str(msg).replace(str(tmp), str(out)))
    try:
        written = write_report(res, tmp, **kwargs)
        names = sorted(p.name for p in tmp.iterdir())
        (tmp / MANIFEST).write_text(json.dumps({"files": names}, indent=1), encoding="utf-8")
        os.chmod(tmp, 0o777 & ~_umask())
        _install(tmp, out)
    except OSError as e:
        shutil.rmtree(tmp, ignore_errors=True)
        why = e.strerror or str(e)
        raise ReportDirError(f"--out {str(out)!r}: cannot write the report ({why}); "
                             "the previous report there, if any, is unchanged") from None
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    return [out / Path(p).name for p in written]


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask
