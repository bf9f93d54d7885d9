"""The 3D stage: built once from :mod:`swingsim.scene3d`, then posed and photographed frame after frame.

The scene's numpy meshes become pyvista meshes once; per frame only transforms
(``actor.user_matrix``, from the scene's poses), the trail's, rope's and
slings' points (in place), a few colours and the kept text actors change;
nothing is rebuilt.
"""

from __future__ import annotations

import math

import numpy as np
import pyvista as pv
from vtkmodules.util.numpy_support import vtk_to_numpy
from vtkmodules.vtkCommonCore import vtkUnsignedCharArray

from swingsim import scene3d
from swingsim.metrics.chart import chart_series
from swingsim.metrics.zones import ENTERED, NEAR, suspended_bodies, verdict, zone_clearances, zone_verdicts_at
from swingsim.render import chrome as chrome_mod
from swingsim.render import layout as layout_mod
from swingsim.render import overlay, views
from swingsim.render.gl import RenderUnavailableError, _message
from swingsim.render.palette import (LABEL_STYLE, NOGO_STRIPE_MAX_M, NOGO_STRIPE_MIN_M, NOGO_STRIPE_SHARE, PALETTE,
                                     STYLE, TAG_LINE_COLOUR, envelope_image, ground_image, nogo_image, rgb,
                                     tag_line_state)
from swingsim.scene.site import compass_point, scene_wind_from_bearing_deg, wind_from_bearing_deg
from swingsim.scene3d.meshes import arrow
from swingsim.scene3d.poses import SAMPLE_KEYS
from swingsim.scene3d.transforms import is_shown

READOUT_HZ = 10.0  # refreshes of the numbers panel per second of video
TRAIL_S = 6.0  # simulated seconds of trail behind the load
TRAIL_N = 61
#: Pixels drawn per output pixel along each side, by ``quality``.
SUPERSAMPLE = {"standard": 1, "high": 2}
#: The legend of the side panel: palette key (its swatch) and words.
LEGEND = (("exclusion", "no-go zone"), ("obstacle", "obstacle"), ("envelope", "swing envelope"),
          ("trail", "load path, last 6 s"), ("tag_line", "tag line, pull held"),
          ("contact", "load bears on ground"))
#: Most entries of the legend (with both zone kinds, tag lines and ground contact there would be six).
LEGEND_MAX = 5


def _polydata(mesh, part: str) -> pv.PolyData:
    """A scene3d mesh as pyvista data: its triangles ("faces", with texture coordinates) or its lines."""
    if part == "faces":
        cells = np.column_stack([np.full(len(mesh.faces), 3), mesh.faces]).ravel()
        out = pv.PolyData(np.array(mesh.vertices, dtype=float), faces=cells)
        if mesh.uv is not None:
            out.active_texture_coordinates = np.asarray(mesh.uv, dtype=float)
        return out
    cells = np.column_stack([np.full(len(mesh.lines), 2), mesh.lines]).ravel()
    return pv.PolyData(np.array(mesh.vertices, dtype=float), lines=cells)


def _texture(image: np.ndarray) -> pv.Texture:
    tex = pv.Texture(np.ascontiguousarray(image[::-1]))  # pyvista: row 0 is the top (high y)
    tex.SetInterpolate(True)  # bilinear; mipmaps would cost llvmpipe more than the lines saved
    return tex


#: Least gap between two labels on a view [output px].
LABEL_GAP_PX = 3


