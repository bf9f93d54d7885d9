"""The video frame's layout: overlays never cover each other or the lift, text fits, edges are smooth.

First from the layout alone (no OpenGL), then on rendered frames: VTK's own text
measurement (``vtkTextActor.GetBoundingBox``) against the boxes, and the load's
pixels where the camera puts it, not overdrawn.  Frames are small and few.
"""

import itertools
import textwrap

import numpy as np
import pytest

from swingsim.constants import STANDARD_GRAVITY, newton_to_tonnes_force
from swingsim.metrics.cautions import CAUTION
from swingsim.render import layout as L
from swingsim.simulation import simulate

from conftest import make_scene

SIZES = [(640, 360), (1280, 720), (1920, 1080), (800, 600), (320, 240)]


def _boxes(lay):
    return list(lay.overlay_boxes().items()) + [(f"view_{i + 1}", v) for i, v in enumerate(lay.views)]


@pytest.mark.parametrize("n_views", [1, 2])
@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
def test_boxes_never_overlap_and_tile_the_frame(size, n_views):
    lay = L.compute_layout(size, n_views, CAUTION, readout_rows=12, legend_rows=4)
    w, h = size
    frame = L.Box(0, 0, w, h)
    boxes = _boxes(lay)
    for (na, a), (nb, b) in itertools.combinations(boxes, 2):
        assert not a.intersects(b), (na, a, nb, b)
    for name, b in boxes:
        assert b.inside(frame) and b.width > 0 and b.height > 0, (name, b)
    # nothing left undrawn: the boxes cover the frame exactly (disjoint, so their areas add up)
    assert sum(b.width * b.height for _, b in boxes) == pytest.approx(w * h)
    # the caution band is below the views across the whole width, the title bar above them
    assert lay.caution.x0 == 0 and lay.caution.x1 == w and lay.caution.y1 == h
    assert all(v.y1 <= lay.caution.y0 and v.y0 >= lay.title.y1 for v in lay.views)
    # a split picture's divider runs only between the tag strip and the caution band
    for d in lay.dividers:
        assert not d.intersects(lay.title) and not d.intersects(lay.clock) and not d.intersects(lay.caution)
    assert len(lay.tags) == (2 if n_views == 2 else 0)


@pytest.mark.parametrize("size", SIZES[:3], ids=lambda s: f"{s[0]}x{s[1]}")
def test_text_sizes_scale_with_the_frame_and_stay_legible(size):
    lay = L.compute_layout(size, 1, CAUTION, readout_rows=12)
    # at least the floors from 640x360 up (about 12 px lines on a 360-row projection: our own rule)
    for role, (_share, floor) in L.FONTS.items():
        assert lay.fonts[role] >= floor
    # proportional to the frame height where the share is above the floor (1080 rows: three times 360)
    assert L.font_px("caution", 1080) == round(L.FONTS["caution"][0] * 1080)
    # the caution band holds the whole caution at its size, and the panel all readout rows
    pad = lay.text_boxes["pad"]
    chars = L.chars_per_line(lay.caution.width - 2 * pad, lay.fonts["caution"])
    lines = textwrap.wrap(CAUTION, chars)
    assert len(lines) * lay.fonts["caution"] * L.LINE_EM <= lay.caution.height - 2 * pad + 1
    assert 12 * lay.fonts["panel"] * L.LINE_EM <= lay.panel.height - 2 * pad + 1
    assert L.READOUT_CHARS * L.CHAR_EM["mono"] * lay.fonts["panel"] <= lay.panel.width - 2 * pad + 1


def test_notes_keep_whole_entries_first_first():
    text = "RUN STOPPED at t = 3.00 s: slack rope.\nLoad IN zone: footpath\nslew: starts"
    out = L.fit_lines(text, 20, 5)
    # the stop notice (3 lines) and the zone line (2 lines) fill the 5 lines; the event is left out whole
    assert out.split("\n")[0].startswith("RUN STOPPED") and "footpath" in out and "slew" not in out
    assert all(len(line) <= 20 for line in out.split("\n")) and len(out.split("\n")) == 5


