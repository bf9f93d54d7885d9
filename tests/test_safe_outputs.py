"""Safe outputs: a killed or stopped render never leaves a truncated file under a final name."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import imageio.v3 as iio
import pytest

from swingsim.io.files import TMP_PREFIX, atomic_write_text

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "swingsim" / "data" / "demo.toml"


def _start_render(out):
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.Popen(
        [sys.executable, "-m", "swingsim", "render", str(DEMO), "--out", str(out), "--size", "320x240",
         "--fps", "30", "--quiet"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env, start_new_session=True)


def _wait_for_partial(out, proc, timeout=60.0):
    """Wait until the render has begun writing (a temporary file exists)."""
    t0 = time.time()
    while time.time() - t0 < timeout:
        if proc.poll() is not None:
            pytest.fail("the render finished before it could be interrupted: " + proc.stderr.read())
        if out.is_dir() and any(p.name.startswith(TMP_PREFIX) for p in out.iterdir()):
            time.sleep(0.5)  # well inside the write
            return
        time.sleep(0.05)
    pytest.fail("the render never started writing")


def _assert_finals_complete(out):
    for p in out.iterdir() if out.exists() else []:
        if p.name.startswith(TMP_PREFIX):
            continue
        if p.suffix == ".png":
            img = iio.imread(p)
            assert img.ndim == 3 and img.shape[0] > 0, p
        elif p.suffix == ".mp4":
            meta = iio.immeta(p, plugin="FFMPEG")
            assert meta.get("duration", 0) > 0, p
        else:
            pytest.fail(f"unexpected final file {p.name}")


def test_kill_during_render_leaves_no_truncated_final_file(tmp_path):
    out = tmp_path / "video"
    proc = _start_render(out)
    try:
        _wait_for_partial(out, proc)
        assert proc.poll() is None  # killed mid-write
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait(timeout=30)
    finally:
        if proc.poll() is None:
            os.killpg(proc.pid, signal.SIGKILL)
    assert not (out / "demo.mp4").exists()  # the video's final name appears only when complete
    _assert_finals_complete(out)


def test_sigterm_stops_cleanly_with_message(tmp_path):
    out = tmp_path / "video"
    proc = _start_render(out)
    try:
        _wait_for_partial(out, proc)
        os.killpg(proc.pid, signal.SIGTERM)
        _, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            os.killpg(proc.pid, signal.SIGKILL)
    assert proc.returncode == 130, err
    assert "interrupted" in err and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1
    assert not (out / "demo.mp4").exists()
    leftovers = [p.name for p in out.rglob("*") if p.name.startswith(TMP_PREFIX)] if out.exists() else []
    assert leftovers == []
    _assert_finals_complete(out)


def test_atomic_write_keeps_old_file_on_failure(tmp_path):
    p = tmp_path / "summary.json"
    atomic_write_text(p, "old")

    class Boom(Exception):
        pass

    from swingsim.io import files

    with pytest.raises(Boom):
        with files.atomic_path(p) as tmp:
            tmp.write_text("half")
            raise Boom
    assert p.read_text() == "old"
    assert [x.name for x in tmp_path.iterdir()] == ["summary.json"]
