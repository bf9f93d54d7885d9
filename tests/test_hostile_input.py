"""Hostile input, second round: bad input is never an internal fault, and messages never echo raw text.

Every refusal is one line on stderr with exit code 2 and nothing written; exit
code 1 is kept for a genuine fault.  The expected behaviour comes from outside
the project where it can: which characters are ASCII digits (the ASCII table,
Python's ``str.isascii``), which characters are bidirectional controls and
format characters (Unicode Standard Annex #9 and the ``Cf`` category of the
Unicode Character Database, via :mod:`unicodedata`), what an escape sequence is
(ECMA-48: ESC, CSI), and the errno values of the operating system (:mod:`errno`).
"""

import contextlib
import errno
import io
import os
import unicodedata
from pathlib import Path

import pytest

from swingsim.cli.main import main
from swingsim.errors import InputError
from swingsim.scene import load_scene
from swingsim.scene.edit import get_dotted, set_dotted
from swingsim.study.variants import load_sweep

SCENE = """\
title = "Hostile input (invented)"
duration_s = 8.0

[crane]
kind = "gantry"
suspension_m = [0.0, 0.0, 16.0]

[rope]
length_m = 9.0

[load]
mass_kg = 6500.0

[[moves]]
label = "travel"
axis = "x"
profile = "trapezoid"
start_s = 1.0
distance_m = 2.0
speed_m_s = 1.0
accel_m_s2 = 0.5
"""


def _cli(argv):
    """Run the command line in this process: (exit code, stderr text)."""
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        code = main([str(a) for a in argv])
    return code, err.getvalue()


def _one_clean_line(stderr):
    lines = stderr.strip().splitlines()
    assert len(lines) == 1, stderr
    assert "Traceback" not in stderr and "internal error" not in stderr and "please report" not in stderr
    return lines[0]


@pytest.fixture
def scene(tmp_path):
    path = tmp_path / "scene.toml"
    path.write_text(SCENE, encoding="utf-8")
    return path


# ---------------------------------------------------------------------------
# class 6: bad input reported as an internal fault


# Unicode digits that Python's str.isdigit() accepts but that are not ASCII 0-9:
# ARABIC-INDIC DIGIT ZERO/THREE, SUPERSCRIPT TWO (int() refuses it), FULLWIDTH DIGIT ZERO.
NON_ASCII_DIGITS = ["\u0660", "\u0663", "\u00b2", "\uff10"]


@pytest.mark.parametrize("digit", NON_ASCII_DIGITS, ids=lambda d: unicodedata.name(d))
def test_non_ascii_digit_is_not_a_move_index(tmp_path, scene, digit):
    assert digit.isdigit() and not digit.isascii()  # Python's own view of the character
    sweep = tmp_path / "sweep.toml"
    sweep.write_text(f'base = "scene.toml"\n[vary]\n"moves.{digit}.accel_m_s2" = [0.4, 0.5]\n', encoding="utf-8")
    with pytest.raises(InputError) as ei:
        load_sweep(sweep)
    assert "ASCII digits" in ei.value.one_line()
    out = tmp_path / "out"
    code, stderr = _cli(["compare", sweep, "--out", out])
    assert code == 2
    assert "ASCII digits" in _one_clean_line(stderr)
    assert not out.exists()


def test_dotted_keys_index_lists_with_ascii_digits_only():
    doc = {"moves": [{"a": 1.0}]}
    assert get_dotted(doc, "moves.0.a") == 1.0
    assert get_dotted(doc, "moves.\u0660.a", "none") == "none"
    with pytest.raises(KeyError):
        set_dotted(doc, "moves.\u00b2.a", 2.0)


@pytest.mark.parametrize("depth", [40, 5000])
def test_deeply_nested_arrays_are_refused_in_one_line(tmp_path, depth):
    path = tmp_path / "deep.toml"
    path.write_text(SCENE.replace('title = "Hostile input (invented)"',
                                  "title = " + "[" * depth + "]" * depth), encoding="utf-8")
    with pytest.raises(InputError) as ei:
        load_scene(path)
    assert "nested more than" in ei.value.one_line()
    code, stderr = _cli(["check", path])
    assert code == 2 and "nested more than" in _one_clean_line(stderr)


def test_deeply_nested_sweep_is_refused_in_one_line(tmp_path, scene):
    sweep = tmp_path / "sweep.toml"
    sweep.write_text('base = "scene.toml"\n[vary]\n"rope.length_m" = ' + "[" * 3000 + "]" * 3000 + "\n",
                     encoding="utf-8")
    with pytest.raises(InputError) as ei:
        load_sweep(sweep)
    assert "nested more than" in ei.value.one_line()


