"""Scene validation: every bad input gives one precise line naming file, key, value and what is allowed."""

import math
from pathlib import Path

import pytest

from swingsim.scene import schema
from swingsim.errors import SceneError
from swingsim.scene import load_scene

ROOT = Path(__file__).resolve().parent.parent

GOOD = """
title = "t"
duration_s = 30.0
[crane]
suspension_m = [0.0, 0.0, 30.0]
[rope]
length_m = 12.0
[load]
mass_kg = 800.0
[[moves]]
axis = "x"
profile = "trapezoid"
distance_m = 5.0
speed_m_s = 0.5
accel_m_s2 = 0.2
"""


def _write(tmp_path, text, name="scene.toml"):
    p = tmp_path / name
    p.write_text(text)
    return p


def _err(tmp_path, text):
    p = _write(tmp_path, text)
    with pytest.raises(SceneError) as ei:
        load_scene(p)
    msg = ei.value.one_line()
    assert "\n" not in msg
    assert msg.startswith(str(p))
    return msg


def test_good_scene_loads(tmp_path):
    sc = load_scene(_write(tmp_path, GOOD))
    assert sc.rope.length_m == 12.0
    assert sc.moves[0].distance == 5.0
    assert sc.gravity_m_s2 == 9.80665
    assert sc.wind.air_density_kg_m3 == 1.225


@pytest.mark.parametrize("edit, fragments", [
    (("length_m = 12.0", "lenght_m = 12.0"), ["rope.lenght_m", "did you mean 'length_m'"]),
    (("[load]", "[lode]"), ["lode", "did you mean 'load'"]),
    (("mass_kg = 800.0", "mass_kg = -800.0"), ["load.mass_kg = -800.0", "> 0"]),
    (("mass_kg = 800.0", "mass_kg = nan"), ["load.mass_kg = nan", "finite"]),
    (("mass_kg = 800.0", "mass_kg = inf"), ["load.mass_kg = inf", "finite"]),
    (("mass_kg = 800.0", "mass_kg = \"heavy\""), ["load.mass_kg = 'heavy'", "a number"]),
    (("mass_kg = 800.0", ""), ["load.mass_kg", "missing required key"]),
    (("duration_s = 30.0", "duration_s = true"), ["duration_s = true", "a number"]),
    (("suspension_m = [0.0, 0.0, 30.0]", "suspension_m = [0.0, 30.0]"), ["crane.suspension_m", "3 numbers"]),
    (('axis = "x"', 'axis = "z"'), ["moves[0].axis = 'z'", "one of 'x', 'y', 'slew', 'radius', 'hoist'"]),
    (('profile = "trapezoid"', 'profile = "trapezium"'), ["moves[0].profile", "did you mean 'trapezoid'"]),
    (('profile = "trapezoid"', 'profile = "s-curve"'), ["moves[0].jerk_m_s3", "missing", "s-curve"]),
    (('axis = "x"', 'axis = "slew"'), ["moves[0].distance_m", "not a key of a slew move", "angle_deg"]),
    (("speed_m_s = 0.5", "speed_m_s = 0.0"), ["moves[0].speed_m_s = 0.0", "> 0"]),
    (("distance_m = 5.0", "distance_m = 0.0"), ["moves[0].distance_m = 0.0", "must not be zero"]),
    (("distance_m = 5.0", "distance_m = 500.0"), ["moves[0]", "after the end of the simulation"]),
    (('axis = "x"', 'axis = "hoist"\ndistance_m_ = 1'), ["moves[0].distance_m_", "did you mean 'distance_m'"]),
])
def test_bad_values(tmp_path, edit, fragments):
    old, new = edit
    assert old in GOOD
    msg = _err(tmp_path, GOOD.replace(old, new, 1))
    for f in fragments:
        assert f in msg, msg


def test_hoist_too_short(tmp_path):
    text = GOOD.replace('axis = "x"', 'axis = "hoist"').replace("distance_m = 5.0", "distance_m = 11.95")
    msg = _err(tmp_path, text)
    assert "shorten the rope to" in msg


def test_toml_syntax_error_names_line(tmp_path):
    text = GOOD.replace("length_m = 12.0", "length_m = = 12.0")
    msg = _err(tmp_path, text)
    line = 1 + GOOD.splitlines().index("length_m = 12.0")
    assert f"scene.toml:{line}:" in msg
    assert "TOML syntax error" in msg


