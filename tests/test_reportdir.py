"""A report folder is always whole: an interrupted or failed run leaves the previous report as it
was (common practice, no source: write to a temporary folder, rename into place)."""

from __future__ import annotations

import errno
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

import viewer.report
from viewer.reportdir import MANIFEST, ReportDirError, write_report_atomic

ROOT = Path(__file__).resolve().parent.parent


def fake_writer(files: dict[str, str], fail_after: int | None = None, exc: BaseException | None = None):
    """A write_report stand-in that writes ``files`` one by one and fails after ``fail_after``."""

    def write(res, out, **kw):
        out = Path(out)
        done = []
        for i, (name, text) in enumerate(files.items()):
            if fail_after is not None and i == fail_after:
                raise exc
            (out / name).write_text(text)
            done.append(out / name)
        return done

    return write


def snapshot(folder: Path) -> dict[str, str]:
    return {p.name: p.read_text() for p in sorted(folder.iterdir())}


@pytest.fixture
def previous(tmp_path, monkeypatch):
    out = tmp_path / "report"
    monkeypatch.setattr(viewer.report, "write_report", fake_writer({"a.pdf": "old a", "b.png": "old b"}))
    write_report_atomic(None, out)
    return out, snapshot(out)


@pytest.mark.parametrize("exc", [KeyboardInterrupt(), OSError(errno.ENOSPC, "No space left on device"),
                                 RuntimeError("renderer failed")], ids=["ctrl-c", "disk-full", "error"])
def test_interrupted_run_leaves_the_previous_report_whole(tmp_path, monkeypatch, previous, exc):
    out, before = previous
    assert set(before) == {"a.pdf", "b.png", MANIFEST}
    monkeypatch.setattr(viewer.report, "write_report",
                        fake_writer({"a.pdf": "new a", "c.svg": "new c"}, fail_after=1, exc=exc))
    with pytest.raises((KeyboardInterrupt, ReportDirError, RuntimeError)):
        write_report_atomic(None, out)
    assert snapshot(out) == before
    assert [p.name for p in tmp_path.iterdir()] == ["report"]  # no temporary folder left


def test_complete_run_replaces_the_report_and_drops_stale_files(tmp_path, monkeypatch, previous):
    out, _ = previous
    monkeypatch.setattr(viewer.report, "write_report", fake_writer({"a.pdf": "new a", "c.svg": "new c"}))
    write_report_atomic(None, out)
    now = snapshot(out)
    assert now["a.pdf"] == "new a" and "b.png" not in now  # the stale file of the old report is gone
    assert json.loads(now[MANIFEST])["files"] == ["a.pdf", "c.svg"]


def test_a_folder_with_other_files_or_a_link_is_refused(tmp_path, monkeypatch):
    monkeypatch.setattr(viewer.report, "write_report", fake_writer({"a.pdf": "x"}))
    mine = tmp_path / "mine"
    mine.mkdir()
    (mine / "notes.txt").write_text("keep me")
    with pytest.raises(ReportDirError, match="not part of a matezone report"):
        write_report_atomic(None, mine)
    assert snapshot(mine) == {"notes.txt": "keep me"}
    link = tmp_path / "link"
    link.symlink_to(mine)
    with pytest.raises(ReportDirError, match="symbolic link"):
        write_report_atomic(None, link)


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_read_only_parent_is_one_message(tmp_path, monkeypatch):
    monkeypatch.setattr(viewer.report, "write_report", fake_writer({"a.pdf": "x"}))
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    try:
        with pytest.raises(ReportDirError, match="not writable"):
            write_report_atomic(None, ro / "report")
    finally:
        ro.chmod(0o700)


def test_disk_full_while_writing_the_manifest(tmp_path, monkeypatch, previous):
    out, before = previous
    monkeypatch.setattr(viewer.report, "write_report", fake_writer({"a.pdf": "new"}))
    real = Path.write_text

    def full(self, *a, **k):
        if self.name == MANIFEST:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real(self, *a, **k)

    monkeypatch.setattr(Path, "write_text", full)
    with pytest.raises(ReportDirError, match="No space left on device.*unchanged"):
        write_report_atomic(None, out)
    monkeypatch.setattr(Path, "write_text", real)
    assert snapshot(out) == before


def test_sigterm_during_a_real_report_keeps_the_previous_one(tmp_path, previous):
    # the window's Cancel sends SIGTERM to `matezone report`: one message, exit 130, old report whole.
    # The previous report is a complete one written through write_report_atomic (the fixture), so
    # only the interrupted run is a real, slow one.
    out, _ = previous
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    env.pop("DISPLAY", None)
    scene = ROOT / "scenes" / "gearbox_endcap_dowel.toml"
    cmd = [sys.executable, "-m", "matezone", "report", str(scene), "--out", str(out)]
    before = {p.name: p.read_bytes() for p in out.iterdir()}
    proc = subprocess.Popen(cmd, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    # wait until it has started writing pictures, then stop it
    t0 = time.time()
    while time.time() - t0 < 120:
        line = proc.stdout.readline()
        if line.startswith("[1/") or not line:
            break
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=120)
    if proc.returncode == 0:  # it finished before the signal arrived: nothing to check
        pytest.skip("the report finished before SIGTERM arrived")
    assert proc.returncode == 130, err
    assert "interrupted" in err and "Traceback" not in err
    assert len([ln for ln in err.splitlines() if ln.strip()]) == 1, err
    assert {p.name: p.read_bytes() for p in out.iterdir()} == before
    assert sorted(p.name for p in tmp_path.iterdir()) == [out.name]
