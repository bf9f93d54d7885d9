"""briefing.pdf: the printable briefing sheet of one run (matplotlib's PDF backend).

What it holds, in order: the title and the caution; the lift in one paragraph
(crane, rope, load, moves, wind); the key numbers in a table (swing, excursion,
settling, hook load and line pull in kN and t, chart utilisation, sling legs
against their WLL, the swing modes by name); the zone verdicts; the cautions
and what the model leaves out; then every plot as vector graphics on a
landscape page of the same paper, and the video's stills when there are any.

Layout never overflows: text is wrapped to the measured width of its font
(:class:`matplotlib.textpath.TextToPath`), a block that does not fit goes on
to a new page line by line or row by row (a table repeats its header), and
every page carries the caution, the title and "page i of n" in its footer.
Text stays text in the PDF (Type 42 fonts), so a PDF reader can search and copy
it.  The file is deterministic: no creation date.
"""

from __future__ import annotations

import math

import io
from pathlib import Path

from swingsim.io.files import atomic_write_bytes
from swingsim.metrics import cautions
from swingsim.metrics.cautions import force_text
from swingsim.metrics.modes import mode_names
from swingsim.report.style import GREY, INK, LIMIT, literal_text
from swingsim.report.tables import half_power_text, peak_text, rhythm_sentences
from swingsim.scene.site import wind_words

#: Paper sizes [in] (portrait): ISO 216 A4 (210 x 297 mm) and US Letter (8.5 x 11 in).
PAPER_IN = {"a4": (210.0 / 25.4, 297.0 / 25.4), "letter": (8.5, 11.0)}

#: Page margins [in]: sides, top, and the bottom strip that holds the footer.
MARGIN_IN, TOP_IN, FOOTER_IN = 0.65, 0.6, 0.75

#: One line of a plot page's caption per plot (the same words as the README's list of plots).
PLOT_CAPTIONS = {
    "swing": "Rope angle from vertical over time, with its projections on x-z and y-z, the caution "
             "angle, the peak and when the swing settles; moves shaded; in a varying wind, the wind "
             "speed at the load against the in-service limit (right-hand axis).",
    "speed": "Horizontal speed of the suspension point, the load's speed and the hoist speed over time.",
    "plan": "Plan view of the suspension point's and the load's paths with the swing envelope, zones "
            "and margins; right: the load's offset from the plumb line against the clearance.",
    "rigging": "Sling leg tensions in kN and t against the hanging tension and the declared WLL; below: "
               "the load's tilt (or the leg's angle to the hoist rope).",
    "chart": "Utilisation of the rated capacity chart over time, and the lift's path on the chart "
             "(hook load as mass against radius).",
    "response": "Frequency response at the start of the lift: the steady swing per m/s2 of suspension-point "
                "acceleration against the forcing period, for each direction of travel; each swing mode's "
                "period, half-power band and our resonance band marked, and the rhythm of repeated moves.",
}

#: Still kinds of the renderer (file name ``<scene>_<kind>.png``) -> caption.
STILL_CAPTIONS = {"peak_swing": "At the peak swing", "end_of_moves": "When the last move ends",
                  "settled": "When the swing has settled", "stopped": "Where the run stopped"}


class _Text:
    """Measures text in points with matplotlib's own font metrics, and wraps it to a width.

    Each character's advance is measured once per font size and weight and a line's width is
    their sum; kerning, which the sum leaves out, only narrows a line, and :data:`WIDTH_SAFETY`
    keeps a margin for rounding.
    """

    #: Share of the width a wrapped line may fill [-].
    WIDTH_SAFETY = 0.95

    def __init__(self):
        from matplotlib.font_manager import FontProperties
        from matplotlib.textpath import TextToPath

        self._to_path = TextToPath()
        self._font = FontProperties
        self._advance = {}  # (size, bold) -> {character: advance [pt]}

    def width_pt(self, text: str, size: float, bold: bool = False) -> float:
        table = self._advance.setdefault((size, bold), {})
        width = 0.0
        for ch in text:
            if ch not in table:
                props = self._font(size=size, weight="bold" if bold else "normal")
                # the advance of a character: the width of "x<ch>x" less that of "xx" (spaces have no ink)
                both = self._to_path.get_text_width_height_descent(f"x{ch}x", props, ismath=False)[0]
                pair = self._to_path.get_text_width_height_descent("xx", props, ismath=False)[0]
                table[ch] = both - pair
            width += table[ch]
        return width / self.WIDTH_SAFETY

    def wrap(self, text: str, width_pt: float, size: float, bold: bool = False) -> list:
        """Greedy word wrap; a word longer than the line is cut (never runs past the margin)."""
        lines = []
        for paragraph in str(text).split("\n"):
            line = ""
            for word in paragraph.split(" "):
                trial = f"{line} {word}" if line else word
                if self.width_pt(trial, size, bold) <= width_pt:
                    line = trial
                    continue
                if line:
                    lines.append(line)
                while self.width_pt(word, size, bold) > width_pt:  # a very long word: cut it
                    cut = len(word)
                    while cut > 1 and self.width_pt(word[:cut], size, bold) > width_pt:
                        cut -= 1
                    lines.append(word[:cut])
                    word = word[cut:]
                line = word
            lines.append(line)
        return lines


