"""Sweep files: expansion into variants and validation errors that name the sweep file and key."""

import subprocess
import sys
from pathlib import Path

import pytest

from swingsim.errors import InputError
from swingsim.study.variants import load_sweep

ROOT = Path(__file__).resolve().parent.parent

SCENE = """
title = "sweep test base"
duration_s = 30.0
[crane]
suspension_m = [0.0, 0.0, 20.0]
[rope]
length_m = 8.0
[load]
mass_kg = 1500.0
[[moves]]
axis = "x"
profile = "trapezoid"
start_s = 1.0
distance_m = 6.0
speed_m_s = 1.0
accel_m_s2 = 0.5
"""


def write(tmp_path, sweep_text, scene_text=SCENE):
    (tmp_path / "base.toml").write_text(scene_text)
    p = tmp_path / "study.toml"
    p.write_text(sweep_text)
    return p


def test_cartesian_product_ranges_and_named_variants(tmp_path):
    p = write(tmp_path, """
base = "base.toml"
[vary]
"rope.length_m" = { from = 5.0, to = 11.0, count = 4 }
moves.0.profile = ["trapezoid", "zv"]
[[variants]]
name = "slow"
"moves.0.accel_m_s2" = 0.2
""")
    sw = load_sweep(p)
    assert len(sw.variants) == 4 * 2 + 1
    assert sw.keys == ("rope.length_m", "moves.0.profile", "moves.0.accel_m_s2")
    lengths = [v.values["rope.length_m"] for v in sw.variants[:8:2]]
    assert lengths == pytest.approx([5.0, 7.0, 9.0, 11.0], rel=1e-15)
    assert [v.scene.rope.length_m for v in sw.variants[:2]] == [5.0, 5.0]
    assert [v.scene.moves[0].profile for v in sw.variants[:2]] == ["trapezoid", "zv"]
    last = sw.variants[-1]
    assert last.name == "slow" and last.scene.moves[0].accel == 0.2 and last.scene.rope.length_m == 8.0
    assert sw.minimize == "settled_at_s"


@pytest.mark.parametrize("text, key, words", [
    ('base = "base.toml"\nvaryy = {}\n', "varyy", "did you mean 'vary'"),
    ('[vary]\n"rope.length_m" = [5.0]\n', "base", "missing"),
    ('base = "nothere.toml"\n[vary]\n"rope.length_m" = [5.0]\n', "base", "file not found"),
    ('base = "base.toml"\n[vary]\n"rope.lenght_m" = [5.0]\n', 'vary."rope.lenght_m"', "did you mean 'rope.length_m'"),
    ('base = "base.toml"\n[vary]\n"moves.3.accel_m_s2" = [0.1]\n', 'vary."moves.3.accel_m_s2"', "has 1 moves"),
    ('base = "base.toml"\n[vary]\n"moves.0.acel_m_s2" = [0.1]\n', 'vary."moves.0.acel_m_s2"', "moves.0.accel_m_s2"),
    ('base = "base.toml"\n[vary]\n"rope.length_m" = []\n', 'vary."rope.length_m"', "empty list"),
    ('base = "base.toml"\n[vary]\n"rope.length_m" = { from = 1.0, to = 2.0 }\n', 'vary."rope.length_m"',
     "missing count"),
    ('base = "base.toml"\n[vary]\n"rope.length_m" = { from = 1.0, to = 2.0, count = 0 }\n',
     'vary."rope.length_m".count', ">= 1"),
    ('base = "base.toml"\n[vary]\n"rope.length_m" = 7.0\n', 'vary."rope.length_m"', "expected a list"),
    # per column: the error names the column (the sweep key), the value and the first variant with it
    ('base = "base.toml"\n[vary]\n"rope.length_m" = [5.0, -2.0]\n', 'vary."rope.length_m"', "variant 1"),
    ('base = "base.toml"\n[vary]\n"moves.0.profile" = ["trapezoid", "s-curve"]\n', "vary",
     "needs distance_m, speed_m_s, accel_m_s2, jerk_m_s3"),
    ('base = "base.toml"\n[objective]\nminimize = "settle_time"\n[vary]\n"rope.length_m" = [5.0]\n',
     "objective.minimize", "did you mean 'settle_time_s'"),
    ('base = "base.toml"\n[objective]\nmax = { peak_deg = 3 }\n[vary]\n"rope.length_m" = [5.0]\n',
     "objective.max.peak_deg", "expected one of"),
    ('base = "base.toml"\n', "vary", "nothing to compare"),
    ('base = "base.toml"\n[[variants]]\n"rope.length_m" = 5.0\n', "variants[0].name", "needs a name"),
    ('base = "base.toml"\n[[variants]]\nname = "a"\n[[variants]]\nname = "a"\n', "variants[1].name", "duplicate"),
    ('base = "base.toml"\n[vary]\n"rope.length_m" = [5.0\n', "", "TOML syntax error"),
])
def test_validation_errors_name_file_and_key(tmp_path, text, key, words):
    p = write(tmp_path, text)
    with pytest.raises(InputError) as e:
        load_sweep(p)
    assert e.value.file == str(p)
    assert e.value.key == key
    assert words in str(e.value)
    assert "\n" not in str(e.value)