class Stage:
    """A posed, photographable scene of one run.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run to draw.
    facts : swingsim.render.facts.Facts
        Its events.
    size : (int, int)
        Frame width and height [px].
    views : sequence of str
        One view, or two for a split picture side by side.
    load_mesh : swingsim.scene3d.Mesh, optional
        A user mesh for the load (its own frame: centre of gravity at the origin, z up).
    speed : float
        Playback speed, for the clock's words [-].
    video_len_s : float
        Length of the video, for the caution banner's timing [s].
    quality : {"standard", "high"}
        ``high`` draws every frame at twice the width and height and averages each
        2x2 block of pixels (supersampling): smooth edges for the final cut, about
        four times the drawing work.
    """

    def __init__(self, traj, facts, *, size=(1280, 720), views=("oblique",), load_mesh=None,
                 speed=1.0, video_len_s=0.0, quality="standard"):
        self.traj, self.facts, self.size = traj, facts, tuple(int(s) for s in size)
        w = traj.scene.wind
        self._wind_varies = bool(w.gusts or w.turbulence_intensity > 0.0 or w.profile != "uniform")
        self.views = tuple(views)
        self.speed, self.video_len_s = speed, video_len_s
        self.ss = SUPERSAMPLE[quality]
        self.render_size = (self.size[0] * self.ss, self.size[1] * self.ss)
        scene = traj.scene
        self.has_wind = scene.wind.speed_m_s > 0.0
        self.tag_line_specs = tuple(getattr(scene, "tag_lines", ()))
        self.has_ground = getattr(scene, "ground", None) is not None
        rows = overlay.readout_rows(scene.crane.kind, self.has_wind, scene.crane.chart is not None,
                                    len(self.tag_line_specs), self.has_ground)
        kinds = {z.kind for z in scene.zones}
        shown = kinds | ({"tag_line"} if self.tag_line_specs else set()) | ({"contact"} if self.has_ground else set())
        legend = [(key, words) for key, words in LEGEND
                  if key not in ("exclusion", "obstacle", "tag_line", "contact") or key in shown]
        if len(legend) > LEGEND_MAX:  # the contact marks' entry gives way to the notes' room
            legend = [e for e in legend if e[0] != "contact"]
        self.legend = tuple(legend)
        self.layout = layout_mod.compute_layout(self.size, len(self.views), overlay.caution_banner_text(),
                                                rows, len(self.legend), overlay.clock_text(9999.99, speed))
        # Our own theme (the caller's global pyvista theme is left alone): no multisampling,
        # which would cost software OpenGL several times a frame's rendering time.
        theme = pv.themes.Theme()
        theme.multi_samples = 0
        theme.anti_aliasing = None
        self.pl = pv.Plotter(off_screen=True, window_size=list(self.render_size), theme=theme,
                             shape=(1, len(self.views)), border=False, lighting=None)
        self.renderers = [self.pl.renderers[i] for i in range(len(self.views))]
        for ren, box in zip(self.renderers, self.layout.views):
            ren.SetViewport(*box.viewport(self.size))
        self.scene3d = scene3d.build(traj, load_mesh=load_mesh)
        self.lay = self.scene3d.layout
        self._projection = {}  # view index -> ((camera state), its 4x4 projection matrix)
        self.labels = []  # 3D-anchored labels: (world position [m], RGBA image, role, text, Sticker)
        self._ground_marks = []  # points of the ground arrows, for the fitted views
        self._build()
        self._place_cameras()
        self._overlay()
        self._pixels = vtkUnsignedCharArray()
        self.texts = {}
        self._zone_chunk = self._chart_chunk = self._crane_chunk = None
        self._warm = False
        self._cam_set = [False] * len(self.views)
        self._readout_slot = None
        self._slew0 = float(traj.motion.pose(np.array([0.0])).jib_angle_rad[0])
        try:
            self.pl.show(auto_close=False)
        except Exception as exc:  # noqa: BLE001 - VTK raises bare RuntimeErrors without a context
            self.close()
            raise RenderUnavailableError(_message(f"no OpenGL context ({exc})")) from None

    # ------------------------------------------------------------------ building
    def _add(self, mesh, colour, *, opacity=1.0, line_width=None, ambient=0.25, diffuse=0.8,
             specular=0.0, lighting=True, texture=None):
        actor = None
        for i, ren in enumerate(self.renderers):
            self.pl.subplot(0, i)
            if actor is None:
                if texture is not None:
                    kw = dict(texture=texture, lighting=False)
                else:
                    kw = dict(color=colour, opacity=opacity, ambient=ambient, diffuse=diffuse,
                              specular=specular, smooth_shading=False, lighting=lighting, show_scalar_bar=False)
                    if line_width:
                        kw["line_width"] = line_width * self.ss
                actor = self.pl.add_mesh(mesh, reset_camera=False, **kw)
            else:
                ren.add_actor(actor, reset_camera=False)
        return actor

    def _add_body(self, body):
        """Actors of one scene3d body: (surface or None, lines or None)."""
        if body.texture is not None:
            image = ground_image(body.texture) if body.material == "ground" else envelope_image(body.texture)
            return self._add(_polydata(body.mesh, "faces"), None, texture=_texture(image)), None
        style = STYLE[body.material]
        colour = PALETTE[style["colour"]]
        solid = lines = None
        if len(body.mesh.faces):
            solid = self._add(_polydata(body.mesh, "faces"), colour, opacity=style["opacity"],
                              ambient=style["ambient"], diffuse=style["diffuse"], lighting=style["lighting"])
        if len(body.mesh.lines):
            lines = self._add(_polydata(body.mesh, "lines"), colour, line_width=style["line_width"], lighting=False)
        return solid, lines

    def _build(self):
        scene, bodies = self.traj.scene, self.scene3d.bodies
        for i, ren in enumerate(self.renderers):
            self.pl.subplot(0, i)
            self.pl.set_background(PALETTE["sky"])  # flat: a gradient costs llvmpipe ~10% a frame
            # Plain alpha blending for the few translucent bodies (zones, envelope, shadow):
            # order-independent transparency doubles the cost of a frame in software OpenGL.
            ren.SetUseDepthPeeling(False)
            ren.SetUseOIT(False)
            sun = pv.Light(position=(0.4, -0.6, 1.0), focal_point=(0, 0, 0), intensity=0.75,
                           light_type="scene light")
            sun.positional = False
            head = pv.Light(light_type="headlight", intensity=0.35)
            ren.add_light(sun)
            ren.add_light(head)
        # each label right after what it labels: the grid's after the ground, a zone's after the zone
        labels_after = {}
        for label in self.scene3d.labels:
            after = {"grid": "ground", "axis_x": "axis_y", "axis_y": "axis_y"}.get(label.role, f"zone_{label.text}")
            labels_after.setdefault(after, []).append(label)
        g = self.scene3d.bodies["ground"].mesh.bounds
        self.ground_bounds = g[:4]
        self.actors = {}
        last_sling = f"sling_{self.scene3d.rigging.sling_count}"
        for name, body in bodies.items():
            self.actors[name] = self._add_body(body)
            for label in labels_after.get(name, ()):
                colour, size, bold = LABEL_STYLE[label.role]
                colour = PALETTE[colour]
                self._label(label.position_m, label.text, size=size, colour=colour, bold=bold, role=label.role)
            if name == "axis_y":
                self._site_arrows(body.mesh)
            if name == "envelope":  # the trail: the load's last TRAIL_S seconds
                self.trail = pv.PolyData(np.repeat(self.scene3d.path_load_m[:1], TRAIL_N, axis=0),
                                         lines=np.concatenate([[TRAIL_N], np.arange(TRAIL_N)]))
                self._add(self.trail, PALETTE["trail"], line_width=3, lighting=False)
            if name == last_sling:
                # The rope and legs as lines too, never thinner than a pixel or two however far
                # the camera (a tube a few centimetres thick breaks up at site scale).
                self.rope_line = pv.PolyData(np.zeros((2, 3)), lines=np.array([2, 0, 1]))
                self._add(self.rope_line, PALETTE["rope"], line_width=2, lighting=False)
                n_legs = self.scene3d.rigging.sling_count
                self.sling_lines = pv.PolyData(np.zeros((2 * n_legs, 3)), lines=np.column_stack(
                    [np.full(n_legs, 2), np.arange(0, 2 * n_legs, 2), np.arange(1, 2 * n_legs, 2)]).ravel())
                self._add(self.sling_lines, PALETTE["sling"], line_width=2, lighting=False)
        self.trail_t, self.trail_xyz = self.scene3d.path_t_s, self.scene3d.path_load_m
        half = 0.5 * np.asarray(self.lay.load_size_m, dtype=float)
        self._load_corners = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)]) * half
        # zones first, then the wind (its speed and bearing are news), the arrows, the grid
        rank = {"obstacle": 0, "exclusion": 0, "wind": 1, "axis": 2, "axis_x": 2, "axis_y": 2}
        self._label_order = sorted(range(len(self.labels)), key=lambda k: rank.get(self.labels[k][2], 3))
        # moving bodies, each with its actors (a spreader has its beam and its centre line)
        self.moving = {name: [a for a in self.actors[name] if a is not None]
                       for name, body in bodies.items() if body.moves}
        self.crane_actors = {name: self.actors[name][0] for name in self.scene3d.crane_roles}
        self.zones = []
        for z in scene.zones:
            solid, edges = self.actors[f"zone_{z.name}"]
            self.zones.append((z, solid, edges, PALETTE[z.kind]))
            if z.kind == "exclusion":
                self._nogo_stripes(z)
            self._zone_look(z, solid, edges, "clear")
        self._zone_state = ["clear"] * len(self.zones)
        self.rope = self.actors["rope"][0]
        self.slings = [self.actors[f"sling_{i + 1}"][0] for i in range(self.scene3d.rigging.sling_count)]
        self.load_actor = self.actors["load"][0]
        self.hook_actor = self.actors["hook"][0]
        self.hook_size = self.scene3d.rigging.hook_size_m
        self.shadow = self.actors["shadow"][0]
        self.beam_actors = tuple(self.moving.get("spreader", ()))
        self.beam_span = self.scene3d.spreader_span_m
        # each tag line as a line of a few pixels too (its tube is thin at site scale), and its
        # person; all three take the colour of the line's pull
        self.tag_lines = []
        for j, spec in enumerate(self.tag_line_specs):
            line = pv.PolyData(np.zeros((2, 3)), lines=np.array([2, 0, 1]))
            line_actor = self._add(line, PALETTE["tag_line"], line_width=3, lighting=False)
            actors = [a for a in (*self.actors[f"tag_line_{j + 1}"], *self.actors[f"tag_person_{j + 1}"], line_actor)
                      if a is not None]
            self.tag_lines.append({"name": spec.name(j), "max_pull_N": float(spec.max_pull_N), "line": line,
                                   "actors": actors, "state": "slack"})

    def _nogo_stripes(self, zone):
        """A no-go zone's box in translucent red and white diagonal stripes (our own barrier look)."""
        lo, hi = np.asarray(zone.min_m, dtype=float), np.asarray(zone.max_m, dtype=float)
        box = pv.Box(bounds=(lo[0], hi[0], lo[1], hi[1], lo[2], max(hi[2], lo[2] + 0.05)), quads=True)
        period = float(np.clip(NOGO_STRIPE_SHARE * np.max(hi - lo), NOGO_STRIPE_MIN_M, NOGO_STRIPE_MAX_M))
        pts = np.asarray(box.points)
        u = (pts[:, 0] + pts[:, 1] + pts[:, 2]) / period
        box.active_texture_coordinates = np.column_stack([u, np.full(len(u), 0.5)])
        tex = pv.Texture(nogo_image())
        tex.SetInterpolate(False)
        tex.SetRepeat(True)
        self._add(box.triangulate(), None, texture=tex)

    def _label(self, pos, text, *, size, colour, bold=False, role="grid"):
        """A label anchored at a 3D point: dark words on a light panel, composited over the view
        (so never hidden behind the crane or the boom) where :meth:`_place_labels` finds room."""
        font = max(self.layout.fonts["label"], int(round(size * self.size[1])))
        img = chrome_mod.rasterise(text, font * self.ss, colour, bold=bold, background=PALETTE["label_bg"],
                                   background_opacity=0.85)
        self.labels.append((np.asarray(pos, dtype=float), img, role, text, chrome_mod.Sticker(img)))

    def _place_labels(self, view_index: int, load_xyz=None) -> list:
        """Where a view's labels go this frame: wholly inside the view, over neither the load nor a
        label placed before them (zone labels first, then the arrows', then the grid's); a zone's
        name is moved into the view rather than lost at its edge.

        Returns
        -------
        list of tuple
            (label index, layout.Box [output px]) of the labels shown.
        """
        if not self.labels:
            return []
        box = self.layout.views[view_index]
        pts = np.array([lab[0] for lab in self.labels])
        load_box = None
        if load_xyz is not None:  # the load's box on the picture (its 8 corners around the centre)
            corners = self.project(load_xyz[None] + self._load_corners, view_index)
            lo, hi = corners.min(axis=0), corners.max(axis=0)
            load_box = layout_mod.Box(lo[0] - 2, lo[1] - 2, hi[0] + 2, hi[1] + 2)
        keep_off = [] if load_box is None else [load_box]
        if getattr(self, "_wind_ends", None) is not None:  # the wind arrow stays visible
            ends = self.project(self._wind_ends, view_index)
            if np.all(np.isfinite(ends)):
                lo, hi = ends.min(axis=0), ends.max(axis=0)
                keep_off.append(layout_mod.Box(lo[0] - 3, lo[1] - 3, hi[0] + 3, hi[1] + 3))
        px = self.project(pts, view_index)
        taken, shown, said = [], [], set()
        for k in self._label_order:
            _pos, img, role, text, _sticker = self.labels[k]
            if role == "wind" and text in said:  # the wind's label has places to choose from: shown once
                continue
            c, r = px[k]
            half_w, half_h = 0.5 * img.shape[1] / self.ss, 0.5 * img.shape[0] / self.ss
            if not (np.isfinite(c) and np.isfinite(r)) or 2 * half_w > box.width or 2 * half_h > box.height:
                continue
            if role in ("obstacle", "exclusion"):
                c += min(0.0, box.x1 - (c + half_w)) + max(0.0, box.x0 - (c - half_w))
                r += min(0.0, box.y1 - (r + half_h)) + max(0.0, box.y0 - (r - half_h))
            lb = layout_mod.Box(c - half_w, r - half_h, c + half_w, r + half_h)
            if not lb.inside(box) or any(lb.intersects(o) for o in keep_off):
                continue
            gap = LABEL_GAP_PX  # labels never touch: a word run into the next one reads as one
            if any(layout_mod.Box(lb.x0 - gap, lb.y0 - gap, lb.x1 + gap, lb.y1 + gap).intersects(o) for o in taken):
                continue
            taken.append(lb)
            shown.append((k, lb))
            said.add(text)
        return shown

    def _site_arrows(self, axis_mesh):
        """A north arrow and, with wind, an arrow the way the wind blows, on the ground beside the +x/+y arrows.

        Same length as the axis arrows, beside them on the side away from +x: north
        at ``site.north_deg`` from +x, the wind toward ``wind.direction_deg``, each
        with its label (the wind as the bearing it comes from).
        """
        scene = self.traj.scene
        v = axis_mesh.vertices
        self._ground_marks.extend([v.min(axis=0), v.max(axis=0)])
        origin = v.min(axis=0)
        length = float(np.ptp(v[:, 1]))
        centre = np.array([origin[0] - 3.0 * length, origin[1] + 1.0 * length, self.lay.ground_z_m + 0.12])
        north = math.radians(scene.site.north_deg)
        d = np.array([math.cos(north), math.sin(north), 0.0])
        self._add(_polydata(arrow(centre - 0.5 * length * d, d, length), "faces"), PALETTE["north"],
                  lighting=False)
        self._ground_marks.extend([centre - 0.7 * length * d, centre + 0.7 * length * d])
        self._label(centre + 0.65 * length * d, "N", size=LABEL_STYLE["axis_x"][1], colour=PALETTE["north"],
                    bold=True, role="axis")
        if scene.wind.speed_m_s > 0.0 or scene.wind.gusts:
            toward = math.radians(scene.wind.direction_deg)
            at = centre + np.array([-0.2 * length, -1.6 * length, 0.0])
            w = np.array([math.cos(toward), math.sin(toward), 0.0])
            # built along +x about its middle, turned and scaled each frame to the wind at the load
            actor = self._add(_polydata(arrow(np.array([-0.5 * length, 0.0, 0.0]), np.array([1.0, 0.0, 0.0]),
                                              length, tip_radius=0.12, shaft_radius=0.05), "faces"),
                              PALETTE["wind"], lighting=False)
            self._ground_marks.extend([at - 0.6 * length * w, at + 0.6 * length * w,
                                       at + np.array([0.0, -0.75 * length, 0.0])])
            mean = "mean wind" if self._wind_varies else "wind"
            words = f"{mean} {scene.wind.speed_m_s:.1f} m/s from {compass_point(scene_wind_from_bearing_deg(scene))}"
            # one label, at the first of these places beside the arrow where it fits (_place_labels)
            for side in ((0.0, -1.0), (0.0, 1.0), (-1.0, 0.0), (1.0, 0.0), (0.0, -1.6), (-1.6, 0.0), (-1.2, -1.2)):
                self._label(at + np.array([side[0], side[1], 0.0]) * length, words,
                            size=LABEL_STYLE["axis_x"][1], colour=PALETTE["wind"], bold=True, role="wind")
            self._wind_arrow = (actor, at, max(scene.wind.speed_m_s, 1.0), length)
            self._set_wind_arrow(toward, scene.wind.speed_m_s)

    def _set_wind_arrow(self, toward_rad: float, speed_m_s: float) -> None:
        """Turn the wind arrow toward ``toward_rad`` [rad] and scale it with the speed [m/s]."""
        actor, at, ref, length = self._wind_arrow
        k = min(max(speed_m_s / ref, 0.25), 1.8)
        c, s_ = math.cos(toward_rad), math.sin(toward_rad)
        # its tail and tip (built from -length/2 to +length/2 along +x): labels keep off it
        self._wind_ends = np.array([at - 0.5 * k * length * np.array([c, s_, 0.0]),
                                    at + 0.5 * k * length * np.array([c, s_, 0.0])])
        m = np.array([[c * k, -s_ * k, 0.0, at[0]], [s_ * k, c * k, 0.0, at[1]], [0.0, 0.0, k, at[2]],
                      [0.0, 0.0, 0.0, 1.0]])
        actor.user_matrix = m

    def _update_wind(self, row) -> None:
        """The wind arrow from the run's wind at the load at this instant (gusts, turbulence)."""
        wxy = row.get("wind_at_load")
        if getattr(self, "_wind_arrow", None) is None or wxy is None or not self._wind_varies:
            return
        wx, wy = float(wxy[0]), float(wxy[1])
        speed = math.hypot(wx, wy)
        toward = math.atan2(wy, wx) if speed > 0.0 else math.radians(self.traj.scene.wind.direction_deg)
        self._set_wind_arrow(toward, speed)

    def _place_cameras(self):
        box = self.layout.views[0]
        aspect = box.width / box.height
        self.aspect = aspect
        # what the fitted views must show: the scene's points of interest, the load's box along its
        # path, the whole swing envelope, and the ground arrows (north, wind, +x/+y) with their labels
        half = 0.5 * np.asarray(self.lay.load_size_m, dtype=float)
        box = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)]) * half
        path = self.scene3d.path_load_m[::10]
        env = self.scene3d.bodies["envelope"].mesh.vertices
        pts = np.vstack([self.scene3d.interest_points(), (path[:, None, :] + box[None]).reshape(-1, 3),
                         env.min(axis=0), env.max(axis=0), *self._ground_marks])
        self.cams = []
        for view in self.views:
            if view == "custom":
                cam = views.custom(self.traj.scene.view)
            elif view == "follow":
                cam = None
            else:
                cam = views.fit(view, pts, aspect)
            self.cams.append(cam)
        longest = float(np.max(self.traj.sample(np.linspace(0, self.traj.t_end_s, 50))["rope_length"]))
        self.follow_span = views.follow_span(longest, self.lay.load_size_m)

    def _chart_pct(self, t: float, row: dict) -> float | None:
        """The chart utilisation at one instant, as the summary measures it; None without a chart."""
        if self.traj.scene.crane.chart is None:
            return None
        if self._chart_chunk is not None and t in self._chart_chunk:
            return self._chart_chunk[t]
        one = {k: np.asarray(row[k], dtype=float)[None] for k in
               ("suspension", "load", "rope_dir", "rope_tension_N") if row.get(k) is not None}
        one["hook"] = None if row.get("hook") is None else np.asarray(row["hook"], dtype=float)[None]
        series = chart_series(self.traj, np.array([t]), one)
        return float(series["utilisation_pct"][0])

    def _apply_camera(self, ren, cam: views.Camera):
        c = ren.GetActiveCamera()
        c.SetFocalPoint(*cam.focus)
        c.SetPosition(*cam.position)
        c.SetViewUp(*cam.up)
        c.SetViewAngle(cam.view_angle_deg)
        if cam.parallel_scale is not None:
            c.ParallelProjectionOn()
            c.SetParallelScale(cam.parallel_scale)
        else:
            c.ParallelProjectionOff()
        ren.ResetCameraClippingRange()
        near, far = c.GetClippingRange()
        c.SetClippingRange(0.5 * near, 1.5 * far)  # room for the moving parts (a fixed camera is set once)
    # ------------------------------------------------------------------ overlay
    def _overlay(self):
        """The 2D layer (:class:`swingsim.render.chrome.Chrome`): the bands around the views, the
        legend and all words, from :mod:`swingsim.render.layout`; nothing is drawn over a view."""
        L = self.layout
        f = L.fonts
        pad = L.text_boxes["pad"]
        ch = self.chrome = chrome_mod.Chrome(L, self.ss)
        k = self.ss
        rects = [(L.title, PALETTE["bar"]), (L.clock, PALETTE["bar"]), (L.panel, PALETTE["panel"]),
                 (L.notes, PALETTE["panel"]), (L.legend, PALETTE["panel"]), (L.caution, PALETTE["caution_band"])]
        rects += [(b, PALETTE["bar_light"]) for b in L.tags] + [(b, PALETTE["bar"]) for b in L.dividers]
        # the side panel's rules: along its left edge, and between readout, notes and legend
        rule = max(1, int(round(0.002 * self.size[1])))
        rects += [(layout_mod.Box(L.panel.x0, L.panel.y0, L.panel.x0 + rule, L.caution.y0), PALETTE["bar"]),
                  (layout_mod.Box(L.notes.x0, L.notes.y0, L.notes.x1, L.notes.y0 + rule), PALETTE["rule"]),
                  (layout_mod.Box(L.legend.x0, L.legend.y0, L.legend.x1, L.legend.y0 + rule), PALETTE["rule"])]
        rects += self._legend_swatches()
        for box, colour in rects:
            chrome_mod.fill(ch.picture, box, colour, k)
        for box in [L.title, L.clock, L.panel, L.notes, L.legend, L.caution, *L.tags, *L.dividers]:
            ch.keep(box)
        scene = self.traj.scene
        ch.text("title", layout_mod.fit_title(scene.title, L), L.title, "l", f["title"], PALETTE["bar_text"],
                bold=True, pad=pad)
        lg = L.legend
        row_h = f["legend"] * layout_mod.LINE_EM
        sw = int(round(1.6 * f["legend"]))
        for i, (_key, words) in enumerate(self.legend):
            y = lg.y0 + pad + i * row_h
            ch.text(f"legend_{i}", words, layout_mod.Box(lg.x0 + 2 * pad + sw, y, lg.x1, y + row_h), "l",
                    f["legend"], PALETTE["text"])
        for i, (box, v) in enumerate(zip(L.tags, self.views)):
            ch.text(f"tag_{i + 1}", f"{v} view", box, "c", f["tag"], PALETTE["text"], bold=True)
        ch.changing("clock", L.clock, "r", f["clock"], PALETTE["bar_text"], mono=True, pad=pad)
        ch.changing("readout", L.panel, "tl", f["panel"], PALETTE["text"], mono=True, pad=pad)
        ch.changing("notes", L.notes, "tl", f["notes"], PALETTE["text"], pad=pad)
        ch.changing("caution", L.caution, "c", f["caution"], PALETTE["text"], pad=pad)
        self.notes_chars = layout_mod.chars_per_line(L.notes.width - 2 * pad, f["notes"])
        self.caution_chars = layout_mod.chars_per_line(L.caution.width - 2 * pad, f["caution"])
        self.line_chars = self.banner_chars = self.caution_chars
        self._shown_labels = [[] for _ in self.views]
        # The rectangle read back from OpenGL each frame: around every pixel the bands leave
        # uncovered (the views'), so the frame is the same as one read back whole.
        rows_, cols_ = np.nonzero(ch.uncovered())
        if len(rows_):
            self._views_rect = (int(rows_.min()), int(rows_.max()) + 1, int(cols_.min()), int(cols_.max()) + 1)
        else:
            self._views_rect = (0, 1, 0, 1)

    def _legend_swatches(self) -> list:
        """Small swatches of the legend: the no-go zone in red and white stripes, the others plain."""
        L = self.layout
        pad = L.text_boxes["pad"]
        f = L.fonts["legend"]
        row_h = f * layout_mod.LINE_EM
        sw = int(round(1.6 * f))
        out = []
        for i, (key, _words) in enumerate(self.legend):
            y0 = L.legend.y0 + pad + i * row_h + 0.15 * row_h
            y1 = y0 + 0.7 * row_h
            x0 = L.legend.x0 + pad
            if key == "exclusion":
                n = 4
                for k in range(n):
                    out.append((layout_mod.Box(x0 + k * sw / n, y0, x0 + (k + 1) * sw / n, y1),
                                PALETTE["nogo_red"] if k % 2 == 0 else PALETTE["nogo_white"]))
            else:
                out.append((layout_mod.Box(x0, y0, x0 + sw, y1), PALETTE[key]))
        return out

    # ------------------------------------------------------------------ posing
    def pose(self, t: float, row: dict, crane: tuple, video_t: float | None = 0.0):
        """Put every body where it is at simulated time ``t`` and set the frame's words.

        One instant posed from its own outputs; :meth:`show` does the drawing.

        Parameters
        ----------
        t, row, video_t
            Simulated time [s], the run's outputs then and the video time [s], as for :meth:`show`.
        crane : tuple of float
            Base travel x, y [m], jib angle [rad] and radius [m] at ``t`` (``Motion.pose``).

        Returns
        -------
        swingsim.render.overlay.FrameText
            The words drawn on the frame.
        """
        samples = {k: np.asarray(row[k], dtype=float)[None] for k in SAMPLE_KEYS if row.get(k) is not None}
        crane_now = tuple(np.array([float(v)]) for v in crane)
        return self.show(t, self.scene3d.frames_from_samples(samples, crane_now), 0, row, video_t)

    def show(self, t: float, frames, index: int, row: dict, video_t: float | None = 0.0):
        """Show instant ``index`` of poses computed for many instants, and set the frame's words.

        Parameters
        ----------
        t : float
            Simulated time [s].
        frames : swingsim.scene3d.poses.Frames
            Poses and segments at several instants (``Scene3D.frames_from_samples``).
        index : int
            Which of those instants.
        row : dict
            The run's outputs at ``t`` (one instant of ``Trajectory.sample``).
        video_t : float or None
            Time in the video [s]; None for a still (no banner).

        Returns
        -------
        swingsim.render.overlay.FrameText
            The words drawn on the frame.
        """
        for name, actors in self.moving.items():
            m = frames.transforms[name][index]
            shown = bool(is_shown(m))
            for actor in actors:
                actor.SetVisibility(shown)
                if shown:
                    actor.user_matrix = m
        self.rope_line.points[:] = frames.segments["rope"][index]
        self.rope_line.Modified()
        self.sling_lines.points[:] = np.concatenate(
            [frames.segments[f"sling_{i + 1}"][index] for i in range(len(self.slings))])
        self.sling_lines.Modified()
        contact = self._update_tag_lines(frames, index, row)
        p = np.asarray(row["suspension"], dtype=float)
        load = np.asarray(row["load"], dtype=float)
        self._update_trail(t, load)
        self._update_wind(row)
        states = self._update_zones(row)
        for i, (ren, cam) in enumerate(zip(self.renderers, self.cams)):
            follow = cam is None
            if follow:
                # aim a little above the load: the swing in the middle of the view
                focus = (0.3 * p[0] + 0.7 * load[0], 0.3 * p[1] + 0.7 * load[1], load[2] + 0.3 * (p[2] - load[2]))
                cam = views.follow(focus, self.follow_span, self.aspect)
            if follow or not self._cam_set[i]:
                self._apply_camera(ren, cam)
                self._cam_set[i] = True
            self._shown_labels[i] = self._place_labels(i, load)
        crane = self._crane_numbers(t, row)
        ft = overlay.frame_text(t, video_t, self.video_len_s, self.speed, row, self.facts.events, states,
                                self.line_chars, self.banner_chars, self.facts, self._chart_pct(t, row), crane,
                                contact)
        # The numbers panel refreshes READOUT_HZ times a second of video, like a digital
        # display (readable, and text is costly to rasterise); the clock and the picture
        # show every frame's own time.
        slot = None if video_t is None else int(math.floor(video_t * READOUT_HZ + 1e-9))
        if slot is None or slot != self._readout_slot:
            self._set("readout", ft.readout)
            self._readout_slot = slot
            self.shown_readout = ft.readout
        self._set("clock", ft.clock)
        notes = "\n".join(x for x in (ft.stopped, ft.notes, ft.zone, ft.event) if x)
        self._set("notes", layout_mod.fit_lines(notes, self.notes_chars, self.layout.notes_lines))
        # the caution band: the full caution over the first and last seconds and on stills
        # (highlighted in the video), the short one in between
        full = bool(ft.banner) or video_t is None
        text = overlay.caution_banner_text() if full else ft.caution
        self.chrome.set("caution", layout_mod.wrap(" ".join(text.split()), self.caution_chars),
                        PALETTE["banner" if ft.banner else "caution_band"])
        self.last_text = ft
        self.zone_states = states
        self.near_zones = [name for name, _state, _bodies in states]
        return ft

    def _update_tag_lines(self, frames, index: int, row: dict) -> dict:
        """Tag lines to their ends and to the colour of their pull; the forces for the readout.

        Returns
        -------
        dict
            ``tag_lines`` (name, pull [N], max_pull_N [N]) and ``ground_N`` [N] (None without
            ``[ground]``), as :func:`swingsim.render.overlay.frame_text` takes them.
        """
        pulls = row.get("tag_line_tension_N")
        pulls = np.zeros(len(self.tag_lines)) if pulls is None else np.asarray(pulls, dtype=float).reshape(-1)
        out = []
        for j, tl in enumerate(self.tag_lines):
            tl["line"].points[:] = frames.segments[f"tag_line_{j + 1}"][index]
            tl["line"].Modified()
            pull = float(pulls[j])
            state = tag_line_state(pull, tl["max_pull_N"])
            if state != tl["state"]:
                colour = rgb(PALETTE[TAG_LINE_COLOUR[state]])
                for actor in tl["actors"]:
                    actor.GetProperty().SetColor(*colour)
                tl["state"] = state
            out.append((tl["name"], pull, tl["max_pull_N"]))
        ground = row.get("ground_normal_N")
        ground_N = (float(ground) if ground is not None else 0.0) if self.has_ground else None
        return {"tag_lines": out, "ground_N": ground_N}

    def _set(self, key: str, text: str):
        """Show words in one of the changing text boxes."""
        self.chrome.set(key, text)
        self.texts[key] = text

    def _crane_numbers(self, t: float, row: dict) -> dict:
        """Radius and slew (slewing cranes), hook height, and the wind at the load, for the readout."""
        scene = self.traj.scene
        out = {}
        if scene.crane.kind in overlay.SLEWING_KINDS:
            hit = self._crane_chunk.get(t) if self._crane_chunk is not None else None
            if hit is None:
                pose = self.traj.motion.pose(np.array([t]))
                hit = (float(pose.radius_m[0]), float(pose.jib_angle_rad[0]))
            out["radius_m"] = hit[0]
            out["slew_deg"] = math.degrees(hit[1] - self._slew0)
        hook = row.get("hook")
        if hook is not None and np.ndim(hook) == 1:
            out["hook_height_m"], out["height_label"] = float(hook[2]), "hook height"
        else:
            out["hook_height_m"], out["height_label"] = float(np.asarray(row["load"])[2]), "load height"
        if self.has_wind or self._wind_varies or row.get("wind_speed_m_s") is not None:
            out["wind_m_s"] = overlay.wind_at_load_m_s(row, scene)
            out["wind_from"] = compass_point(scene_wind_from_bearing_deg(scene))
            wxy = row.get("wind_at_load")
            if self._wind_varies and wxy is not None and math.hypot(float(wxy[0]), float(wxy[1])) > 0.0:
                toward = math.degrees(math.atan2(float(wxy[1]), float(wxy[0])))
                out["wind_from"] = compass_point(wind_from_bearing_deg(toward, scene.site.north_deg))
        return out

    def _update_trail(self, t, load):
        """The trail: the last TRAIL_S seconds, sampled every 0.1 s, ending at the load now."""
        k1 = int(np.searchsorted(self.trail_t, t, side="right"))
        k0 = max(0, k1 - (TRAIL_N - 1))
        seg = self.trail_xyz[k0:k1]
        pts = np.empty((TRAIL_N, 3))
        n = len(seg)
        pts[:TRAIL_N - 1 - n] = seg[0] if n else load
        pts[TRAIL_N - 1 - n:TRAIL_N - 1] = seg
        pts[-1] = load
        self.trail.points[:] = pts
        self.trail.Modified()

    def _update_zones(self, row):
        """Zones entered or within their margin turn the warning colour; returns their states.

        By the summary's own verdict (:func:`swingsim.metrics.zones.zone_verdicts_at`:
        every part of the suspended system against each zone), so the video and the
        report say the same thing at the same instant.

        Returns
        -------
        list of tuple
            ``(zone name, state, body names)`` of the zones not clear.
        """
        shown = []
        t = float(row["t"]) if row.get("t") is not None and np.ndim(row["t"]) == 0 else None
        chunk = self._zone_chunk
        if chunk is not None and t is not None and t in chunk:
            verdicts = chunk[t]
        else:
            verdicts = zone_verdicts_at(row, self.traj.scene) if self.zones else []
        for j, ((z, solid, edges, colour), (state, bodies)) in enumerate(zip(self.zones, verdicts)):
            if state != ENTERED and t is not None and self.facts.zone_entered_at(j, t):
                # the summary, sampled finer than the frames, counts this instant inside an entry:
                # the video says the same (never "near" while the summary says entered)
                state = ENTERED
                bodies = bodies or ["load"]
            if state in (ENTERED, NEAR):
                shown.append((z.name, state, bodies))
            if state != self._zone_state[j]:
                self._zone_look(z, solid, edges, state)
                self._zone_state[j] = state
        return shown

    def begin_chunk(self, samples: dict) -> None:
        """Measure the zones and the chart utilisation for a whole chunk of frames at once (numpy over it).

        The same rule as :func:`swingsim.metrics.zones.zone_verdicts_at` (a test holds them
        equal): each zone's :func:`~swingsim.metrics.zones.verdict` from the smallest clearance
        of any body, and the bodies inside (entered) or within the margin (near).

        Parameters
        ----------
        samples : dict
            ``Trajectory.sample`` at the chunk's instants (with ``t``).
        """
        self._zone_chunk = self._chart_chunk = self._crane_chunk = None
        scene = self.traj.scene
        ts = np.atleast_1d(np.asarray(samples["t"], dtype=float))
        if scene.crane.kind in overlay.SLEWING_KINDS:  # the readout's radius and slew, for the chunk at once
            pose = self.traj.motion.pose(ts)
            self._crane_chunk = {float(t): (float(r), float(a))
                                 for t, r, a in zip(ts, pose.radius_m, pose.jib_angle_rad)}
        if scene.crane.chart is not None:
            series = chart_series(self.traj, ts, samples)
            self._chart_chunk = {float(t): float(u) for t, u in zip(ts, series["utilisation_pct"])}
        if not scene.zones:
            return
        bodies = suspended_bodies(samples, scene)
        per_zone = []
        for zone in scene.zones:
            distance, _ = zone_clearances(bodies, zone)
            table = np.stack([np.asarray(distance[name], dtype=float).reshape(-1) for name in bodies.names], -1)
            per_zone.append((zone.margin_m, table))
        chunk = {}
        for i, t in enumerate(ts):
            out = []
            for margin, table in per_zone:
                state = verdict(float(table[i].min()), margin)
                limit = 0.0 if state == ENTERED else margin
                out.append((state, [name for c, name in enumerate(bodies.names) if table[i, c] <= limit]))
            chunk[float(t)] = out
        self._zone_chunk = chunk

    def _zone_look(self, zone, solid, edges, state):
        """A zone's colours for its state: amber within the margin, red when entered; a clear
        no-go zone shows only its red and white stripes and its red rim."""
        sp, ep = solid.GetProperty(), edges.GetProperty()
        if state == ENTERED:
            colour, opacity, width = PALETTE["warn"], 0.6, 4
        elif state == NEAR:
            colour, opacity, width = PALETTE["near"], 0.45, 4
        else:
            colour, opacity, width = PALETTE[zone.kind], STYLE[zone.kind]["opacity"], STYLE[zone.kind]["line_width"]
        sp.SetColor(*rgb(colour))
        sp.SetOpacity(opacity)
        ep.SetColor(*rgb(PALETTE["nogo_red"] if zone.kind == "exclusion" and state not in (ENTERED, NEAR)
                         else colour))
        ep.SetLineWidth(width * self.ss)
        solid.SetVisibility(not (zone.kind == "exclusion" and state not in (ENTERED, NEAR)))

    # ------------------------------------------------------------------ output
    def grab(self, overlay: bool = True) -> np.ndarray:
        """Render the frame and read its pixels, with the 2D layer put on.

        Parameters
        ----------
        overlay : bool
            Put on the bands, words and labels (False: the 3D views alone, for checks).

        Returns
        -------
        numpy.ndarray
            (height, width, 3) uint8, top row first.
        """
        rw = self.pl.ren_win
        if not self._warm:  # the very first picture after posing is lit differently: draw it twice
            rw.Render()
            self._warm = True
        rw.Render()
        w, h = self.render_size
        if overlay:
            # only the views' rectangle is read back; the bands come from the prepared picture
            y0, y1, x0, x1 = self._views_rect
            rw.GetPixelData(x0, h - y1, x1 - 1, h - 1 - y0, 0, self._pixels, 0)  # OpenGL rows: from the bottom
            img = self.chrome.frame_with(vtk_to_numpy(self._pixels).reshape(y1 - y0, x1 - x0, 3)[::-1],
                                         self._views_rect)
            k = self.ss
            for shown in self._shown_labels:
                for j, lb in shown:
                    self.labels[j][4].put(img, int(round(lb.x0 * k)), int(round(lb.y0 * k)))
        else:
            rw.GetPixelData(0, 0, w - 1, h - 1, 0, self._pixels, 0)
            img = np.ascontiguousarray(vtk_to_numpy(self._pixels).reshape(h, w, 3)[::-1])
        if self.ss == 1:
            return img
        k = self.ss  # supersampled: the mean of each k x k block (a box filter), rounded
        blocks = img.reshape(h // k, k, w // k, k, 3).astype(np.uint16).sum(axis=(1, 3))
        return ((blocks + (k * k) // 2) // (k * k)).astype(np.uint8)

    def project(self, points, view_index: int = 0) -> np.ndarray:
        """Where world points appear in one view's picture.

        Parameters
        ----------
        points : array_like, shape (n, 3)
            World points [m].
        view_index : int
            Which view (0 left, 1 right of a split picture).

        Returns
        -------
        numpy.ndarray
            (n, 2) pixel coordinates: column, and row from the top [px].
        """
        ren = self.renderers[view_index]
        w, h = self.size
        x0, y0, x1, y1 = ren.GetViewport()
        vw, vh = (x1 - x0) * w, (y1 - y0) * h
        cam = ren.GetActiveCamera()
        key = (view_index, cam.GetMTime(), vw / vh)
        cached = self._projection.get(view_index)
        if cached is not None and cached[0] == key:  # the camera has not moved: the same matrix
            matrix = cached[1]
        else:
            m = cam.GetCompositeProjectionTransformMatrix(vw / vh, -1, 1)
            matrix = np.array([[m.GetElement(i, j) for j in range(4)] for i in range(4)])
            self._projection[view_index] = (key, matrix)
        pts = np.asarray(points, dtype=float).reshape(-1, 3)
        q = np.column_stack([pts, np.ones(len(pts))]) @ matrix.T
        ndc = q[:, :3] / q[:, 3:4]
        col = x0 * w + (ndc[:, 0] + 1) / 2 * vw
        row = h - (y0 * h + (ndc[:, 1] + 1) / 2 * vh)
        return np.column_stack([col, row])

    def close(self) -> None:
        """Free the render window (never raises: closing must not hide the real error)."""
        try:
            self.pl.close()
        except Exception:  # noqa: BLE001 - closing must not hide the real error
            pass