@pytest.mark.parametrize("size", [(640, 360), (1280, 720)], ids=lambda s: f"{s[0]}x{s[1]}")
def test_the_resonance_and_gust_notes_fit_the_notes_at_the_smallest_legible_size(size):
    from swingsim.render.facts import gust_note
    from swingsim.render.overlay import readout_rows

    # the fullest side panel: the readout of a slewing crane in wind with a chart, and 4 legend rows
    lay = L.compute_layout(size, 1, CAUTION, readout_rows=readout_rows("tower", True, True), legend_rows=4)
    pad = lay.text_boxes["pad"]
    chars = L.chars_per_line(lay.notes.width - 2 * pad, lay.fonts["notes"])
    resonance = "RESONANCE: radius moves every 12.50 s, swing period 12.69 s\nEach repetition adds swing."
    for note in (resonance, gust_note(20.8, 20.0, 41.7)):
        kept = L.fit_lines(note + "\nslew past the hut: ends", chars, lay.notes_lines)
        # the caution's first entry is kept whole, ahead of the events, in the box's lines
        head = note.split("\n")[0]
        assert " ".join(kept.split()).startswith(" ".join(head.split())), (kept, lay.notes_lines)
        assert len(kept.split("\n")) <= lay.notes_lines
        assert all(len(line) <= chars for line in kept.split("\n"))
    # and the notes box is still apart from every other box
    for name, b in lay.overlay_boxes().items():
        assert name == "notes" or not b.intersects(lay.notes)
    assert not any(v.intersects(lay.notes) for v in lay.views)


def test_tonnes_force_against_standard_gravity():
    # 1 tonne-force = 1000 kg x g_n, g_n = 9.80665 m/s^2 exactly (3rd CGPM, 1901)
    assert STANDARD_GRAVITY == 9.80665
    assert newton_to_tonnes_force(9806.65) == pytest.approx(1.0, rel=1e-15)
    assert newton_to_tonnes_force(np.array([49033.25]))[0] == pytest.approx(5.0, rel=1e-15)


# ----------------------------------------------------------------------------- rendered frames
ZONES = [{"name": "footpath", "kind": "exclusion", "min_m": [11.0, -3.0, 0.0], "max_m": [14.0, 3.0, 2.0],
          "margin_m": 1.0},
         {"name": "hut", "kind": "obstacle", "min_m": [2.0, 4.0, 0.0], "max_m": [5.0, 7.0, 3.0]}]


def _traj():
    return simulate(make_scene({"crane": {"kind": "tower", "suspension_m": [8.0, 0.0, 16.0]},
                                "rope": {"length_m": 9.0}, "wind": {"speed_m_s": 6.0, "direction_deg": 90.0},
                                "load": {"mass_kg": 2000.0, "size_m": [2.0, 2.0, 2.0]},
                                "moves": [{"axis": "radius", "profile": "trapezoid", "start_s": 0.0,
                                           "distance_m": 6.0, "speed_m_s": 3.0, "accel_m_s2": 1.5}]},
                               duration_s=5.0, zones=ZONES))


def _is_load_colour(px):
    """Signal orange of the load under any shading (as in test_render_video.py)."""
    px = np.asarray(px, dtype=float)
    r, g, b = px[..., 0], px[..., 1], px[..., 2]
    return (r > 90) & (r > 1.6 * g) & (g > 1.4 * b + 5)


CASES = [((640, 360), ("oblique",)), ((1280, 720), ("oblique",)), ((1920, 1080), ("side",)),
         ((1280, 720), ("side", "plan")), ((640, 360), ("oblique", "plan"))]


@pytest.mark.parametrize("size,views", CASES, ids=lambda c: "x".join(map(str, c)) if isinstance(c[0], int) else ",".join(c))
def test_rendered_text_fits_its_box_and_the_load_is_not_covered(size, views):
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = _traj()
    stage = Stage(traj, collect(traj), size=size, views=views, video_len_s=5.0)
    try:
        lay = stage.layout
        boxes = lay.overlay_boxes()
        for t, video_t in ((0.5, 0.5), (2.5, 2.5)):  # with the full caution, then the short one
            frame = next(draw_frames(stage, traj, np.array([t]), video_t0_index=int(video_t * 30), fps=30))
            # every word lies whole within its own box, as VTK's FreeType renderer drew it (a text
            # cut at its box's edge would be listed with ":cut")
            owner = {"title": lay.title, "clock": lay.clock, "readout": lay.panel, "notes": lay.notes,
                     "caution": lay.caution, "legend": lay.legend}
            owner.update({f"tag_{i + 1}": b for i, b in enumerate(lay.tags)})
            ext = stage.chrome.extents
            assert not [k for k in ext if k.endswith(":cut")], ext
            assert {"title", "clock", "readout", "caution"} <= set(ext)
            for key, tb in ext.items():
                box = owner[key.split("_")[0] if key.startswith("legend") else key]
                assert tb.inside(box) and tb.width > 0, (key, tb, box)
            load = traj.sample([t])["load"]
            # the same frame drawn again, with and without the 2D layer (bands, words, labels)
            frame = stage.grab()
            bare = stage.grab(overlay=False)
            tb = lay.title
            assert (frame[int(tb.y0):int(tb.y1), int(tb.x0):int(tb.x1)] != bare[int(tb.y0):int(tb.y1),
                    int(tb.x0):int(tb.x1)]).any()  # switching the layers off did take the words away
            for i, view in enumerate(lay.views):
                (c, r), = stage.project(load, i)
                # the load is in its view, so outside every overlay box (computed from the layout)
                assert view.contains(c, r), (i, c, r, view)
                assert not any(b.contains(c, r) for b in boxes.values())
                # ...and on the frame its pixels are not overdrawn by words, bands or labels
                r, c = int(round(r)), int(round(c))
                np.testing.assert_array_equal(frame[r - 2:r + 3, c - 2:c + 3], bare[r - 2:r + 3, c - 2:c + 3])
                if views[i] != "plan":  # (from above, the trolley hides the load)
                    assert _is_load_colour(frame[r - 1:r + 2, c - 1:c + 2]).mean() > 0.6, (i, frame[r, c])
                # the labels shown lie wholly in their view, apart from each other and off the load
                shown = [lb for _j, lb in stage._shown_labels[i]]
                for lb in shown:
                    assert lb.inside(view) and not lb.contains(c, r)
                for a_, b_ in itertools.combinations(shown, 2):
                    assert not a_.intersects(b_)
            # the bands are drawn: the caution band's colour at its middle, the title bar's dark
            assert frame[int(lay.title.y0) + 1, 1].mean() < 80
    finally:
        stage.close()