def test_invalid_base_scene_is_reported_through_the_sweep(tmp_path):
    p = write(tmp_path, 'base = "base.toml"\n[vary]\n"rope.length_m" = [5.0]\n',
              SCENE.replace("mass_kg = 1500.0", "mass_kg = -1.0"))
    with pytest.raises(InputError) as e:
        load_sweep(p)
    assert e.value.key == "base" and "load.mass_kg" in str(e.value)


def test_cli_bad_sweep_exit_2_one_line_nothing_written(tmp_path):
    p = write(tmp_path, 'base = "base.toml"\n[vary]\n"rope.lenght_m" = [5.0]\n')
    out = tmp_path / "out"
    r = subprocess.run([sys.executable, "-m", "swingsim", "compare", str(p), "--out", str(out)],
                       cwd=ROOT, capture_output=True, text=True)
    assert r.returncode == 2
    assert r.stderr.count("\n") == 1 and "rope.lenght_m" in r.stderr and "Traceback" not in r.stderr
    assert not out.exists()


def test_implausible_variant_count_needs_override(tmp_path):
    # 400 x 300 = 120,000 variants: beyond the plausibility limit unless allowed
    from swingsim.errors import InputError
    from swingsim.study.variants import PLAUSIBLE_VARIANTS, sweep_from_dict

    root = Path(__file__).resolve().parent.parent / "scenes"
    data = {"base": "yard_gantry_travel.toml",
            "vary": {"rope.length_m": {"from": 5.0, "to": 20.0, "count": 400},
                     "moves.0.accel_m_s2": {"from": 0.1, "to": 0.4, "count": 300}}}
    assert 400 * 300 > PLAUSIBLE_VARIANTS
    with pytest.raises(InputError, match="--allow-implausible"):
        sweep_from_dict(data, file="big.toml", base_dir=root)


# ---------------------------------------------------------------------------
# the columnar variant table


@pytest.mark.parametrize("vary, key, value_text", [
    # each distinct value is checked once against its scene key (scene/schema.py bounds and choices)
    ('"moves.0.accel_m_s2" = [0.5, 0.3, -0.1, 0.2]', 'vary."moves.0.accel_m_s2"', "-0.1"),
    ('"moves.0.profile" = ["trapezoid", "zz"]', 'vary."moves.0.profile"', "'zz'"),
    # a range 4, 0, -4: the first value outside "> 0" is 0.0, in variant 1
    ('"rope.length_m" = { from = 4.0, to = -4.0, count = 3 }', 'vary."rope.length_m"', "= 0.0: "),
])
def test_per_column_errors_name_the_sweep_key_and_the_value(tmp_path, vary, key, value_text):
    p = write(tmp_path, f'base = "base.toml"\n[vary]\n"rope.length_m" = [6.0, 7.0]\n{vary}\n'
              if not vary.startswith('"rope') else f'base = "base.toml"\n[vary]\n{vary}\n')
    with pytest.raises(InputError) as e:
        load_sweep(p)
    msg = str(e.value)
    assert e.value.key == key and value_text in msg and "first in variant" in msg
    assert "\n" not in msg


