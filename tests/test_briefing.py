"""briefing.pdf read back by real PDF clients (poppler-utils), SVG plots, tonnes-force, mode names.

The PDF checks use Debian's poppler-utils (``pdftotext``, ``pdftoppm``, ``pdfinfo``), an
independent reader of the files; ``.ci/run`` installs them, and a test fails (never skips)
without them.
"""

import json
import math
import re
import shutil
import subprocess
import xml.etree.ElementTree as ElementTree

import numpy as np
import pytest

from conftest import make_scene
from swingsim.cli.main import main
from swingsim.cli.run import DEMO_SCENE
from swingsim.constants import STANDARD_GRAVITY_M_S2, newton_to_tonnes_force
from swingsim.metrics import cautions
from swingsim.metrics.cautions import force_text
from swingsim.metrics.single import summarize
from swingsim.metrics.modes import mode_names
from swingsim.report.tables import summary_text
from swingsim.simulation import prepare, simulate

from test_scene import GOOD

#: Paper sizes [pt], portrait: ISO 216 A4 is 210 x 297 mm = 595.28 x 841.89 pt (1 in = 25.4 mm =
#: 72 pt); US Letter is 8.5 x 11 in = 612 x 792 pt (ANSI/ASME Y14.1).
PAPER_PT = {"a4": (595.28, 841.89), "letter": (612.0, 792.0)}


def _poppler(tool, *args) -> str:
    if shutil.which(tool) is None:
        pytest.fail(f"{tool} not found: install Debian's poppler-utils (.ci/run does)")
    return subprocess.run([tool, *args], capture_output=True, text=True, check=True, timeout=120).stdout


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    """The demo scene run once (A4, the default), with its plots as PNG and SVG."""
    out = tmp_path_factory.mktemp("brief") / "demo"
    assert main(["run", str(DEMO_SCENE), "--out", str(out), "--quiet", "--plots", "both"]) == 0
    return out


@pytest.fixture(scope="module")
def letter_run(tmp_path_factory):
    """A short scene on US Letter, without plot files (the briefing keeps its plots)."""
    folder = tmp_path_factory.mktemp("letter")
    scene = folder / "s.toml"
    scene.write_text(GOOD)
    out = folder / "out"
    assert main(["run", str(scene), "--out", str(out), "--quiet", "--paper", "letter", "--no-plots"]) == 0
    return out


def _words(text: str) -> str:
    """Text with every run of white space as one space (pdftotext breaks lines where the layout does)."""
    return " ".join(text.split())


def test_pdftotext_finds_the_caution_title_and_peak_swing(demo_run):
    text = _words(_poppler("pdftotext", str(demo_run / "briefing.pdf"), "-"))
    summary = json.loads((demo_run / "summary.json").read_text())
    assert _words(cautions.CAUTION) in text
    assert summary["title"] in text
    # the peak swing as summary.json has it, formatted as the briefing formats angles (0.1 deg)
    assert f"Peak rope angle from vertical {summary['peak_rope_angle_deg']:.1f} deg" in text
    # the hook load in kN and in tonnes-force, 1 t = 9.80665 kN (standard gravity, CGPM 1901)
    peak_kN = summary["peak_hook_load_kN"]
    assert f"{peak_kN:.1f} kN ({peak_kN / 9.80665:.2f} t)" in text
    assert "1 t = 9.80665 kN" in text
    # the zone verdicts, word for word as summary.txt gives them
    for zone in summary["zones"]:
        assert zone["name"] in text
    # every page says it is a preview, and which page it is
    pages = int(re.search(r"Pages:\s+(\d+)", _poppler("pdfinfo", str(demo_run / "briefing.pdf"))).group(1))
    assert text.count("Preview only") == pages
    assert f"page {pages} of {pages}" in text


@pytest.mark.parametrize("run, paper", [("demo_run", "a4"), ("letter_run", "letter")])
def test_every_page_has_the_paper_size_asked_for(run, paper, request):
    pdf = request.getfixturevalue(run) / "briefing.pdf"
    info = _poppler("pdfinfo", "-f", "1", "-l", "999", str(pdf))
    sizes = [(float(w), float(h)) for w, h in re.findall(r"Page\s+\d+ size:\s+([\d.]+) x ([\d.]+) pts", info)]
    assert sizes, info
    for w, h in sizes:  # text pages portrait, plot pages landscape: the same sheet turned
        assert sorted((w, h)) == pytest.approx(PAPER_PT[paper], abs=0.5)
    assert (sizes[0][0] < sizes[0][1])  # the first page (title, caution, key numbers) is portrait
    assert "CreationDate" not in info  # no time stamp: the same run gives the same file


