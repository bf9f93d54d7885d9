"""Hostile outputs: partial results, concurrent runs, cut rows, quoted paths and leftovers.

Every case here broke a promise once: a failure must leave the output folder
as it was, a second command into a busy folder is refused with one line and
exit code 2, ``compare --resume`` never takes a cut row as finished, an
apostrophe in a path is a valid path, and nothing hidden is left behind.
"""

import csv
import io
import os

import subprocess
import sys
import zlib
from argparse import Namespace
from pathlib import Path

import numpy as np
import pytest

from swingsim.cli import compare as compare_cli
from swingsim.cli import plan as plan_cli
from swingsim.cli.main import main
from swingsim.io.files import TMP_PREFIX
from swingsim.study import plan as planning

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "swingsim" / "data" / "demo.toml"
GANTRY = ROOT / "scenes" / "yard_gantry_travel.toml"


def _cli(*args):
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "swingsim", *args], capture_output=True, text=True,
                          env=env, timeout=300)


def _scene_with_title(tmp_path, title):
    text = GANTRY.read_text(encoding="utf-8")
    lines = [ln for ln in text.splitlines() if not ln.startswith("title")]
    path = tmp_path / "scene.toml"
    path.write_text(f"title = {title!r}\n" + "\n".join(lines) + "\n", encoding="utf-8")
    return path


def _hidden(out):
    return sorted(p.name for p in out.rglob("*") if p.name.startswith(TMP_PREFIX)) if out.exists() else []


# ----------------------------------------------------------------------------
# class 2: partial results on failure


def test_maths_markup_in_title_is_drawn_literally(tmp_path):
    # matplotlib reads $...$ as maths unless text.parse_math is off (matplotlib rcParams docs)
    scene = _scene_with_title(tmp_path, "gantry $x^$ lift")
    out = tmp_path / "out"
    assert main(["run", str(scene), "--out", str(out), "--quiet"]) == 0
    assert (out / "swing.png").stat().st_size > 0


def test_failed_plot_leaves_the_folder_as_it_was(tmp_path, monkeypatch):
    from swingsim.report import plots

    def broken(*args, **kwargs):
        raise RuntimeError("plotting failed")

    monkeypatch.setattr(plots, "FIGURES", {"swing.png": broken})
    out = tmp_path / "out"
    assert main(["run", str(GANTRY), "--out", str(out), "--quiet"]) == 1
    assert not out.exists()  # not summary.json and timeseries.csv without their plots
    # an existing folder (with --force) keeps its earlier files untouched
    out.mkdir()
    (out / "summary.json").write_text("earlier")
    assert main(["run", str(GANTRY), "--out", str(out), "--quiet", "--force"]) == 1
    assert sorted(p.name for p in out.iterdir()) == ["summary.json"]
    assert (out / "summary.json").read_text() == "earlier"


def test_file_that_is_not_a_mesh_refused_before_anything_is_written(tmp_path):
    text = GANTRY.read_text(encoding="utf-8").replace("[load]\n", '[load]\nmesh_file = "notes.stl"\n', 1)
    assert "mesh_file" in text
    (tmp_path / "notes.stl").write_text("these are notes, not a mesh\n")
    scene = tmp_path / "scene.toml"
    scene.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    for options in (("--export", "--fps", "5"), ("--video", "--size", "160x120", "--fps", "5")):
        option = options[0]
        r = _cli("run", str(scene), "--out", str(out), *options)
        if "OpenGL" in r.stderr:
            pytest.skip("no OpenGL for the video")
        assert r.returncode == 2, (option, r.stderr)
        assert len(r.stderr.strip().splitlines()) == 1 and "notes.stl" in r.stderr
        assert not out.exists(), option  # not the six result files before the refusal


# ----------------------------------------------------------------------------
# class 3: two commands into one folder at once


def test_second_command_into_a_busy_folder_is_refused(tmp_path):
    from swingsim.io.files import locked_out_dir

    out = tmp_path / "out"
    with locked_out_dir(out, force=False):
        r = _cli("run", str(GANTRY), "--out", str(out), "--force")
        assert r.returncode == 2, r.stderr
        assert len(r.stderr.strip().splitlines()) == 1
        assert "another swingsim command is writing into" in r.stderr
        assert list(out.iterdir()) == []  # the refused run wrote nothing
    assert not out.exists()  # the lock leaves no file behind


