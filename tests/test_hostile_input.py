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
    assert "comparison.csv" in line and "not a file (a folder" in line


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



# ---------------------------------------------------------------------------
# class 7: messages quote user text escaped and shortened, never a file's contents

# ECMA-48 control sequences (ESC, CSI "clear screen"), the C1 control CSI, and the
# Unicode bidirectional controls of UAX #9 (RLO, LRI, PDF) and a zero-width space.
HOSTILE_TEXT = "\x1b[2J\x1b]0;owned\x07\x9b31m\u202eevil\u2066\u202c\u200b"
TABLE_SCENE = SCENE.replace('accel_m_s2 = 0.5\n', '').replace(
    'profile = "trapezoid"', 'profile = "table"').replace(
    'distance_m = 2.0\nspeed_m_s = 1.0\n', 'table_file = "record.csv"\n')


def _assert_terminal_safe(line):
    # nothing a terminal would act on: no C0/C1 control, no format (Cf) character (UCD categories)
    for ch in line:
        assert unicodedata.category(ch) not in ("Cc", "Cf"), (hex(ord(ch)), line)


def _table_scene(tmp_path, table_bytes):
    path = tmp_path / "scene.toml"
    path.write_text(TABLE_SCENE, encoding="utf-8")
    (tmp_path / "record.csv").write_bytes(table_bytes)
    return path


def test_table_scene_template_reads_a_good_table(tmp_path):
    scene = load_scene(_table_scene(tmp_path, b"t_s,position_m\n0,0\n2,1.5\n"))
    assert scene.moves[0].table.times_s == (0.0, 2.0)


@pytest.mark.parametrize("text", [HOSTILE_TEXT, "x" * 10_000 + HOSTILE_TEXT])
def test_unknown_key_is_quoted_escaped_and_short(tmp_path, text):
    path = tmp_path / "scene.toml"
    key = text.replace("\\", "").replace('"', "")
    toml_key = key.encode("unicode_escape").decode("ascii").replace("\\x", "\\u00")
    path.write_text(SCENE.replace("[rope]\n", f'[rope]\n"{toml_key}" = 1\n'), encoding="utf-8")
    with pytest.raises(InputError) as ei:
        load_scene(path)
    line = ei.value.one_line()
    _assert_terminal_safe(line)
    assert "\\x1b" in line and len(line) < 600  # the path, the shortened key, the allowed keys


def test_long_hostile_value_is_escaped_and_shortened(tmp_path):
    path = tmp_path / "scene.toml"
    value = (HOSTILE_TEXT + "y" * 5000).encode("unicode_escape").decode("ascii").replace("\\x", "\\u00")
    path.write_text(SCENE.replace('kind = "gantry"', f'kind = "{value}"'), encoding="utf-8")
    with pytest.raises(InputError) as ei:
        load_scene(path)
    line = ei.value.one_line()
    _assert_terminal_safe(line)
    assert "..." in line and len(line) < 400 and "yyyyyyyyyy" * 10 not in line


def test_hostile_file_name_is_escaped(tmp_path):
    path = tmp_path / ("scene" + HOSTILE_TEXT + ".toml")
    code, stderr = _cli(["check", path])
    assert code == 2
    _assert_terminal_safe(_one_clean_line(stderr))


def test_hostile_dotted_key_in_a_sweep_is_escaped(tmp_path, scene):
    sweep = tmp_path / "sweep.toml"
    key = ("moves.0." + HOSTILE_TEXT).encode("unicode_escape").decode("ascii").replace("\\x", "\\u00")
    sweep.write_text(f'base = "scene.toml"\n[vary]\n"{key}" = [1.0, 2.0]\n', encoding="utf-8")
    code, stderr = _cli(["compare", sweep, "--out", tmp_path / "out"])
    assert code == 2
    _assert_terminal_safe(_one_clean_line(stderr))


def test_table_header_with_escapes_is_not_echoed(tmp_path):
    path = _table_scene(tmp_path, ("t_s" + HOSTILE_TEXT + ",position_m\n0,0\n2,1\n").encode("utf-8"))
    code, stderr = _cli(["check", path])
    assert code == 2
    line = _one_clean_line(stderr)
    _assert_terminal_safe(line)
    assert "owned" not in line


@pytest.mark.parametrize("first_line", ["secretuser:x:0:0:secretuser:/root:/bin/bash",
                                        "SECRET_TOKEN=abc123def456", "{\"api_key\": \"secret\"}"])
def test_table_that_is_another_kind_of_file_is_not_echoed(tmp_path, first_line):
    # a scene naming a password file, an environment dump or a JSON file as its table
    path = _table_scene(tmp_path, (first_line + "\nmore:secret:lines\n").encode("utf-8"))
    code, stderr = _cli(["check", path])
    assert code == 2
    line = _one_clean_line(stderr)
    assert "secret" not in line.lower() and "abc123" not in line
    assert "header" in line


def test_table_row_is_not_echoed_beyond_the_offending_cell(tmp_path):
    path = _table_scene(tmp_path, b"t_s,position_m\n0,0\n1,2,SECRETCELL\n2,1\n")
    code, stderr = _cli(["check", path])
    assert code == 2 and "SECRETCELL" not in _one_clean_line(stderr)
    path = _table_scene(tmp_path, b"t_s,position_m\n0,0\nSECRETNUMBER,2\n2,1\n")
    code, stderr = _cli(["check", path])
    line = _one_clean_line(stderr)
    assert code == 2 and "'SECRETNUMBER'" in line  # the offending token itself, quoted