class _Document:
    """Pages (matplotlib figures) filled top to bottom with a cursor; a block that does not fit starts a page."""

    def __init__(self, paper: str, title: str):
        import matplotlib

        matplotlib.use("Agg", force=True)
        import matplotlib.pyplot as plt

        self.plt = plt
        self.portrait = PAPER_IN[paper]
        self.title = title
        self.pages = []
        self.text = _Text()
        self.page = None
        self.y_in = 0.0  # cursor, from the page's top
        #: A plot that shares a text page: (page index, figure, caption, its top from the page's top [in]).
        self.host = None
        self._hosted_bottom = None

    # -- pages -------------------------------------------------------------------
    def new_page(self, landscape: bool = False):
        w, h = self.portrait[::-1] if landscape else self.portrait
        if self.host is not None and not landscape and len(self.pages) == self.host[0]:
            # the page is the shared plot's own figure, the plot placed below where the text will end
            _index, fig, _caption, top = self.host
            self._hosted_bottom = _place_figure(fig, (w, h), (MARGIN_IN, top, w - 2 * MARGIN_IN, h))
            self.page = fig
        else:
            self.page = self.plt.figure(figsize=(w, h))
        self.pages.append(self.page)
        self.y_in = TOP_IN
        return self.page

    def place_hosted(self) -> None:
        """After the text: the shared plot's caption under it (the plot was placed with its page)."""
        if self.host is None:
            return
        if self._hosted_bottom is None or self.page is not self.host[1]:
            raise RuntimeError("the shared plot's page was not the last text page")  # the two passes differ
        self.y_in = self._hosted_bottom + 0.05
        self.lines(self.host[2], 9.0)

    def close(self) -> None:
        """Close every page's figure without writing it (the layout probe)."""
        for page in self.pages:
            self.plt.close(page)
        self.pages = []
        self.page = None

    @property
    def size_in(self):
        return tuple(self.page.get_size_inches())

    @property
    def width_pt(self) -> float:
        return (self.size_in[0] - 2 * MARGIN_IN) * 72.0

    def room_in(self) -> float:
        return self.size_in[1] - FOOTER_IN - self.y_in

    def need(self, height_in: float) -> None:
        """Start a new page unless ``height_in`` still fits above the footer."""
        if self.page is None or height_in > self.room_in():
            self.new_page()

    def put(self, x_in, text, size, *, bold=False, colour=INK, ha="left"):
        """Write one line with its top at the cursor (no wrapping: callers wrap)."""
        w, h = self.size_in
        self.page.text(x_in / w, 1.0 - self.y_in / h, text, fontsize=size, ha=ha, va="top",
                       weight="bold" if bold else "normal", color=colour)

    # -- blocks ------------------------------------------------------------------
    def lines(self, text, size=9.5, *, bold=False, colour=INK, indent_in=0.0, gap_in=0.06, bullet=None):
        """A wrapped paragraph, broken across pages line by line."""
        lead = 1.3 * size / 72.0
        width = self.width_pt - 72.0 * indent_in - (12.0 if bullet else 0.0)
        for i, line in enumerate(self.text.wrap(text, width, size, bold)):
            self.need(lead)
            if bullet and i == 0:
                self.put(MARGIN_IN + indent_in, bullet, size, colour=colour)
            self.put(MARGIN_IN + indent_in + (12.0 / 72.0 if bullet else 0.0), line, size, bold=bold, colour=colour)
            self.y_in += lead
        self.y_in += gap_in

    def heading(self, text, size=12.5):
        self.need(0.25 + 3 * 1.3 * 9.5 / 72.0)  # never a heading alone at a page's foot
        self.y_in += 0.1
        self.lines(text, size, bold=True, gap_in=0.04)

    def caution_box(self, text, size=9.5):
        from matplotlib.patches import Rectangle

        lead = 1.3 * size / 72.0
        pad = 0.08
        rows = self.text.wrap(text, self.width_pt - 2 * 72.0 * pad - 4.0, size, bold=True)
        self.need(len(rows) * lead + 2 * pad)
        w, h = self.size_in
        top = self.y_in
        box_h = len(rows) * lead + 2 * pad
        self.page.add_artist(Rectangle((MARGIN_IN / w, 1.0 - (top + box_h) / h), 1.0 - 2 * MARGIN_IN / w, box_h / h,
                                       transform=self.page.transFigure, facecolor="#fbeeee", edgecolor=LIMIT,
                                       lw=1.5))
        self.y_in += pad
        for row in rows:
            self.put(MARGIN_IN + pad, row, size, bold=True, colour=LIMIT)
            self.y_in += lead
        self.y_in += pad + 0.1

    def table(self, header, rows, widths, size=8.5):
        """A table: cells wrapped to their column, rows never split, the header repeated on each page."""
        from matplotlib.lines import Line2D

        lead = 1.25 * size / 72.0
        total = sum(widths)
        cols_pt = [self.width_pt * f / total for f in widths]

        def wrapped(cells, bold):
            return [self.text.wrap(str(c), wd - 6.0, size, bold) for c, wd in zip(cells, cols_pt)]

        def rule(colour=GREY, lw=0.6):
            w, h = self.size_in
            y = 1.0 - (self.y_in - 0.03) / h
            self.page.add_artist(Line2D([MARGIN_IN / w, 1.0 - MARGIN_IN / w], [y, y], transform=self.page.transFigure,
                                        color=colour, lw=lw))

        def draw(cells, bold):
            x = MARGIN_IN
            for col, wd in zip(cells, cols_pt):
                keep = self.y_in
                for line in col:
                    self.put(x, line, size, bold=bold)
                    self.y_in += lead
                self.y_in = keep
                x += wd / 72.0
            self.y_in += max(len(c) for c in cells) * lead + 0.04

        head = wrapped(header, True)
        head_h = max(len(c) for c in head) * lead + 0.04
        first = True
        for row in rows:
            cells = wrapped(row, False)
            row_h = max(len(c) for c in cells) * lead + 0.04
            if first or row_h > self.room_in():
                self.need(head_h + row_h + 0.05)
                draw(head, True)
                rule(INK, 0.8)
                first = False
            draw(cells, False)
            rule()
        self.y_in += 0.12

    def image(self, png_path, caption, height_in):
        """A raster image (a still) scaled into the text width, with its caption below."""
        import matplotlib.image as mpimg

        pixels = mpimg.imread(str(png_path))
        ph, pw = pixels.shape[:2]
        width_in = self.width_pt / 72.0
        draw_h = min(height_in, width_in * ph / pw)
        draw_w = draw_h * pw / ph
        self.need(draw_h + 0.35)
        w, h = self.size_in
        ax = self.page.add_axes([(MARGIN_IN + (width_in - draw_w) / 2) / w, 1.0 - (self.y_in + draw_h) / h,
                                 draw_w / w, draw_h / h])
        ax.imshow(pixels, interpolation="none")
        ax.set_axis_off()
        self.y_in += draw_h + 0.05
        self.lines(caption, 8.5, colour=INK)

    # -- the finished file -------------------------------------------------------
    def pdf_bytes(self) -> bytes:
        from matplotlib.backends.backend_pdf import PdfPages

        n = len(self.pages)
        buf = io.BytesIO()
        with literal_text(), self.plt.rc_context({"pdf.fonttype": 42}):
            with PdfPages(buf, metadata={"Title": self.title, "Creator": "swingsim", "CreationDate": None}) as pdf:
                for i, page in enumerate(self.pages):
                    self.page = page
                    self._footer(i + 1, n)
                    pdf.savefig(page)
                    self.plt.close(page)
        return buf.getvalue()

    def _footer(self, number, count):
        from matplotlib.lines import Line2D

        w, h = self.size_in
        size = 7.0
        lines = self.text.wrap(cautions.CAUTION_SHORT, self.width_pt * 0.78, size)
        top = h - FOOTER_IN + 0.12
        self.page.add_artist(Line2D([MARGIN_IN / w, 1.0 - MARGIN_IN / w], [1 - top / h] * 2,
                                    transform=self.page.transFigure, color=GREY, lw=0.6))
        for k, line in enumerate(lines[:3]):
            self.page.text(MARGIN_IN / w, 1.0 - (top + 0.06 + k * 1.3 * size / 72.0) / h, line, fontsize=size,
                           color=LIMIT, va="top", ha="left")
        self.page.text(1.0 - MARGIN_IN / w, 1.0 - (top + 0.06) / h, f"page {number} of {count}", fontsize=size,
                       color=INK, va="top", ha="right")