def test_every_page_renders_non_blank(demo_run, tmp_path):
    import matplotlib.image

    _poppler("pdftoppm", "-png", "-r", "30", str(demo_run / "briefing.pdf"), str(tmp_path / "p"))
    pages = sorted(tmp_path.glob("p-*.png"))
    assert len(pages) >= 2  # the text page(s) and a page per plot
    for page in pages:
        pixels = matplotlib.image.imread(str(page))[..., :3]
        inked = int(np.sum(pixels.min(axis=-1) < 0.9))  # pixels clearly not white: text and lines
        assert inked > 20, page.name  # more than a stray dot: at 30 dpi a footer alone inks hundreds


def test_svg_plots_parse_as_svg(demo_run):
    svgs = sorted(demo_run.glob("*.svg"))
    assert {p.stem for p in svgs} == {p.stem for p in demo_run.glob("*.png")}
    for p in svgs:
        root = ElementTree.parse(p).getroot()  # well-formed XML (Python's own parser)
        assert root.tag == "{http://www.w3.org/2000/svg}svg", p.name
        # text kept as text, so the caution is searchable in the vector file
        assert cautions.CAUTION_SHORT.split(" - ")[0] in p.read_text()


def test_no_briefing_and_bad_paper(tmp_path):
    scene = tmp_path / "s.toml"
    scene.write_text(GOOD)
    out = tmp_path / "out"
    assert main(["run", str(scene), "--out", str(out), "--quiet", "--no-plots", "--no-briefing"]) == 0
    assert not (out / "briefing.pdf").exists() and (out / "summary.txt").exists()
    with pytest.raises(SystemExit) as exc:  # argparse: one line, exit 2, nothing written
        main(["run", str(scene), "--out", str(tmp_path / "never"), "--paper", "a3"])
    assert exc.value.code == 2
    assert not (tmp_path / "never").exists()


# -- tonnes-force ----------------------------------------------------------------------------

def test_tonne_force_is_standard_gravity():
    # standard gravity g_n = 9.80665 m/s^2 exactly, by definition (3rd CGPM, 1901); one tonne-force
    # is the weight of 1000 kg under it: 9806.65 N
    assert STANDARD_GRAVITY_M_S2 == 9.80665
    assert newton_to_tonnes_force(9806.65) == pytest.approx(1.0, rel=1e-15)
    assert newton_to_tonnes_force(np.array([0.0, 98066.5])) == pytest.approx([0.0, 10.0], rel=1e-15)
    assert force_text(9.80665) == "9.8 kN (1.00 t)"
    assert force_text(None) == "n/a"


def test_summary_text_gives_every_force_in_kN_and_t():
    # a hook block and a rigid load on one leg: hook load, line pull, leg tensions
    scene = make_scene({"hook": {"mass_kg": 200.0}, "rigging": {"leg_length_m": 2.0, "wll_kN": 40.0},
                        "load": {"mass_kg": 2000.0, "size_m": [3.0, 1.0, 1.0]}},
                       moves=[{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 5.0,
                               "speed_m_s": 0.5, "accel_m_s2": 0.2}], duration_s=15.0)
    traj = simulate(scene)
    text = summary_text(summarize(traj), scene, mode_names(traj.model))
    assert text.count(cautions.TONNE_FORCE_NOTE) == 1  # the conversion stated once
    pairs = re.findall(r"(-?\d+\.\d) kN \((-?\d+\.\d\d) t\)", text)
    assert len(pairs) >= 6
    for kN, t in pairs:  # each tonne figure is its kN figure over 9.80665, within both roundings
        assert abs(float(t) - float(kN) / 9.80665) <= 0.005 + 0.05 / 9.80665 + 1e-12
    # no force in kN without its tonnes (kN/m is a stiffness, not a force)
    bare = re.findall(r"\d kN(?![/\w]| \(-?\d+\.\d\d t\))", text.replace(cautions.TONNE_FORCE_NOTE, ""))
    assert bare == [], bare


# -- mode names ------------------------------------------------------------------------------

def test_double_pendulum_modes_are_named_by_their_shapes():
    # The linear double pendulum (hook block on the rope, load on a sling leg): the lower mode swings
    # both bodies the same way, the upper one the leg against the rope (textbook normal modes; e.g.
    # French, Vibrations and Waves, 1971, ch. 5; Goldstein, Classical Mechanics, ch. 6)
    scene = make_scene({"hook": {"mass_kg": 300.0}, "rigging": {"leg_length_m": 3.0},
                        "load": {"mass_kg": 1200.0}, "rope": {"length_m": 8.0}})
    model, _motion = prepare(scene)
    assert mode_names(model) == ["hook and load swing together", "load swings against the hook"]