@pytest.mark.skipif(not Path("/proc/self/environ").exists(), reason="needs Linux /proc")
@pytest.mark.parametrize("special", ["/proc/self/environ", "/proc/self/status", "/dev/null", "/dev/zero", "."])
def test_table_that_is_not_a_regular_text_file(tmp_path, monkeypatch, special):
    monkeypatch.setenv("SWINGSIM_HOSTILE_MARKER", "marker-7f3a")
    path = tmp_path / "scene.toml"
    path.write_text(TABLE_SCENE.replace('"record.csv"', f'"{special}"'), encoding="utf-8")
    code, stderr = _cli(["check", path])
    assert code == 2
    line = _one_clean_line(stderr)
    assert "marker-7f3a" not in line and "Name:" not in line
    _assert_terminal_safe(line)


def test_utf8_byte_order_mark_is_accepted_and_removed(tmp_path):
    # the UTF-8 encoding form of U+FEFF (Unicode Standard, sec. 23.8) before the header
    (tmp_path / "plain").mkdir()
    (tmp_path / "marked").mkdir()
    plain = load_scene(_table_scene(tmp_path / "plain", b"t_s,position_m\n0,0\n2,1.5\n"))
    marked = load_scene(_table_scene(tmp_path / "marked", "\ufefft_s,position_m\n0,0\n2,1.5\n".encode("utf-8")))
    assert marked.moves[0].table == plain.moves[0].table


def test_header_that_differs_by_an_invisible_character_is_shown_escaped(tmp_path):
    path = _table_scene(tmp_path, "t_s,\u200bposition_m\n0,0\n2,1\n".encode("utf-8"))
    with pytest.raises(InputError) as ei:
        load_scene(path)
    line = ei.value.one_line()
    _assert_terminal_safe(line)
    assert "\\u200b" in line


# ---------------------------------------------------------------------------
# property-based sweeps (hypothesis): the only outcomes are success, or one line
# with exit code 2 and nothing written

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_PROPERTY = settings(deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                            HealthCheck.too_slow])


def _table_outcome_ok(folder, table_bytes):
    path = _table_scene(folder, table_bytes)
    try:
        load_scene(path)
    except InputError as exc:
        line = exc.one_line()
        assert "\n" not in line and len(line) < 700
        _assert_terminal_safe(line)


@settings(_PROPERTY, max_examples=150)
@given(data=st.binary(max_size=300))
def test_random_bytes_as_a_table_file(tmp_path_factory, data):
    _table_outcome_ok(tmp_path_factory.mktemp("bytes"), data)


@settings(_PROPERTY, max_examples=150)
@given(body=st.text(max_size=200), header=st.sampled_from(["t_s,position_m\n", "\ufefft_s,position_m\n", ""]))
def test_random_text_as_a_table_file(tmp_path_factory, body, header):
    _table_outcome_ok(tmp_path_factory.mktemp("text"), (header + body).encode("utf-8", "surrogatepass"))


def _cli_outcome(argv, out):
    try:
        code, stderr = _cli(argv)
    except SystemExit as exc:  # argparse: its own one line, exit 2
        code, stderr = exc.code, ""
    assert code in (0, 2), stderr
    if code == 2:
        if stderr:
            _assert_terminal_safe(_one_clean_line(stderr))
        assert not out.exists() or not any(out.iterdir())
    return code


_OPTION_VALUE = st.one_of(st.text(max_size=20), st.integers(-10**12, 10**12).map(str),
                          st.floats(allow_nan=True, allow_infinity=True).map(repr))


@settings(_PROPERTY, max_examples=40)
@given(option=st.sampled_from(["--out", "--fps", "--width", "--height", "--seconds", "--speed", "--bogus",
                               "--workers", "--export", "--video", "--force", "--quiet"]),
       value=_OPTION_VALUE)
def test_random_cli_option_values(tmp_path_factory, option, value):
    folder = tmp_path_factory.mktemp("opt")
    path = folder / "scene.toml"
    path.write_text(SCENE, encoding="utf-8")
    out = folder / "out"
    argv = ["check", path, option, value] if option in ("--workers", "--bogus") else \
        ["run", path, "--out", out, "--no-plots", "--quiet", option, value]
    with contextlib.chdir(folder):  # a relative --out stays in this folder
        _cli_outcome(argv, out)


_SEGMENT = st.one_of(st.sampled_from(["afile", ".", "x" * 300, " ", "-", "a b"]),
                     st.text(st.characters(blacklist_characters="/", blacklist_categories=("Cs",)),
                             min_size=1, max_size=12).filter(lambda seg: seg != ".."))


@settings(_PROPERTY, max_examples=30)
@given(segments=st.lists(_SEGMENT, min_size=1, max_size=3))
def test_random_output_paths(tmp_path_factory, segments):
    # every path stays inside a fresh folder (no absolute path, no "..")
    folder = tmp_path_factory.mktemp("outp")
    path = folder / "scene.toml"
    path.write_text(SCENE, encoding="utf-8")
    (folder / "afile").write_text("not a folder\n", encoding="utf-8")
    out = folder.joinpath(*segments)
    before = sorted(p.name for p in folder.iterdir())
    try:
        with contextlib.chdir(folder):
            code, stderr = _cli(["run", path, "--out", os.fsdecode(out), "--no-plots", "--quiet"])
    except SystemExit as exc:
        code, stderr = exc.code, ""
    assert code in (0, 2), stderr
    if code == 2:
        _assert_terminal_safe(_one_clean_line(stderr))
        assert sorted(p.name for p in folder.iterdir()) == before