def lift_paragraph(summary, scene) -> str:
    """The lift in one paragraph: crane, rope, load, moves, wind.

    Parameters
    ----------
    summary : swingsim.metrics.Summary
        The run's measures (its move list).
    scene : swingsim.scene.Scene
        The scene.

    Returns
    -------
    str
        Plain sentences, numbers with their units.
    """
    d = summary.data
    crane = scene.crane
    x, y, z = crane.suspension_m
    words = [f"A {crane.kind} crane holds the rope {z:.1f} m above the ground"]
    if crane.slewing:
        cx, cy = crane.slew_center_m
        words[0] += f", at a radius of {((x - cx) ** 2 + (y - cy) ** 2) ** 0.5:.1f} m from its slew axis"
    rope = scene.rope
    words.append(f"{rope.length_m:.1f} m of rope on {rope.falls} fall(s)"
                 + (" (elastic)" if rope.elastic else "")
                 + (f" under a {scene.hook.mass_kg:.0f} kg hook block" if scene.hook is not None else ""))
    load = scene.load
    size = (f" ({' x '.join(f'{v:.1f}' for v in load.size_m)} m)" if load.size_m else "")
    rig = f" on a {scene.rigging.kind} rig" if scene.rigging is not None else ""
    words.append(f"The load is {load.mass_kg:.0f} kg ({load.mass_kg / 1000.0:.2f} t){size}{rig}")
    text = words[0] + ", with " + words[1] + ". " + words[2] + "."
    moves = d.get("move_list") or []
    if moves:
        parts = []
        for m in moves:
            nd = 1 if m["unit"].startswith("deg") else 2
            parts.append(f"{m['name']} ({m['axis']}, {m['distance']:+.{nd}f} {m['unit']} from t = "
                         f"{m['start_s']:.1f} s to {m['end_s']:.1f} s)")
        text += f" {len(moves)} move(s): " + "; ".join(parts) + "."
    else:
        text += " No move: the load hangs as it starts."
    if scene.wind.speed_m_s > 0:
        text += (f" Wind {scene.wind.speed_m_s:.1f} m/s {wind_words(scene)}; the rope at rest leans "
                 f"{d['rest_rope_angle_deg']:.1f} deg downwind.")
    else:
        text += " No wind."
    if getattr(scene.start, "on_ground", False):
        off = math.hypot(*scene.start.load_offset_m)
        text += (f" The load starts resting on the ground (z = {scene.ground.z_m:g} m)"
                 + (f", its centre of gravity {off:.2f} m from the plumb below the hook." if off else ", plumb."))
    elif getattr(scene, "ground", None) is not None:
        text += f" The ground it can land on is at z = {scene.ground.z_m:g} m."
    lines = getattr(scene, "tag_lines", ())
    if lines:
        text += (f" {len(lines)} tag line(s), held by hand: "
                 + "; ".join(f"{line.name(j)} ({line.length_m:g} m)" for j, line in enumerate(lines)) + ".")
    text += f" Simulated for {d['simulated_until_s']:.1f} s with the {d['model']} model."
    return text