def _sweep(tmp_path):
    sweep = tmp_path / "sweep.toml"
    sweep.write_text('base = "scene.toml"\n[vary]\n"moves.0.accel_m_s2" = [0.4, 0.5]\n', encoding="utf-8")
    return sweep


def test_resume_table_that_is_a_directory(tmp_path, scene):
    out = tmp_path / "out"
    (out / "comparison.csv").mkdir(parents=True)
    code, stderr = _cli(["compare", _sweep(tmp_path), "--out", out, "--resume"])
    assert code == 2
    line = _one_clean_line(stderr)
    assert "comparison.csv" in line and "not a regular file" in line


@pytest.mark.parametrize("junk", [b"\xff\xfe\x00junk\x1b[2J", b"variant\x00\n\x00\x00"])
def test_resume_table_that_holds_junk(tmp_path, scene, junk):
    out = tmp_path / "out"
    out.mkdir()
    (out / "comparison.csv").write_bytes(junk)
    code, stderr = _cli(["compare", _sweep(tmp_path), "--out", out, "--resume"])
    assert code == 2
    line = _one_clean_line(stderr)
    assert "comparison.csv" in line and "\x1b" not in line


def test_output_path_through_a_file(tmp_path, scene):
    # POSIX: a path component that is not a folder gives ENOTDIR
    out = scene / "out"
    code, stderr = _cli(["run", scene, "--out", out, "--no-plots", "--quiet"])
    assert code == 2
    line = _one_clean_line(stderr)
    assert str(out.parent) in line or str(out) in line
    assert "not a folder" in line


@pytest.mark.skipif(not Path("/proc/self").is_dir(), reason="needs Linux /proc")
def test_output_folder_in_a_system_folder(scene):
    # /proc accepts no new folders (proc(5)); the path names no user data
    out = Path("/proc/swingsim-hostile-test/out")
    code, stderr = _cli(["run", scene, "--out", out, "--no-plots", "--quiet"])
    assert code == 2
    assert "/proc/swingsim-hostile-test" in _one_clean_line(stderr)


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_output_folder_read_only(tmp_path, scene):
    parent = tmp_path / "ro"
    parent.mkdir()
    parent.chmod(0o555)
    try:
        code, stderr = _cli(["run", scene, "--out", parent / "out", "--no-plots", "--quiet"])
    finally:
        parent.chmod(0o755)
    assert code == 2
    assert "permission denied" in _one_clean_line(stderr).lower()


@pytest.mark.parametrize("number", [errno.ENOSPC, errno.EROFS, errno.EDQUOT, errno.EACCES])
def test_full_or_read_only_filesystem_is_one_line_exit_2(tmp_path, scene, monkeypatch, number):
    # the failure the operating system reports when writing (errno(3)), simulated at the rename
    def failing_replace(src, dst):
        raise OSError(number, os.strerror(number), str(dst))

    monkeypatch.setattr(os, "replace", failing_replace)
    out = tmp_path / "out"
    code, stderr = _cli(["run", scene, "--out", out, "--no-plots", "--quiet"])
    assert code == 2
    line = _one_clean_line(stderr)
    assert str(out) in line and os.strerror(number).lower() in line.lower()


def test_genuine_io_fault_is_exit_1_in_one_line(tmp_path, scene, monkeypatch):
    # EIO is a fault of the device, not of the input (errno(3)): exit 1, still one line
    def failing_replace(src, dst):
        raise OSError(errno.EIO, os.strerror(errno.EIO), str(dst))

    monkeypatch.setattr(os, "replace", failing_replace)
    code, stderr = _cli(["run", scene, "--out", tmp_path / "out", "--no-plots", "--quiet"])
    assert code == 1
    assert len(stderr.strip().splitlines()) == 1 and "Traceback" not in stderr
    assert os.strerror(errno.EIO).lower() in stderr.lower()


def test_resume_row_whose_index_is_not_ascii_digits_is_run_again(tmp_path, scene):
    # a row numbered with SUPERSCRIPT TWO (str.isdigit() is True, int() refuses it) is junk:
    # the variant runs again, nothing is reported as a fault
    from swingsim.study.compare import header

    sweep_path = _sweep(tmp_path)
    columns = header(load_sweep(sweep_path))
    out = tmp_path / "out"
    out.mkdir()
    (out / "comparison.csv").write_text(",".join(columns) + "\n" + ",".join(["\u00b2"] * len(columns)) + "\n",
                                        encoding="utf-8")
    code, stderr = _cli(["compare", sweep_path, "--out", out, "--resume"])
    assert code == 0, stderr
    rows = (out / "comparison.csv").read_text(encoding="utf-8").splitlines()
    assert len(rows) == 3 and "\u00b2" not in "".join(rows)