def test_a_refused_command_leaves_the_busy_folder_to_its_holder(tmp_path, monkeypatch):
    """Both commands find no folder and create it; the one refused for the lock must not remove it.

    The race seen on a loaded CI machine (one run in some hundred): the loser
    removed the still-empty folder it thought it had created, and the winner's
    staging then failed with "no such file or directory".
    """
    import fcntl

    from swingsim.errors import InputError
    from swingsim.io import files

    out = tmp_path / "out"
    real = files._lock_folder
    held = []

    def other_command_locks_first(path, what):
        fd = os.open(path, os.O_RDONLY | os.O_DIRECTORY)  # the winner's lock, taken in between
        fcntl.flock(fd, fcntl.LOCK_EX)
        held.append(fd)
        return real(path, what)

    monkeypatch.setattr(files, "_lock_folder", other_command_locks_first)
    try:
        with pytest.raises(InputError, match="another swingsim command"):
            with files.locked_out_dir(out, force=False):
                pass
        assert out.is_dir()  # still there for the command that holds it
    finally:
        for fd in held:
            os.close(fd)


def test_two_runs_started_at_once_do_not_mix(tmp_path):
    out = tmp_path / "out"
    other = _scene_with_title(tmp_path, "the other scene")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    procs = [subprocess.Popen([sys.executable, "-m", "swingsim", "run", str(s), "--out", str(out), "--quiet"],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
             for s in (GANTRY, other)]
    results = [(p.wait(timeout=300), p.stderr.read()) for p in procs]
    for p in procs:
        p.stdout.close()
        p.stderr.close()
    codes = sorted(code for code, _ in results)
    assert codes == [0, 2], results  # one wins, the other is refused (busy, or no longer empty)
    loser = next(err for code, err in results if code == 2)
    assert len(loser.strip().splitlines()) == 1
    import json

    title = json.loads((out / "summary.json").read_text())["title"]
    assert title in (out / "summary.txt").read_text()
    assert _hidden(out) == []


# ----------------------------------------------------------------------------
# class 4: compare's rows carry a checksum; --resume redoes any row that fails it

SWEEP = ('sensitivity = false\n[vary]\n"rope.length_m" = [6.0, 8.0, 10.0, 12.0, 14.0]\n'
         '"moves.0.accel_m_s2" = [0.2, 0.35]\n')


def _args(sweep, out, **kw):
    d = dict(sweep=str(sweep), out=str(out), resume=False, force=False, workers=None, cluster=None,
             engine="batch", chunk=3, no_sensitivity=True, quiet=True)
    d.update(kw)
    return Namespace(**d)


@pytest.fixture(scope="module")
def sweep_run(tmp_path_factory):
    d = tmp_path_factory.mktemp("sweep")
    sw = d / "s.toml"
    sw.write_text(f'base = "{GANTRY.as_posix()}"\n' + SWEEP)
    full = d / "full"
    assert compare_cli.main(_args(sw, full)) == 0
    return sw, (full / "comparison.csv").read_text()


def test_every_row_carries_a_crc32_of_its_other_fields(sweep_run):
    # CRC-32 (ISO 3309 / ITU-T V.42) as computed by zlib.crc32
    _, want = sweep_run
    rows = list(csv.reader(io.StringIO(want)))
    assert rows[0][-1] == "crc32"
    for r in rows[1:]:
        line = io.StringIO()
        csv.writer(line, lineterminator="").writerow(r[:-1])
        assert r[-1] == f"{zlib.crc32(line.getvalue().encode('utf-8')):08x}"


@pytest.mark.parametrize("damage", ["cut_in_last_field", "junk_number"])
def test_resume_redoes_a_damaged_row(sweep_run, tmp_path, damage):
    sw, want = sweep_run
    lines = want.splitlines(keepends=True)
    part = tmp_path / "part"
    part.mkdir()
    if damage == "cut_in_last_field":  # a disk full mid-row: same field count, a shorter last value
        k = max(i for i, ln in enumerate(lines) if len(next(csv.reader([ln]))[-1]) > 5)
        text = "".join(lines[:k]) + lines[k][:-5]
    else:  # a number spoiled in place, field count unchanged
        cells = next(csv.reader([lines[3]]))
        cells[-3] = "1.2x"
        buf = io.StringIO()
        csv.writer(buf, lineterminator="\n").writerow(cells)
        text = "".join(lines[:3]) + buf.getvalue() + "".join(lines[4:6])
    (part / "comparison.csv").write_text(text)
    assert compare_cli.main(_args(sw, part, resume=True)) == 0
    assert (part / "comparison.csv").read_text() == want


def _mount_tmpfs(path, size):
    path.mkdir()
    try:
        r = subprocess.run(["mount", "-t", "tmpfs", "-o", f"size={size}", "tmpfs", str(path)],
                           capture_output=True, timeout=30)
    except (OSError, subprocess.TimeoutExpired):
        return False
    return r.returncode == 0


def test_full_disk_during_compare_then_resume(sweep_run, tmp_path):
    sw, want = sweep_run
    mnt = tmp_path / "small"
    if not _mount_tmpfs(mnt, "1m"):
        pytest.skip("cannot mount a tmpfs here")
    try:
        st = os.statvfs(mnt)
        free = st.f_bavail * st.f_frsize
        filler = mnt / "filler"
        keep = 4096 * max(1, len(want) // 2 // 4096)  # room for about half the rows
        filler.write_bytes(b"\0" * (free - keep))
        out = mnt / "cmp"
        r = _cli("compare", str(sw), "--out", str(out), "--chunk", "3", "--no-sensitivity", "--quiet")
        assert r.returncode == 2, r.stderr
        assert len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr
        assert "No space left on device" in r.stderr and str(out) in r.stderr
        assert not (out / "ranking.csv").exists() and not (out / "report.html").exists()
        filler.unlink()
        assert compare_cli.main(_args(sw, out, resume=True)) == 0
        assert (out / "comparison.csv").read_text() == want
    finally:
        subprocess.run(["umount", str(mnt)], capture_output=True, timeout=30)


# ----------------------------------------------------------------------------
# class 8: an apostrophe in the output path


def test_joining_segments_under_a_path_with_quotes(tmp_path):
    # ffmpeg concat demuxer: inside '...' a quote is written '\'' (ffmpeg-formats, "concat")
    import imageio.v3 as iio

    from swingsim.render import writers

    folder = tmp_path / "crew's \"yard\" video"
    folder.mkdir()
    parts = []
    for i in range(2):
        seg = folder / f"part{i}.mp4"
        sink = writers.Mp4Writer(seg, (64, 48), 10.0)
        for _ in range(5):
            sink.write(np.full((48, 64, 3), 40 * i, dtype=np.uint8))
        sink.close()
        parts.append(seg)
    target = writers.concat_mp4(parts, folder / "lift.mp4")
    meta = iio.immeta(target, plugin="FFMPEG")
    assert meta["duration"] == pytest.approx(1.0, abs=0.15)


# ----------------------------------------------------------------------------
# class 10: leftovers


def test_parts_folder_of_a_killed_render_cleaned_on_the_next_run(tmp_path):
    out = tmp_path / "out"
    parts = out / f"{TMP_PREFIX}lift.mp4-parts-abc123"
    parts.mkdir(parents=True)
    (parts / "part000.mp4").write_bytes(b"\0" * 100)
    (parts / "job000.pickle").write_bytes(b"\0" * 10)
    assert main(["run", str(GANTRY), "--out", str(out), "--quiet", "--no-plots"]) == 0
    assert _hidden(out) == []


def test_stopped_plan_leaves_no_unverified_table(tmp_path, monkeypatch):
    scene = tmp_path / "site.toml"
    scene.write_text(GANTRY.read_text(encoding="utf-8"), encoding="utf-8")
    out = tmp_path / "out"

    def stopped(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(planning, "verify", stopped)
    a = Namespace(scene=str(scene), move=0, max_residual_deg=0.5, rope_range="8:12", out=str(out),
                  force=False, quiet=True)
    with pytest.raises(KeyboardInterrupt):
        plan_cli.main(a)
    assert not out.exists() or (list(out.iterdir()) == [])
    assert not (out / "move0-plan.csv").exists()
    assert not (out / "move0-plan.toml").exists() and not (out / "move0-speed-reference.csv").exists()