def test_variant_table_is_columnar_and_builds_few_scenes(tmp_path):
    # 8 rope lengths x 6 accelerations x 5 speeds = 240 variants, one array per varied key
    p = write(tmp_path, 'base = "base.toml"\n[vary]\n"rope.length_m" = { from = 5.0, to = 12.0, count = 8 }\n'
              '"moves.0.accel_m_s2" = [0.2, 0.3, 0.4, 0.5, 0.6, 0.7]\n'
              '"moves.0.speed_m_s" = [0.6, 0.8, 1.0, 1.2, 1.4]\n')
    sw = load_sweep(p)
    t = sw.table
    assert t.n == 240 and set(t.columns) == set(sw.keys)
    assert all(c.shape == (240,) for c in t.columns.values())
    # validation built one scene per rope length (group) and per move combination, not one per variant
    assert len(t._scenes) <= 8 + 6 * 5
    # the product order: first key slowest (as the sweep file reads)
    assert t.value(0, "rope.length_m") == 5.0 and t.value(239, "rope.length_m") == 12.0
    assert t.value(1, "moves.0.speed_m_s") == 0.8 and t.value(5, "moves.0.accel_m_s2") == 0.3
    # a variant's scene, built on demand, carries its values
    sc = sw.variants[137].scene
    assert sc.rope.length_m == t.value(137, "rope.length_m")
    assert sc.moves[0].accel == t.value(137, "moves.0.accel_m_s2")
    assert sc.moves[0].speed == t.value(137, "moves.0.speed_m_s")


def test_mixed_profile_sweep_leaves_out_keys_a_profile_does_not_use(tmp_path):
    p = write(tmp_path, 'base = "base.toml"\n[vary]\n'
              '"moves.0.profile" = ["trapezoid", "s-curve", "zv", "whole-period"]\n'
              '"moves.0.jerk_m_s3" = [0.8]\n"moves.0.decel_m_s2" = [0.4]\n')
    sw = load_sweep(p)
    by = {v.scene.moves[0].profile: v.scene.moves[0] for v in sw.variants}
    assert by["trapezoid"].jerk is None and by["trapezoid"].decel == 0.4
    assert by["s-curve"].jerk == 0.8 and by["zv"].jerk == 0.8
    assert by["whole-period"].decel is None  # whole-period takes no deceleration (motion/registry.py)
    assert sw.table.ignored == {("moves.0.jerk_m_s3", "trapezoid"): 1, ("moves.0.decel_m_s2", "whole-period"): 1}


def test_unused_key_still_refused_when_the_profile_is_not_varied(tmp_path):
    # only a sweep that sets the profile may leave keys out; otherwise the scene's own error stands
    p = write(tmp_path, 'base = "base.toml"\n[vary]\n"moves.0.jerk_m_s3" = [0.8]\n')
    with pytest.raises(InputError) as e:
        load_sweep(p)
    assert "jerk_m_s3" in str(e.value) and "trapezoid" in str(e.value)


@pytest.mark.parametrize("objective, key, words", [
    ('robust_over = "rope.lenght_m"', "objective.robust_over", "rope.length_m"),
    ('group_by = ["moves.0.speed_m_s"]', "objective.group_by", "compared key"),
    ('robust_over = "rope.length_m"\ngroup_by = "rope.length_m"', "objective.group_by", "cannot also be"),
])
def test_ranking_rule_keys_are_checked(tmp_path, objective, key, words):
    p = write(tmp_path, f'base = "base.toml"\n[objective]\n{objective}\n[vary]\n'
              '"rope.length_m" = [5.0, 6.0]\n"moves.0.accel_m_s2" = [0.3, 0.5]\n')
    with pytest.raises(InputError) as e:
        load_sweep(p)
    assert e.value.key == key and words in str(e.value) and "\n" not in str(e.value)


def test_bundled_mixed_profile_sweep_loads():
    sw = load_sweep(ROOT / "scenes" / "yard_gantry_mixed_sweep.toml")
    assert sw.robust_over == "rope.length_m" and sw.table.n == 5 * 6 * 2
    assert {sw.table.value(i, "moves.0.profile") for i in range(sw.table.n)} == \
        {"trapezoid", "s-curve", "whole-period", "zv", "zvd", "ei"}