def test_high_quality_smooths_edges():
    """Supersampling blends the crane's edges into the sky: in the top third of a side view (sky and
    crane only, flat-shaded) the standard frame has a handful of colours, the high one many blends."""
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = _traj()
    counts = {}
    for quality in ("standard", "high"):
        stage = Stage(traj, collect(traj), size=(320, 180), views=("side",), quality=quality)
        try:
            frame = next(draw_frames(stage, traj, np.array([1.0])))
            assert frame.shape == (180, 320, 3)
            v = stage.layout.views[0]
            top = frame[int(v.y0):int(v.y0 + v.height / 3), int(v.x0):int(v.x1)].reshape(-1, 3)
            counts[quality] = len(np.unique(top, axis=0))
        finally:
            stage.close()
    assert counts["high"] > 2 * counts["standard"], counts


def test_zone_words_follow_the_summary_entries():
    """At every frame inside an entry the summary lists, the video reads "IN zone", never "near"."""
    from swingsim.metrics.single import summarize
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = _traj()
    summary = summarize(traj)
    entries = summary.data["zones"][0]["entries"]
    assert entries  # the test scene does enter the footpath
    times = np.arange(0.0, 5.0, 0.1)
    stage = Stage(traj, collect(traj, summary), size=(320, 180), views=("side",))
    try:
        inside = 0
        for t, _ in zip(times, draw_frames(stage, traj, times)):
            within = any(e["start_s"] <= t <= e["end_s"] for e in entries)
            words = stage.last_text.zone
            if within:
                inside += 1
                assert "IN zone: footpath" in words and "near zone: footpath" not in words, (t, words)
            else:
                assert "IN zone: footpath" not in words, (t, words)
        assert inside >= 3
        # the chunk's zone states (numpy over the chunk) are the summary's per-instant rule
        from swingsim.metrics.zones import zone_verdicts_at

        samples = traj.sample(times)
        stage.begin_chunk(samples)
        for i, t in enumerate(times):
            row = {k: (v[i] if isinstance(v, np.ndarray) and v.ndim and len(v) == len(times) else v)
                   for k, v in samples.items()}
            assert stage._zone_chunk[float(t)] == zone_verdicts_at(row, traj.scene), t
    finally:
        stage.close()


def test_the_inching_video_says_resonance_in_its_notes_at_640x360():
    from pathlib import Path

    from swingsim import load_scene
    from swingsim.metrics.single import summarize
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = simulate(load_scene(Path(__file__).resolve().parents[1] / "scenes" / "inching_resonance.toml"))
    sm = summarize(traj)
    assert any("resonance" in c for c in sm.data["cautions"])  # the summary's caution the video repeats
    stage = Stage(traj, collect(traj, sm), size=(640, 360), views=("oblique",), video_len_s=traj.t_end_s)
    try:
        t = 22.0  # after the last nudge, near the peak swing: the caution, then the events
        next(draw_frames(stage, traj, np.array([t]), video_t0_index=int(t * 30), fps=30))
        notes = stage.texts["notes"]
        assert notes.startswith("RESONANCE:") and "Each repetition adds swing." in " ".join(notes.split())
        ext = stage.chrome.extents
        assert "notes" in ext and not [k for k in ext if k.endswith(":cut")], ext
        assert ext["notes"].inside(stage.layout.notes)
        for name, b in stage.layout.overlay_boxes().items():
            assert name == "notes" or not ext["notes"].intersects(b), name
    finally:
        stage.close()