def key_numbers(summary, scene, names=None) -> list:
    """The key numbers table: rows of (quantity, value, against).

    Parameters
    ----------
    summary : swingsim.metrics.Summary
        The run's measures.
    scene : swingsim.scene.Scene
        The scene (limits, ratings).
    names : list of str, optional
        The swing modes' names (:func:`swingsim.metrics.modes.mode_names`).

    Returns
    -------
    list of tuple
        ``(quantity, value, what it is compared with)``, strings, decimals fixed
        as in summary.txt.
    """
    d = summary.data
    lim = scene.limits
    rows = [("Peak rope angle from vertical", f"{d['peak_rope_angle_deg']:.1f} deg at t = "
             f"{d['peak_rope_angle_time_s']:.1f} s", f"caution angle {lim.swing_caution_deg:.1f} deg")]
    if d.get("swing_at_move_end_deg") is not None:
        rows.append(("Swing when the last move ends", f"{d['swing_at_move_end_deg']:.1f} deg", ""))
    if d.get("residual_rope_angle_deg") is not None:
        rows.append(("Residual swing after the moves", f"{d['residual_rope_angle_deg']:.1f} deg", ""))
    rows.append(("Peak excursion from the plumb line", f"{d['peak_excursion_m']:.2f} m",
                 f"clearance {lim.clearance_m:.2f} m" if lim.clearance_m is not None else ""))
    settle = (f"{d['settle_time_s']:.1f} s after the last move" if d["settle_time_s"] is not None
              else "not within the simulated time")
    if d.get("on_ground_at_end") and d.get("touchdown_time_s") is not None:
        rows.append(("Landed", f"at t = {d['touchdown_time_s']:.1f} s", "on the ground at the end"))
    else:
        rows.append((f"Settles below {d['settle_threshold_deg']:.1f} deg", settle, ""))
    if d.get("starts_on_ground"):
        lo = d.get("liftoff_time_s")
        rows.append(("Lift-off", "never in the run" if lo is None else f"t = {lo:.2f} s",
                     "" if lo is None else f"swing after it {d['peak_swing_after_liftoff_deg']:.1f} deg"))
    if d.get("touchdown_time_s") is not None:
        rows.append(("Touch-down", f"t = {d['touchdown_time_s']:.2f} s at {d['touchdown_speed_m_s']:.2f} m/s",
                     f"swinging {d['touchdown_swing_deg']:.1f} deg, drifts {d['ground_drift_m']:.2f} m"))
    for r in d.get("tag_lines") or []:
        rows.append((f"Tag line {r['line']} peak pull", f"{r['peak_pull_N']:.0f} N at t = {r['peak_time_s']:.1f} s",
                     f"one person holds {r['max_pull_N']:.0f} N" + (": CANNOT BE HELD"
                                                                      if r["over_max_pull_from_s"] is not None else "")))
    rows.append(("Static hook load", force_text(d["static_rope_tension_kN"]), ""))
    hook_wll = scene.hook.wll_kN if scene.hook is not None else None
    rows.append(("Peak hook load", f"{force_text(d['peak_hook_load_kN'])} at t = {d['peak_rope_tension_time_s']:.1f} s",
                 f"hook block rated {force_text(hook_wll)}" if hook_wll is not None else ""))
    rows.append(("Peak line pull", force_text(d["peak_line_pull_kN"]),
                 f"{scene.rope.falls} fall(s)" + (f"; line WLL {force_text(scene.rope.wll_kN)}"
                                                  if scene.rope.wll_kN is not None else "")))
    rows.append(("Dynamic factor (peak / static hook load)", f"{d['dynamic_factor']:.2f}", ""))
    if "peak_utilisation_pct" in d:
        rows.append(("Rated capacity chart, peak utilisation",
                     f"{d['peak_utilisation_pct']:.1f}% at t = {d['peak_utilisation_time_s']:.1f} s, radius "
                     f"{d['chart_radius_at_peak_m']:.2f} m",
                     f"{d['chart_review_pct']:.0f}% extra review, {d['chart_limit_pct']:.0f}% close to the chart"))
        rows.append(("Rated capacity chart, load hanging plumb", f"{d['static_utilisation_pct']:.1f}%", ""))
    for r in d.get("leg_tensions") or []:
        against = ""
        if r["wll_kN"] is not None:
            against = f"WLL {force_text(r['wll_kN'])}: {100 * r['peak_over_wll']:.1f}% used"
        rows.append((f"Sling leg {r['leg']}, peak tension", f"{force_text(r['peak_kN'])} at t = {r['peak_time_s']:.1f} s",
                     against or f"hanging {force_text(r['hanging_kN'])}"))
    for j, pk in enumerate(d.get("top_sling_peak_tension_kN") or []):
        wll = d.get("top_sling_wll_kN")
        rows.append((f"Spreader top sling {j + 1}, peak tension", force_text(pk),
                     f"WLL {force_text(wll)}" if wll else ""))
    if d.get("peak_tilt_deg") is not None:
        rows.append(("Load tilt, peak from level", f"{d['peak_tilt_deg']:.1f} deg", ""))
    periods = d["mode_periods_s"]
    for k, period in enumerate(periods):
        name = names[k] if names and k < len(names) else ""
        rows.append((f"Swing mode {k + 1}, period" if len(periods) > 1 else "Swing period (small angle)",
                     f"{period:.2f} s", name))
    return rows