def test_point_mass_and_rigid_load_modes():
    point = make_scene()
    model, _motion = prepare(point)
    assert mode_names(model) == ["load swings on the rope"]
    # a long box (long side along x) hanging on one short leg: two swing modes (rope and load
    # together) and two rocking modes (the load tilting against the rope: a compound double
    # pendulum's upper modes, textbook as above), one about each horizontal axis
    box = make_scene({"rigging": {"leg_length_m": 1.0}, "load": {"mass_kg": 2000.0, "size_m": [4.0, 1.0, 1.0]}})
    model, _motion = prepare(box)
    names = mode_names(model)
    assert len(names) == len(model.mode_periods_s()) == 4
    assert sorted(names[:2]) == ["load swings on the rope, along x", "load swings on the rope, along y"]
    assert sorted(names[2:]) == ["load rocks end to end on its slings", "load tilts about its long axis"]
    assert all(math.isfinite(p) for p in model.mode_periods_s())


# -- resonance, gusts, no near-empty page ------------------------------------------------------

def _run_scene(folder, text=None, path=None):
    out = folder / "out"
    if text is not None:
        path = folder / "s.toml"
        path.write_text(text)
    assert main(["run", str(path), "--out", str(out), "--quiet", "--no-plots"]) == 0
    return out


def test_briefing_gives_the_resonance_of_the_inching_scene(tmp_path):
    from pathlib import Path

    out = _run_scene(tmp_path, path=Path(__file__).resolve().parents[1] / "scenes" / "inching_resonance.toml")
    text = _words(_poppler("pdftotext", str(out / "briefing.pdf"), "-"))
    summary = json.loads((out / "summary.json").read_text())
    # the summary's resonance caution, word for word
    caution = [c for c in summary["cautions"] if "resonance" in c]
    assert caution and _words(caution[0]) in text
    # the modes' sharpness as summary.json has it (summary.txt's decimals)
    assert "Resonance" in text
    for m in summary["response_modes"]:
        short, long_ = m["half_power_periods_s"]
        assert f"{m['period_s']:.2f} s {m['label']} {100 * m['damping_ratio']:.2f}%" in text
        assert f"{m['peak_amplification']:.0f} x static" in text
        assert f"{short:.2f} to {long_:.2f} s ({100 * m['half_power_fraction']:.1f}%)" in text
    # the rhythm of the inching, in resonance, and the frequency response plot with its caption
    rhythm = summary["move_rhythms"][0]
    assert f"Rhythm of the radius moves (repeated moves, {rhythm['from_s']:.1f} to {rhythm['to_s']:.1f} s) " \
           f"{rhythm['rhythm_s']:.2f} s: IN RESONANCE with mode 1" in text
    assert "Frequency response at the start of the lift" in text


GUSTY = GOOD.replace('title = "t"', 'title = "gusty"').replace("duration_s = 30.0", "duration_s = 20.0") + """
[wind]
speed_m_s = 8.0
turbulence_intensity = 0.15
spectrum = "kaimal"
seed = 3
realisations = 3
"""


def test_briefing_gives_the_gust_statistics(tmp_path):
    out = _run_scene(tmp_path, GUSTY)
    text = _words(_poppler("pdftotext", str(out / "briefing.pdf"), "-"))
    summary = json.loads((out / "summary.json").read_text())
    stats = summary["gust_statistics"]
    assert "Wind at the load" in text
    assert f"Peak gust at load height {summary['peak_gust_m_s']:.2f} m/s" in text
    assert f"Over {stats['realisations']} turbulence realisations" in text
    st = stats["peak_rope_angle_deg"]
    assert f"Peak rope angle {st['mean']:.1f} deg {st['p95']:.1f} deg {st['max']:.1f} deg" in text
    # the 95th percentile lies between the mean and the largest (definition of a percentile)
    assert st["mean"] <= st["p95"] + 1e-12 and st["p95"] <= st["max"] + 1e-12
    hook = stats["peak_hook_load_kN"]
    assert f"{hook['max']:.1f} kN ({newton_to_tonnes_force(1e3 * hook['max']):.2f} t)" in text


def test_no_page_but_the_last_is_nearly_empty(demo_run, tmp_path):
    import matplotlib.image

    # a page whose ink ends in its top third (a few lines spilled over) is a near-empty page:
    # our rule; the footer strip (the bottom 0.75 in of 11.7 in) is left out of the count
    _poppler("pdftoppm", "-png", "-r", "30", str(demo_run / "briefing.pdf"), str(tmp_path / "p"))
    pages = sorted(tmp_path.glob("p-*.png"))
    for page in pages[:-1]:
        pixels = matplotlib.image.imread(str(page))[..., :3]
        h = pixels.shape[0]
        body = pixels[: int(h * (1 - 0.75 / 8.27 if pixels.shape[1] > h else 1 - 0.75 / 11.69))]
        rows = np.nonzero((body.min(axis=-1) < 0.9).any(axis=1))[0]
        assert rows.size and rows.max() > h / 3, page.name
