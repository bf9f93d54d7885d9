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