def zone_rows(zones) -> list:
    """The zone verdicts table: rows of (zone, kind, verdict, closest approach).

    Parameters
    ----------
    zones : list of dict
        The ``zones`` entries of ``summary.json``.

    Returns
    -------
    list of tuple
        One row per zone, worded as summary.txt words it.
    """
    rows = []
    for z in zones:
        state = ("ENTERED" if z["entered"] else "inside margin" if z["within_margin"] else "clear")
        if z["entered"]:
            e = z["entries"][0] if z["entries"] else None
            if e:
                state += (f" from t = {e['start_s']:.1f} s for {e['duration_s']:.1f} s by "
                          + ", ".join(e["bodies"]))
        where = "in plan" if z["kind"] == "exclusion" else ""
        rows.append((z["name"], z["kind"], state,
                     f"{z['min_distance_m']:.2f} m {where} ({z['min_distance_body']}) at t = "
                     f"{z['min_distance_time_s']:.1f} s".replace("  ", " ")))
    return rows


def wind_rows(d, scene) -> list:
    """The wind-at-the-load table: rows of (quantity, value, against), as summary.txt gives them.

    Parameters
    ----------
    d : dict
        The summary's data (``peak_gust_m_s``, ``peak_gust_time_s``, ``wind_limit_m_s``).
    scene : swingsim.scene.Scene
        The scene (its ``[wind]``).

    Returns
    -------
    list of tuple
        Strings; empty in still air.
    """
    if d.get("peak_gust_m_s") is None:
        return []
    w = scene.wind
    rows = [("Mean wind", f"{w.speed_m_s:.1f} m/s {wind_words(scene)}",
             f"at {w.reference_height_m:g} m, {w.profile} profile" if w.profile != "uniform" else "the same at every height")]
    if w.turbulence_intensity > 0.0:
        rows.append(("Turbulence", f"intensity {w.turbulence_intensity:g}, {w.spectrum} spectrum",
                     f"seed {w.seed}"))
    if w.gusts:
        rows.append(("Discrete gusts", f"{len(w.gusts)} (1 - cosine)",
                     ", ".join(f"+{g.peak_m_s:g} m/s at {g.start_s:g} s" for g in w.gusts)))
    if d.get("wind_varies"):
        rows.append(("Peak gust at load height", f"{d['peak_gust_m_s']:.2f} m/s at t = {d['peak_gust_time_s']:.1f} s",
                     f"in-service limit {d['wind_limit_m_s']:g} m/s (applies to gusts)"))
    else:
        rows.append(("Steady wind at the load", f"{d['peak_gust_m_s']:.2f} m/s",
                     f"in-service limit {d['wind_limit_m_s']:g} m/s applies to gusts; none modelled"))
    return rows


