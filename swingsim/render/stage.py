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
import vtk
from vtkmodules.util.numpy_support import vtk_to_numpy

from swingsim import scene3d
from swingsim.metrics.chart import chart_series
from swingsim.metrics.zones import ENTERED, NEAR, zone_verdicts_at
from swingsim.render import overlay, views
from swingsim.render.gl import RenderUnavailableError, _message
from swingsim.render.palette import LABEL_STYLE, PALETTE, STYLE, darker, envelope_image, ground_image, rgb
from swingsim.scene.site import wind_from_bearing_deg, wind_words
from swingsim.scene3d.meshes import arrow
from swingsim.scene3d.poses import SAMPLE_KEYS
from swingsim.scene3d.transforms import is_shown

READOUT_HZ = 10.0  # refreshes of the numbers panel per second of video
TRAIL_S = 6.0  # simulated seconds of trail behind the load
TRAIL_N = 61


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
    """

    def __init__(self, traj, facts, *, size=(1280, 720), views=("oblique",), load_mesh=None,
                 speed=1.0, video_len_s=0.0):
        self.traj, self.facts, self.size = traj, facts, tuple(int(s) for s in size)
        w = traj.scene.wind
        self._wind_varies = bool(w.gusts or w.turbulence_intensity > 0.0 or w.profile != "uniform")
        self.views = tuple(views)
        self.speed, self.video_len_s = speed, video_len_s
        # Our own theme (the caller's global pyvista theme is left alone): no multisampling,
        # which would cost software OpenGL several times a frame's rendering time.
        theme = pv.themes.Theme()
        theme.multi_samples = 0
        theme.anti_aliasing = None
        self.pl = pv.Plotter(off_screen=True, window_size=list(self.size), theme=theme,
                             shape=(1, len(self.views)), border=False, lighting=None)
        self.renderers = [self.pl.renderers[i] for i in range(len(self.views))]
        self.scene3d = scene3d.build(traj, load_mesh=load_mesh)
        self.lay = self.scene3d.layout
        self._build()
        self._place_cameras()
        self._overlay()
        self._pixels = vtk.vtkUnsignedCharArray()
        self._readout_slot = None
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
                        kw["line_width"] = line_width
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
                colour = PALETTE[colour] if label.role in ("grid", "axis_x", "axis_y") else darker(PALETTE[colour])
                self._label(label.position_m, label.text, size=size, colour=colour, bold=bold)
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
        # moving bodies, each with its actors (a spreader has its beam and its centre line)
        self.moving = {name: [a for a in self.actors[name] if a is not None]
                       for name, body in bodies.items() if body.moves}
        self.crane_actors = {name: self.actors[name][0] for name in self.scene3d.crane_roles}
        self.zones = []
        for z in scene.zones:
            solid, edges = self.actors[f"zone_{z.name}"]
            self.zones.append((z, solid, edges, PALETTE[z.kind]))
        self._zone_state = ["clear"] * len(self.zones)
        self.rope = self.actors["rope"][0]
        self.slings = [self.actors[f"sling_{i + 1}"][0] for i in range(self.scene3d.rigging.sling_count)]
        self.load_actor = self.actors["load"][0]
        self.hook_actor = self.actors["hook"][0]
        self.hook_size = self.scene3d.rigging.hook_size_m
        self.shadow = self.actors["shadow"][0]
        self.beam_actors = tuple(self.moving.get("spreader", ()))
        self.beam_span = self.scene3d.spreader_span_m

    def _label(self, pos, text, *, size, colour, bold=False):
        """A 3D-anchored label that always faces the camera (one actor per view, returned)."""
        made = []
        for ren in self.renderers:
            a = vtk.vtkBillboardTextActor3D()
            a.SetInput(text)
            a.SetPosition(*pos)
            tp = a.GetTextProperty()
            tp.SetFontSize(max(10, int(size * self.size[1])))
            tp.SetColor(*rgb(colour))
            tp.SetBold(bold)
            tp.SetJustificationToCentered()
            ren.AddActor(a)
            made.append(a)
        return made

    def _site_arrows(self, axis_mesh):
        """A north arrow and, with wind, an arrow the way the wind blows, on the ground beside the +x/+y arrows.

        Same length as the axis arrows, beside them on the side away from +x: north
        at ``site.north_deg`` from +x, the wind toward ``wind.direction_deg``, each
        with its label (the wind as the bearing it comes from).
        """
        scene = self.traj.scene
        v = axis_mesh.vertices
        origin = v.min(axis=0)
        length = float(np.ptp(v[:, 1]))
        centre = np.array([origin[0] - 3.0 * length, origin[1] + 1.0 * length, 0.12])
        north = math.radians(scene.site.north_deg)
        d = np.array([math.cos(north), math.sin(north), 0.0])
        self._add(_polydata(arrow(centre - 0.5 * length * d, d, length), "faces"), PALETTE["north"],
                  lighting=False)
        self._label(centre + 0.65 * length * d, "N", size=LABEL_STYLE["axis_x"][1], colour=PALETTE["north"],
                    bold=True)
        if scene.wind.speed_m_s > 0.0 or scene.wind.gusts:
            toward = math.radians(scene.wind.direction_deg)
            at = centre + np.array([-0.2 * length, -1.6 * length, 0.0])
            # built along +x about its middle, turned and scaled each frame to the wind at the load
            actor = self._add(_polydata(arrow(np.array([-0.5 * length, 0.0, 0.0]), np.array([1.0, 0.0, 0.0]),
                                              length, tip_radius=0.12, shaft_radius=0.05), "faces"),
                              PALETTE["wind"], lighting=False)
            labels = self._label(at + np.array([0.0, -1.2 * length, 0.0]),
                                 f"wind {scene.wind.speed_m_s:g} m/s {wind_words(scene)}",
                                 size=LABEL_STYLE["axis_x"][1], colour=PALETTE["wind"], bold=True)
            self._wind_arrow = (actor, labels, at, max(scene.wind.speed_m_s, 1.0))
            self._set_wind_arrow(toward, scene.wind.speed_m_s, None)

    def _set_wind_arrow(self, toward_rad: float, speed_m_s: float, text: str | None) -> None:
        """Turn the wind arrow toward ``toward_rad``, its length with the speed, and relabel it."""
        actor, labels, at, ref = self._wind_arrow
        k = min(max(speed_m_s / ref, 0.25), 1.8)
        c, s_ = math.cos(toward_rad), math.sin(toward_rad)
        m = np.array([[c * k, -s_ * k, 0.0, at[0]], [s_ * k, c * k, 0.0, at[1]], [0.0, 0.0, k, at[2]],
                      [0.0, 0.0, 0.0, 1.0]])
        actor.user_matrix = m
        if text is not None:
            for a in labels:
                a.SetInput(text)

    def _update_wind(self, row) -> None:
        """The wind arrow and its label from the run's wind at the load at this instant (gusts, turbulence)."""
        wxy = row.get("wind_at_load")
        if getattr(self, "_wind_arrow", None) is None or wxy is None or not self._wind_varies:
            return
        wx, wy = float(wxy[0]), float(wxy[1])
        speed = math.hypot(wx, wy)
        toward = math.atan2(wy, wx) if speed > 0.0 else math.radians(self.traj.scene.wind.direction_deg)
        bearing = wind_from_bearing_deg(math.degrees(toward), self.traj.scene.site.north_deg)
        self._set_wind_arrow(toward, speed, f"wind at load {speed:.1f} m/s from {bearing:.0f} deg")

    def _place_cameras(self):
        w, h = self.size
        aspect = (w / len(self.views)) / h
        self.aspect = aspect
        pts = self.scene3d.interest_points()
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
    # ------------------------------------------------------------------ overlay
    def _overlay(self):
        """A top layer, as large as the window, that holds all the 2D text."""
        rw = self.pl.ren_win
        rw.SetNumberOfLayers(2)
        ren = vtk.vtkRenderer()
        ren.SetLayer(1)
        ren.SetViewport(0, 0, 1, 1)
        ren.InteractiveOff()
        rw.AddRenderer(ren)
        self.over = ren
        h = self.size[1]
        fs = lambda k: max(9, int(round(k * h)))  # noqa: E731
        self.txt = {}
        self.txt["title"] = self._text(self.traj.scene.title, (0.012, 0.985), fs(0.036), "tl", bold=True)
        self.txt["clock"] = self._text("", (0.012, 0.925), fs(0.032), "tl", mono=True)
        self.txt["readout"] = self._text("", (0.988, 0.985), fs(0.027), "tr", mono=True)
        self.txt["event"] = self._text("", (0.012, 0.86), fs(0.03), "tl", bold=True,
                                       colour="#7a0000")
        self.txt["zone"] = self._text("", (0.012, 0.70), fs(0.03), "tl", bold=True, colour=PALETTE["warn"])
        self.txt["stopped"] = self._text("", (0.5, 0.55), fs(0.034), "cc", bold=True, colour=PALETTE["warn"],
                                         opacity=0.9, frame=True)
        # characters a line holds at a font size (Arial averages about 0.55 em a character)
        self.line_chars = max(20, int(self.size[0] * 0.97 / (0.55 * fs(0.024))))
        self.banner_chars = max(20, min(72, int(self.size[0] * 0.9 / (0.58 * fs(0.032)))))
        self.txt["caution"] = self._text(overlay.caution_line(self.line_chars), (0.5, 0.012), fs(0.024), "bc")
        self.txt["banner"] = self._text("", (0.5, 0.075), fs(0.032), "bc", bold=True,
                                        background=PALETTE["banner"], opacity=0.92, frame=True)
        if len(self.views) > 1:
            for i, v in enumerate(self.views):
                self._text(f"{v} view", ((i + 0.5) / len(self.views), 0.06), fs(0.026), "bc",
                           bold=True, colour="#333333")
            sep = vtk.vtkActor2D()
            pts = vtk.vtkPoints()
            pts.InsertNextPoint(0.5, 0.0, 0)
            pts.InsertNextPoint(0.5, 1.0, 0)
            lines = vtk.vtkCellArray()
            lines.InsertNextCell(2)
            lines.InsertCellPoint(0)
            lines.InsertCellPoint(1)
            poly = vtk.vtkPolyData()
            poly.SetPoints(pts)
            poly.SetLines(lines)
            coord = vtk.vtkCoordinate()
            coord.SetCoordinateSystemToNormalizedViewport()
            mapper = vtk.vtkPolyDataMapper2D()
            mapper.SetInputData(poly)
            mapper.SetTransformCoordinate(coord)
            sep.SetMapper(mapper)
            sep.GetProperty().SetColor(*rgb("#222222"))
            sep.GetProperty().SetLineWidth(3)
            ren.AddActor(sep)

    def _text(self, text, pos, size, anchor, *, bold=False, mono=False, colour=None, background=None,
              opacity=0.8, frame=False):
        a = vtk.vtkTextActor()
        a.SetInput(text)
        a.GetPositionCoordinate().SetCoordinateSystemToNormalizedViewport()
        a.GetPositionCoordinate().SetValue(*pos)
        tp = a.GetTextProperty()
        tp.SetFontSize(size)
        tp.SetBold(bold)
        if mono:
            tp.SetFontFamilyToCourier()
        else:
            tp.SetFontFamilyToArial()
        tp.SetColor(*rgb(colour or PALETTE["text"]))
        tp.SetBackgroundColor(*rgb(background or PALETTE["panel"]))
        tp.SetBackgroundOpacity(opacity)
        if frame:
            tp.SetFrame(True)
            tp.SetFrameColor(*rgb("#7a5c00"))
            tp.SetFrameWidth(3)
        v, hz = anchor[0], anchor[1]
        {"t": tp.SetVerticalJustificationToTop, "b": tp.SetVerticalJustificationToBottom,
         "c": tp.SetVerticalJustificationToCentered}[v]()
        {"l": tp.SetJustificationToLeft, "r": tp.SetJustificationToRight,
         "c": tp.SetJustificationToCentered}[hz]()
        self.over.AddActor(a)
        return a

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
        p = np.asarray(row["suspension"], dtype=float)
        load = np.asarray(row["load"], dtype=float)
        self._update_trail(t, load)
        self._update_wind(row)
        states = self._update_zones(row)
        for ren, cam in zip(self.renderers, self.cams):
            if cam is None:
                # aim a little above the load: the swing in the middle, clear of the banner
                focus = (0.3 * p[0] + 0.7 * load[0], 0.3 * p[1] + 0.7 * load[1], load[2] + 0.3 * (p[2] - load[2]))
                cam = views.follow(focus, self.follow_span, self.aspect)
            self._apply_camera(ren, cam)
        ft = overlay.frame_text(t, video_t, self.video_len_s, self.speed, row, self.facts.events, states,
                                self.line_chars, self.banner_chars, self.facts, self._chart_pct(t, row))
        # The numbers panel refreshes READOUT_HZ times a second of video, like a digital
        # display (readable, and text is costly to rasterise); the clock and the picture
        # show every frame's own time.
        slot = None if video_t is None else int(math.floor(video_t * READOUT_HZ + 1e-9))
        keys = ["clock", "event", "zone", "banner", "stopped"]
        if slot is None or slot != self._readout_slot:
            keys.append("readout")
            self._readout_slot = slot
            self.shown_readout = ft.readout
        for key in keys:
            self.txt[key].SetInput(getattr(ft, key))
            self.txt[key].SetVisibility(bool(getattr(ft, key)))
        self.last_text = ft
        self.zone_states = states
        self.near_zones = [name for name, _state, _bodies in states]
        return ft

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
        verdicts = zone_verdicts_at(row, self.traj.scene) if self.zones else []
        for j, ((z, solid, edges, colour), (state, bodies)) in enumerate(zip(self.zones, verdicts)):
            if state in (ENTERED, NEAR):
                shown.append((z.name, state, bodies))
            if state != self._zone_state[j]:
                warn = state in (ENTERED, NEAR)
                c = rgb(PALETTE["warn"] if warn else colour)
                solid.GetProperty().SetColor(*c)
                edges.GetProperty().SetColor(*c)
                solid.GetProperty().SetOpacity(0.6 if state == ENTERED else 0.45 if warn else STYLE[z.kind]["opacity"])
                self._zone_state[j] = state
        return shown

    # ------------------------------------------------------------------ output
    def grab(self) -> np.ndarray:
        """Render the frame and read its pixels.

        Returns
        -------
        numpy.ndarray
            (height, width, 3) uint8, top row first.
        """
        rw = self.pl.ren_win
        rw.Render()
        w, h = self.size
        rw.GetPixelData(0, 0, w - 1, h - 1, 0, self._pixels, 0)
        return vtk_to_numpy(self._pixels).reshape(h, w, 3)[::-1]

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
        m = cam.GetCompositeProjectionTransformMatrix(vw / vh, -1, 1)
        matrix = np.array([[m.GetElement(i, j) for j in range(4)] for i in range(4)])
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