def test_missing_and_non_scene_files(tmp_path):
    with pytest.raises(SceneError, match="file not found"):
        load_scene(tmp_path / "nope.toml")
    with pytest.raises(SceneError, match="not a file"):
        load_scene(tmp_path)
    p = tmp_path / "bin.toml"
    p.write_bytes(b"\xff\xfe\x00garbage")
    with pytest.raises(SceneError, match="UTF-8"):
        load_scene(p)


def test_table_profile_files(tmp_path):
    (tmp_path / "rec.csv").write_text("t_s,position_m\n0,0\n1,0.2\n3,1.5\n5,2.0\n")
    text = GOOD.replace('profile = "trapezoid"\ndistance_m = 5.0\nspeed_m_s = 0.5\naccel_m_s2 = 0.2',
                        'profile = "table"\ntable_file = "rec.csv"')
    sc = load_scene(_write(tmp_path, text))
    assert sc.moves[0].table[1][-1] == 2.0
    msg = _err(tmp_path, text.replace("rec.csv", "missing.csv"))
    assert "missing.csv" in msg and "not found" in msg
    (tmp_path / "bad.csv").write_text("time,pos\n0,0\n1,1\n")
    msg = _err(tmp_path, text.replace("rec.csv", "bad.csv"))
    assert "t_s,position_m" in msg
    (tmp_path / "back.csv").write_text("t_s,position_m\n0,0\n2,1\n1,2\n")
    msg = _err(tmp_path, text.replace("rec.csv", "back.csv"))
    assert "increase strictly" in msg


def test_zone_corners(tmp_path):
    text = GOOD + '\n[[zones]]\nname = "wall"\nmin_m = [0, 0, 0]\nmax_m = [1, -1, 1]\n'
    msg = _err(tmp_path, text)
    assert "zones[0].max_m" in msg


def test_every_key_documented():
    # meta-test (python-control's docstring test as a model): no key without a meaning
    tables = [schema.TOP, *schema.TABLES.values(), *schema.ARRAYS.values()]
    for t in tables:
        for name, key in t.items():
            assert len(key.doc) > 10, name
            # dimensionless quantities say so in their name (ratio, coefficient, factor) and [-] in the doc
            # tolerance: EI shaper; efficiency: the reeving's and a sheave's; exponent, intensity: the
            # wind profile's shear exponent and the turbulence intensity (names fixed by issue #13)
            dimensionless = name.endswith(("ratio", "coefficient", "factor", "tolerance", "efficiency",
                                           "exponent", "intensity"))
            if dimensionless and key.kind == "float":
                assert "[-]" in key.doc, name
            if key.kind in ("float", "vec2", "vec3", "floats", "floats_or_float") and not dimensionless \
                    and name != "up":
                # a quantity's unit is in its name
                assert any(name.endswith(u) for u in ("_s", "_m", "_kg", "_m2", "_m_s", "_m_s2", "_m_s3",
                                                      "_deg", "_deg_s", "_deg_s2", "_deg_s3", "_hz", "_kN",
                                                      "_kg_m3", "_m_s2", "_kN_per_m", "_kg_m2", "_GPa", "_pct", "_N_m_per_rad",
                                                      "_N", "_N_per_m", "_N_s_per_m")), name


def test_reference_doc_in_sync():
    doc = (ROOT / "docs" / "scene-reference.md").read_text()
    assert doc.strip() == schema.reference_markdown().strip(), \
        "run: python -m swingsim.scene.schema > docs/scene-reference.md"


def scene_files():
    """Every bundled scene (sweep files, which name a base scene, are not scenes)."""
    import tomllib

    out = [ROOT / "swingsim" / "data" / "demo.toml"]
    for p in sorted((ROOT / "scenes").glob("*.toml")):
        if "base" not in tomllib.loads(p.read_text()):
            out.append(p)
    return out


@pytest.mark.parametrize("path", scene_files(), ids=lambda p: p.name)
def test_bundled_scenes_valid(path):
    sc = load_scene(path)
    assert sc.title and math.isfinite(sc.duration_s)