def gust_statistic_rows(stats) -> list:
    """The realisations table: rows of (quantity, mean, 95th percentile, largest).

    Parameters
    ----------
    stats : dict
        ``summary.json`` ``gust_statistics``.

    Returns
    -------
    list of tuple
        Strings, forces in kN and t; a zone's clearance as mean, 5th percentile and least.
    """
    rows = []
    for key, label, unit, nd in (("peak_rope_angle_deg", "Peak rope angle", "deg", 1),
                                 ("peak_excursion_m", "Peak excursion", "m", 2),
                                 ("peak_hook_load_kN", "Peak hook load", "kN", 1)):
        st = stats.get(key)
        if st is None:
            continue
        cells = [force_text(st[k]) if unit == "kN" else f"{st[k]:.{nd}f} {unit}" for k in ("mean", "p95", "max")]
        rows.append((label, *cells))
    for name, st in (stats.get("zone_clearance_m") or {}).items():
        rows.append((f"Clearance to {name}", f"{st['mean']:.2f} m", f"{st['p5']:.2f} m (5th pct)",
                     f"{st['min']:.2f} m (least)"))
    return rows


def resonance_rows(d) -> list:
    """The resonance table: rows of (mode, period, what it is, damping, peak, half-power band).

    Parameters
    ----------
    d : dict
        The summary's data (``response_modes``).

    Returns
    -------
    list of tuple
        Strings, decimals as in summary.txt.
    """
    return [(str(m["mode"]), f"{m['period_s']:.2f} s", m["label"], f"{100 * m['damping_ratio']:.2f}%",
             peak_text(m), half_power_text(m)) for m in d.get("response_modes") or []]


#: Smallest scale at which a plot may share the last text page (fonts of 10 pt stay above 6.5 pt).
MIN_SHARED_SCALE = 0.65
#: Height kept for a plot's caption under it [in].
CAPTION_IN = 0.55


def _place_figure(fig, page_in, box_in) -> float:
    """Scale a finished plot as a whole (fonts, lines, axes) into a box of a page, top-aligned.

    The figure becomes the page: its size is set to ``page_in`` and its axes and texts are
    moved into ``box_in``.  Its own caution line is dropped (the page's footer carries the caution).

    Returns the plot's bottom edge from the page's top [in].
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch
    from matplotlib.text import Text

    fw, fh = fig.get_size_inches()
    page_w, page_h = page_in
    left, top, box_w, box_h = box_in
    scale = min(box_w / fw, box_h / fh)
    ox = left + (box_w - fw * scale) / 2.0
    oy = page_h - top - fh * scale  # bottom of the plot, from the page's bottom
    for text in list(fig.texts):
        if text.get_text() == cautions.CAUTION_SHORT:
            text.remove()
    tick_sizes = {}
    for ax in fig.get_axes():
        tick_sizes[ax] = [(axis.get_major_ticks()[0].label1.get_fontsize() if axis.get_major_ticks() else 10.0)
                          for axis in (ax.xaxis, ax.yaxis)]
    for artist in fig.findobj(Text):
        artist.set_fontsize(artist.get_fontsize() * scale)
    for artist in fig.findobj(Line2D):
        artist.set_linewidth(artist.get_linewidth() * scale)
        artist.set_markersize(artist.get_markersize() * scale)
    for artist in fig.findobj(Patch):
        artist.set_linewidth(artist.get_linewidth() * scale)
    for ax, (x_size, y_size) in tick_sizes.items():
        ax.tick_params(axis="x", labelsize=x_size * scale, length=3.5 * scale, width=0.8 * scale)
        ax.tick_params(axis="y", labelsize=y_size * scale, length=3.5 * scale, width=0.8 * scale)

    def to_page(x, y):
        return (ox + x * fw * scale) / page_w, (oy + y * fh * scale) / page_h

    for ax in fig.get_axes():
        if ax.get_axes_locator() is not None or getattr(ax, "_is_secondary", False):
            continue  # placed by its parent
        pos = ax.get_position(original=True)
        x0, y0 = to_page(pos.x0, pos.y0)
        ax.set_position([x0, y0, pos.width * fw * scale / page_w, pos.height * fh * scale / page_h], which="both")
    for text in fig.texts:
        text.set_position(to_page(*text.get_position()))
    fig.set_size_inches(page_w, page_h)
    return page_h - oy


def _fit_onto_page(fig, doc, caption):
    """Turn a finished plot into a landscape page: the plot scaled as a whole into the text area."""
    page_w, page_h = doc.portrait[::-1]
    box = (MARGIN_IN, TOP_IN, page_w - 2 * MARGIN_IN, page_h - TOP_IN - FOOTER_IN - CAPTION_IN)
    bottom = _place_figure(fig, (page_w, page_h), box)
    doc.pages.append(fig)
    doc.page = fig
    doc.y_in = bottom + 0.05  # the caption right under the plot
    doc.lines(caption, 9.0)


def _shared_height_in(fig, doc) -> float:
    """Height a plot takes at the text width of a portrait page, with its caption [in]; inf when too small."""
    fw, fh = fig.get_size_inches()
    width = doc.portrait[0] - 2 * MARGIN_IN
    scale = width / fw
    return fh * scale + CAPTION_IN + 0.15 if scale >= MIN_SHARED_SCALE else float("inf")


def _write_text(doc, traj, summary, names) -> None:
    """The text pages: title, caution, the lift, key numbers, zones, wind, resonance, cautions, limits."""
    scene = traj.scene
    d = summary.data
    doc.new_page()
    doc.lines(d["title"], 16.0, bold=True, gap_in=0.02)
    doc.lines(f"Lift briefing sheet - swingsim {d['swingsim_version']} - scene {scene.name}", 9.0, colour=GREY,
              gap_in=0.12)
    doc.caution_box(cautions.CAUTION)
    if not d["valid"]:
        doc.caution_box("RESULT INVALID: " + d.get("invalid_reason", "the run stopped early"))
    doc.heading("The lift")
    doc.lines(lift_paragraph(summary, scene))
    doc.heading("Key numbers")
    doc.table(("quantity", "value", "compared with / what it is"), key_numbers(summary, scene, names), (3.0, 3.2, 3.2))
    doc.lines(cautions.TONNE_FORCE_NOTE, 8.5, colour=GREY)
    if d["zones"]:
        doc.heading("Zones")
        doc.table(("zone", "kind", "verdict", "closest approach"), zone_rows(d["zones"]), (2.4, 1.2, 3.0, 3.0))
    wind = wind_rows(d, scene)
    if wind:
        doc.heading("Wind at the load")
        doc.table(("quantity", "value", "compared with / what it is"), wind, (3.0, 3.2, 3.2))
        stats = d.get("gust_statistics")
        if stats:
            doc.lines(f"Over {stats['realisations']} turbulence realisations (seeds {stats['seeds'][0]} to "
                      f"{stats['seeds'][-1]}); the plots, stills and video show the worst (seed "
                      f"{stats['worst_seed']}, largest peak swing).", 9.0)
            doc.table(("quantity", "mean", "95th percentile", "largest"), gust_statistic_rows(stats),
                      (2.6, 2.3, 2.3, 2.3))
    if d.get("response_modes"):
        doc.heading("Resonance")
        doc.lines("Steady swing per m/s2 of suspension-point acceleration at the start of the lift (response.csv, "
                  f"the frequency response plot); our resonance band: the half-power band widened to at least "
                  f"+-{100 * d['resonance_band_fraction']:.0f}% of the period.", 9.0)
        doc.table(("mode", "period", "what swings", "damping", "peak", "half-power band"), resonance_rows(d),
                  (0.8, 1.0, 3.0, 1.1, 1.6, 2.5))
        for line in rhythm_sentences(d):
            doc.lines(line + ".", 9.0, bullet="-", gap_in=0.04)
    doc.heading("Cautions")
    for c in d["cautions"][1:] or ["No scenario warnings."]:
        doc.lines(c, 9.0, bullet="-", gap_in=0.04)
    doc.heading("What the model leaves out (check these against the lift plan)")
    for limit in cautions.model_limits(scene):
        doc.lines(limit, 9.0, bullet="-", gap_in=0.04)


def briefing_pdf(traj, summary, *, paper: str = "a4", cols=None, stills=()) -> bytes:
    """briefing.pdf's content: the printable briefing sheet (module docstring).

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The simulated lift (its scene, model and motion).
    summary : swingsim.metrics.Summary
        The numbers summary.json holds.
    paper : {"a4", "letter"}
        Paper size: ISO A4 (595 x 842 pt) or US Letter (612 x 792 pt).
    cols : dict, optional
        The run's time-series columns, sampled once for all plots.
    stills : sequence of pathlib.Path
        PNG stills of the video (``<scene>_<kind>.png``), shown two to a page.

    Returns
    -------
    bytes
        The PDF.
    """
    from swingsim.report.plots import draw_figures

    scene = traj.scene
    d = summary.data
    names = mode_names(traj.model)
    with literal_text():
        figures = draw_figures(traj, summary, cols)
        # the first plot shares the last text page when it fits below the text at the text
        # width (no page that holds only a few lines): measured by laying the text out once
        probe = _Document(paper, d["title"])
        _write_text(probe, traj, summary, names)
        room = probe.room_in()
        host, text_end = len(probe.pages) - 1, probe.y_in
        probe.close()
        first = next(iter(figures), None)
        doc = _Document(paper, d["title"])
        if first is not None and _shared_height_in(figures[first], doc) <= room:
            fig = figures.pop(first)
            doc.host = (host, fig, PLOT_CAPTIONS.get(Path(first).stem, Path(first).stem), text_end + 0.15)
        _write_text(doc, traj, summary, names)
        doc.place_hosted()
        for stem, fig in figures.items():
            _fit_onto_page(fig, doc, PLOT_CAPTIONS.get(stem, stem))
        stills = [Path(p) for p in stills]
        if stills:
            doc.new_page()
            doc.heading("Stills from the video")
            room = (doc.size_in[1] - TOP_IN - FOOTER_IN - 0.9) / 2.0 - 0.4
            for p in stills:
                kind = p.stem[len(scene.name) + 1:] if p.stem.startswith(scene.name + "_") else p.stem
                doc.image(p, STILL_CAPTIONS.get(kind, kind.replace("_", " ")), room)
        return doc.pdf_bytes()


def write_briefing(traj, summary, out_dir, *, paper: str = "a4", cols=None, stills=()) -> list:
    """Write briefing.pdf into a folder atomically (:func:`briefing_pdf`).

    Parameters
    ----------
    traj, summary
        The run and its measures.
    out_dir : str or pathlib.Path
        The folder.
    paper : {"a4", "letter"}
        Paper size.
    cols : dict, optional
        The run's time-series columns, when already sampled.
    stills : sequence of pathlib.Path
        The video's stills, when rendered.

    Returns
    -------
    list of pathlib.Path
        ``[briefing.pdf]``.
    """
    data = briefing_pdf(traj, summary, paper=paper, cols=cols, stills=stills)
    return [atomic_write_bytes(Path(out_dir) / "briefing.pdf", data)]
