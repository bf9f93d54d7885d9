"""The 3D stage: built once, then posed and photographed frame after frame.

Per frame only transforms (``actor.user_matrix``), the trail's points (in
place), a few colours and the kept text actors change; nothing is rebuilt.
"""

from __future__ import annotations

import math

import numpy as np
import pyvista as pv
import vtk
from vtkmodules.util.numpy_support import vtk_to_numpy

from swingsim.metrics.zones import load_half_size_m, zone_distance
from swingsim.scene3d import geometry as G
from swingsim.render import overlay as O
from swingsim.scene3d import transforms as T
from swingsim.render import views as V
from swingsim.render.gl import RenderUnavailableError, _message

# The project's own plain palette: light sky, sand ground, slate crane, signal-orange load; the hook block and
# a spreader beam share the hook's yellow.
PALETTE = {
    "sky": "#dfe7ec",
    "ground": "#d8d2c2", "grid_minor": "#c3bba6", "grid_major": "#8f8672",
    "crane": "#3f5d7d", "crane_dark": "#2a3f56", "trolley": "#1f2d3d",
    "rope": "#202020", "hook": "#f2c14e", "sling": "#2e7d32",
    "load": "#f26b1d", "shadow": "#3b3528", "envelope": "#5fa8d3", "trail": "#7b2cbf",
    "obstacle": "#6c757d", "exclusion": "#2a9d8f", "warn": "#d62828",
    "axis_x": "#9d0208", "axis_y": "#1b4332", "text": "#111111", "panel": "#ffffff",
    "banner": "#fff3b0",
}
READOUT_HZ = 10.0  # refreshes of the numbers panel per second of video
TRAIL_S = 6.0  # simulated seconds of trail behind the load
TRAIL_N = 61


def _rgb(hex_colour: str) -> tuple:
    return tuple(int(hex_colour[i:i + 2], 16) / 255.0 for i in (1, 3, 5))


class Stage:
    """A posed, photographable scene of one run.

    Parameters
    ----------
    traj : Trajectory
        The run to draw.
    facts : facts.Facts
        Its events.
    size : (int, int)
        Frame width and height [px].
    views : sequence of str
        One view, or two for a split picture side by side.
    load_mesh : pyvista.PolyData, optional
        A user mesh for the load (its own frame: centre of gravity at the origin, z up).
    """

    def __init__(self, traj, facts, *, size=(1280, 720), views=("oblique",), load_mesh=None,
                 speed=1.0, video_len_s=0.0):
        self.traj, self.facts, self.size = traj, facts, tuple(int(s) for s in size)
        self.views = tuple(views)
        self.speed, self.video_len_s = speed, video_len_s
        scene = traj.scene
        # Our own theme (the caller's global pyvista theme is left alone): no multisampling,
        # which would cost software OpenGL several times a frame's rendering time.
        theme = pv.themes.Theme()
        theme.multi_samples = 0
        theme.anti_aliasing = None
        self.pl = pv.Plotter(off_screen=True, window_size=list(self.size), theme=theme,
                             shape=(1, len(self.views)), border=False, lighting=None)
        self.renderers = [self.pl.renderers[i] for i in range(len(self.views))]
        size_m = scene.load.size_m or G.default_load_size(scene.load.mass_kg)
        shape = scene.load.shape if load_mesh is None else "mesh"
        self.lay = G.make_layout(traj, size_m, shape)
        self._build(load_mesh)
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
             specular=0.0, name=None, lighting=True):
        actor = None
        for i, ren in enumerate(self.renderers):
            self.pl.subplot(0, i)
            if actor is None:
                kw = dict(color=colour, opacity=opacity, ambient=ambient, diffuse=diffuse,
                          specular=specular, smooth_shading=False, lighting=lighting,
                          show_scalar_bar=False, reset_camera=False)
                if line_width:
                    kw["line_width"] = line_width
                actor = self.pl.add_mesh(mesh, **kw)
            else:
                ren.add_actor(actor, reset_camera=False)
        return actor

    def _add_textured(self, mesh, tex):
        actor = None
        for i, ren in enumerate(self.renderers):
            self.pl.subplot(0, i)
            if actor is None:
                actor = self.pl.add_mesh(mesh, texture=tex, lighting=False, reset_camera=False)
            else:
                ren.add_actor(actor, reset_camera=False)
        return actor

    def _build(self, load_mesh):
        pal, lay, traj, scene = PALETTE, self.lay, self.traj, self.traj.scene
        for i, ren in enumerate(self.renderers):
            self.pl.subplot(0, i)
            self.pl.set_background(pal["sky"])  # flat: a gradient costs llvmpipe ~10% a frame
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
        plane, img, labels, gb = G.ground_meshes(lay, _rgb(pal["ground"]), _rgb(pal["grid_minor"]),
                                                 _rgb(pal["grid_major"]))
        self.ground_bounds = gb
        tex = pv.Texture(np.ascontiguousarray(img[::-1]))  # pyvista: row 0 is the top (high y)
        tex.SetInterpolate(True)  # bilinear; mipmaps would cost llvmpipe more than the lines saved
        self._add_textured(plane, tex)
        span = max(gb[1] - gb[0], gb[3] - gb[2])
        for pos, text in labels:
            self._label(pos, text, size=0.017, colour=pal["grid_major"])
        alen = max(2.0, 0.04 * span)
        ax, ay, px, py = G.axis_arrows(lay, alen)
        self._add(ax, pal["axis_x"], lighting=False)
        self._add(ay, pal["axis_y"], lighting=False)
        self._label(px, "+x", size=0.022, colour=pal["axis_x"], bold=True)
        self._label(py, "+y", size=0.022, colour=pal["axis_y"], bold=True)

        # crane
        self.crane_actors, roles = {}, {}
        for name, (mesh, role) in G.crane_bodies(lay).items():
            colour = pal["trolley"] if name == "trolley" else pal["crane_dark"] if name in ("weight", "carrier") \
                else pal["crane"]
            self.crane_actors[name] = self._add(mesh, colour)
            roles[name] = role
        self.crane_roles = roles

        # zones
        self.zones = []
        for z in scene.zones:
            colour = pal["obstacle"] if z.kind == "obstacle" else pal["exclusion"]
            mesh = G.zone_box(z)
            solid = self._add(mesh, colour, opacity=0.33 if z.kind == "obstacle" else 0.25)
            edges = self._add(mesh.extract_feature_edges(), colour, line_width=2, lighting=False)
            # the name just above the zone, or inside a tall one, where the jib will not hide it
            top = ((z.min_m[0] + z.max_m[0]) / 2, (z.min_m[1] + z.max_m[1]) / 2,
                   min(z.max_m[2] + 0.6, max(z.min_m[2] + 3.0, 10.0)))
            self._label(top, z.name, size=0.02, colour=_darker(colour), bold=True)
            self.zones.append((z, solid, edges, colour))
        self._zone_state = [False] * len(self.zones)
        self.load_half = load_half_size_m(scene)

        # plan-view envelope of the load's footprint, and the trail
        tgrid = np.arange(0.0, traj.t_end_s + 1e-9, 0.1)
        s = traj.sample(tgrid)
        self.trail_t = tgrid
        self.trail_xyz = s["load"]
        lb = G.load_mesh(scene.load.shape, lay.load_size, load_mesh).bounds
        plane, rgba = G.envelope_image(s["load"], (0.5 * (lb[1] - lb[0]), 0.5 * (lb[3] - lb[2])),
                                       _rgb(pal["envelope"]))
        self.envelope_rgba = rgba
        tex = pv.Texture(np.ascontiguousarray(rgba[::-1]))  # pyvista: row 0 is the top (high y)
        tex.SetInterpolate(True)
        self._add_textured(plane, tex)
        self.trail = G.polyline(np.repeat(s["load"][:1], TRAIL_N, axis=0))
        self._add(self.trail, pal["trail"], line_width=3, lighting=False)

        # rope, hook, slings, load, shadow
        rope_r = max(0.03, 0.006 * scene.rope.length_m) if scene.rope.diameter_m is None \
            else max(0.03, scene.rope.diameter_m * 1.5)
        unit_rod = pv.Cylinder(center=(0, 0, 0.5), direction=(0, 0, 1), radius=1.0, height=1.0,
                               resolution=12, capping=False)
        self.rope_r = rope_r
        self.rope = self._add(unit_rod, pal["rope"], ambient=0.4)
        sling_mesh = pv.Cylinder(center=(0, 0, 0.5), direction=(0, 0, 1), radius=1.0, height=1.0,
                                 resolution=8, capping=False)
        mesh = G.load_mesh(scene.load.shape, lay.load_size, load_mesh)
        self.load_local = mesh
        self.attach_local = G.top_attach_points(mesh, scene.load.shape if load_mesh is None else "box")
        self.rig_h = G.rigging_height(self.attach_local)
        self.sling_r = max(0.02, 0.6 * rope_r)
        # A spreader (lifting beam): the model gives its end lugs and drop-leg lugs; the beam is
        # built once along x, then posed by its user_matrix; its legs are two top slings from
        # the hook to the end lugs and the drop legs from the lugs to the load.
        self.beam_actors = ()
        n_legs = 8
        if s.get("spreader_ends") is not None:
            ends0 = np.asarray(s["spreader_ends"][0], dtype=float)
            self.beam_span = float(np.linalg.norm(ends0[1] - ends0[0]))
            solid, line = G.spreader_beam(self.beam_span)
            self.beam_actors = (self._add(solid, pal["hook"], ambient=0.4),
                                self._add(line, pal["hook"], line_width=3, lighting=False))
            n_legs = max(8, np.asarray(s["spreader_lugs"]).shape[1] + 2)
        self.slings = [self._add(sling_mesh, pal["sling"], ambient=0.4) for _ in range(n_legs)]
        # The same rope and legs as lines too, never thinner than a pixel or two however far
        # the camera (a tube a few centimetres thick breaks up at site scale).
        self.rope_line = G.polyline(np.zeros((2, 3)))
        self._add(self.rope_line, pal["rope"], line_width=2, lighting=False)
        self.sling_lines = pv.PolyData(np.zeros((2 * n_legs, 3)), lines=np.column_stack(
            [np.full(n_legs, 2), np.arange(0, 2 * n_legs, 2), np.arange(1, 2 * n_legs, 2)]).ravel())
        self._add(self.sling_lines, pal["sling"], line_width=2, lighting=False)
        self.load_actor = self._add(mesh, pal["load"], ambient=0.45, diffuse=0.7)
        hs = max(0.25, 0.35 * min(lay.load_size))
        self.hook_size = hs
        hook = G.box(-hs / 2, hs / 2, -hs / 3, hs / 3, -hs * 0.7, hs * 0.7)
        self.hook_actor = self._add(hook, pal["hook"], ambient=0.4)
        b = mesh.bounds
        shadow = G.box(b[0], b[1], b[2], b[3], 0.0, 0.01)
        self.shadow = self._add(shadow, pal["shadow"], opacity=0.35, lighting=False)

    def _label(self, pos, text, *, size, colour, bold=False):
        """A 3D-anchored label that always faces the camera."""
        for ren in self.renderers:
            a = vtk.vtkBillboardTextActor3D()
            a.SetInput(text)
            a.SetPosition(*pos)
            tp = a.GetTextProperty()
            tp.SetFontSize(max(10, int(size * self.size[1])))
            tp.SetColor(*_rgb(colour))
            tp.SetBold(bold)
            tp.SetJustificationToCentered()
            ren.AddActor(a)

    def _place_cameras(self):
        w, h = self.size
        aspect = (w / len(self.views)) / h
        self.aspect = aspect
        pts = self.interest_points()
        self.cams = []
        for view in self.views:
            if view == "custom":
                cam = V.custom(self.traj.scene.view)
            elif view == "follow":
                cam = None
            else:
                cam = V.fit(view, pts, aspect)
            self.cams.append(cam)
        L = float(np.max(self.traj.sample(np.linspace(0, self.traj.t_end_s, 50))["rope_length"]))
        self.follow_span = 0.35 * L + 2.5 * max(self.lay.load_size) + 3.0

    def interest_points(self):
        """Points the preset views must show: the crane wherever it goes, the load's path, the zones [m]."""
        pts = [self.trail_xyz]
        for z in self.traj.scene.zones:
            pts.append([z.min_m, z.max_m])
        t = np.linspace(0.0, self.traj.t_end_s, 25)
        X, Y, phi, rho = G.crane_pose(self.traj.motion, t)
        susp = self.traj.motion.evaluate(t)["p"]
        for i in range(len(t)):
            mats = G.crane_matrices(self.lay, self.crane_roles, X[i], Y[i], phi[i], rho[i], susp[i])
            for name, a in self.crane_actors.items():
                b = a.GetMapper().GetInput().GetBounds()
                c = np.array([[x, y, z, 1.0] for x in b[:2] for y in b[2:4] for z in b[4:]])
                m = mats.get(name, np.eye(4))
                pts.append((c @ m.T)[:, :3])
        for z in self.traj.scene.zones:
            pts.append([[x, y, zz] for x in (z.min_m[0], z.max_m[0]) for y in (z.min_m[1], z.max_m[1])
                        for zz in (z.min_m[2], z.max_m[2])])
        return np.concatenate([np.asarray(p, dtype=float).reshape(-1, 3) for p in pts])

    def _apply_camera(self, ren, cam: V.Camera):
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
        self.txt["caution"] = self._text(O.caution_line(self.line_chars), (0.5, 0.012), fs(0.024), "bc")
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
            sep.GetProperty().SetColor(*_rgb("#222222"))
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
        tp.SetColor(*_rgb(colour or PALETTE["text"]))
        tp.SetBackgroundColor(*_rgb(background or PALETTE["panel"]))
        tp.SetBackgroundOpacity(opacity)
        if frame:
            tp.SetFrame(True)
            tp.SetFrameColor(*_rgb("#7a5c00"))
            tp.SetFrameWidth(3)
        v, hz = anchor[0], anchor[1]
        {"t": tp.SetVerticalJustificationToTop, "b": tp.SetVerticalJustificationToBottom,
         "c": tp.SetVerticalJustificationToCentered}[v]()
        {"l": tp.SetJustificationToLeft, "r": tp.SetJustificationToRight,
         "c": tp.SetJustificationToCentered}[hz]()
        self.over.AddActor(a)
        return a

    # ------------------------------------------------------------------ posing
    def pose(self, t: float, row: dict, crane: tuple, video_t: float = 0.0):
        """Put every body where it is at simulated time ``t`` [s].

        ``row``: the run's outputs at ``t`` (one sample); ``crane``: (X, Y, phi, rho).
        """
        p = np.asarray(row["suspension"], dtype=float)
        load = np.asarray(row["load"], dtype=float)
        for name, m in G.crane_matrices(self.lay, self.crane_roles, *crane, p).items():
            self.crane_actors[name].user_matrix = m
        hook = row.get("hook")
        anchor = p if hook is None else np.asarray(hook, dtype=float)
        rot = row.get("load_rotation")
        if rot is None:
            down = load - anchor
            nd = np.linalg.norm(down)
            rot = T.frame_from_axis(-down / nd) if nd > 1e-9 else np.eye(3)
        self.load_actor.user_matrix = T.pose(rot, load)
        up = rot[:, 2]
        attach = row.get("attach_points")
        if attach is None:
            attach = load + self.attach_local @ rot.T
        attach = np.asarray(attach, dtype=float).reshape(-1, 3)
        ends = row.get("spreader_ends") if self.beam_actors else None
        if hook is None and (ends is not None or row.get("attach_points") is not None):
            # Rigging from the model but no hook block: the legs (or a spreader's top slings)
            # meet at the rope's end, the model's pin.
            apex = p + float(row["rope_length"]) * np.asarray(row["rope_dir"], dtype=float)
            self.hook_actor.SetVisibility(False)
            rope_end = apex
        elif hook is None:
            # No hook block in the model: the rope's modelled length runs to the load's centre
            # of gravity; draw the last part of it as the rigging above the load.
            top = float(self.attach_local[:, 2].max())
            room = max(0.0, float(np.linalg.norm(load - p)) - top - 0.3)
            apex = load + up * (top + min(self.rig_h, room))
            self.hook_actor.SetVisibility(False)
            rope_end = apex
        else:
            apex = anchor - up * 0.7 * self.hook_size
            self.hook_actor.SetVisibility(True)
            self.hook_actor.user_matrix = T.pose(T.frame_from_axis(p - anchor) if np.linalg.norm(p - anchor) > 1e-9
                                                 else np.eye(3), anchor)
            rope_end = anchor + (p - anchor) / max(np.linalg.norm(p - anchor), 1e-9) * 0.7 * self.hook_size
        self.rope.user_matrix = _rod(p, rope_end, self.rope_r)
        self.rope_line.points[:] = (p, rope_end)
        self.rope_line.Modified()
        if ends is not None:
            ends = np.asarray(ends, dtype=float).reshape(2, 3)
            lugs = np.asarray(row["spreader_lugs"], dtype=float).reshape(-1, 3)
            m = T.pose(T.frame_x_up(ends[1] - ends[0], up), 0.5 * (ends[0] + ends[1]))
            for a in self.beam_actors:
                a.user_matrix = m
            # two top slings, hook to end lugs, then the drop legs, lugs to lifting points
            legs = [(apex, ends[0]), (apex, ends[1])] + list(zip(lugs, attach))
        else:
            legs = [(apex, a) for a in attach]
        sp = np.empty((2 * len(self.slings), 3))
        for i, s in enumerate(self.slings):
            if i < len(legs):
                a, b = legs[i]
                s.SetVisibility(True)
                s.user_matrix = _rod(a, b, self.sling_r)
                sp[2 * i], sp[2 * i + 1] = a, b
            else:
                s.SetVisibility(False)
                sp[2 * i] = sp[2 * i + 1] = apex
        self.sling_lines.points[:] = sp
        self.sling_lines.Modified()
        self.shadow.user_matrix = T.pose(_yaw_only(rot), (load[0], load[1], 0.05))
        # trail: the last TRAIL_S seconds, sampled every 0.1 s, ending at the load now
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
        # zones within their margin of the load, by the summary's own rule (metrics.zone_distance:
        # the load's upright box against the zone), so the video and the report agree
        near = []
        for j, (z, solid, edges, colour) in enumerate(self.zones):
            d = zone_distance(load[None, :], np.asarray(z.min_m) - self.load_half, np.asarray(z.max_m) + self.load_half)
            inside = bool(d[0] <= z.margin_m)
            if inside:
                near.append(z.name)
            if inside != self._zone_state[j]:
                c = _rgb(PALETTE["warn"] if inside else colour)
                solid.GetProperty().SetColor(*c)
                edges.GetProperty().SetColor(*c)
                solid.GetProperty().SetOpacity(0.45 if inside else (0.33 if z.kind == "obstacle" else 0.25))
                self._zone_state[j] = inside
        for ren, cam in zip(self.renderers, self.cams):
            if cam is None:
                # aim a little above the load: the swing in the middle, clear of the banner
                focus = (0.3 * p[0] + 0.7 * load[0], 0.3 * p[1] + 0.7 * load[1], load[2] + 0.3 * (p[2] - load[2]))
                cam = V.follow(focus, self.follow_span, self.aspect)
            self._apply_camera(ren, cam)
        ft = O.frame_text(t, video_t, self.video_len_s, self.speed, row, self.facts.events, near,
                          self.line_chars, self.banner_chars, self.facts)
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
        self.near_zones = near
        return ft

    # ------------------------------------------------------------------ output
    def grab(self) -> np.ndarray:
        """Render and return the frame, (height, width, 3) uint8, top row first."""
        rw = self.pl.ren_win
        rw.Render()
        w, h = self.size
        rw.GetPixelData(0, 0, w - 1, h - 1, 0, self._pixels, 0)
        return vtk_to_numpy(self._pixels).reshape(h, w, 3)[::-1]

    def project(self, points, view_index: int = 0) -> np.ndarray:
        """Pixel coordinates (column, row from the top) of world points [m] in one view."""
        ren = self.renderers[view_index]
        w, h = self.size
        x0, y0, x1, y1 = ren.GetViewport()
        vw, vh = (x1 - x0) * w, (y1 - y0) * h
        cam = ren.GetActiveCamera()
        m = cam.GetCompositeProjectionTransformMatrix(vw / vh, -1, 1)
        M = np.array([[m.GetElement(i, j) for j in range(4)] for i in range(4)])
        P = np.column_stack([np.asarray(points, dtype=float).reshape(-1, 3), np.ones(len(np.atleast_2d(points)))])
        q = P @ M.T
        ndc = q[:, :3] / q[:, 3:4]
        col = x0 * w + (ndc[:, 0] + 1) / 2 * vw
        row = h - (y0 * h + (ndc[:, 1] + 1) / 2 * vh)
        return np.column_stack([col, row])

    def close(self):
        try:
            self.pl.close()
        except Exception:  # noqa: BLE001 - closing must not hide the real error
            pass


def _rod(a, b, r):
    m = T.segment(a, b, axis=2)
    m[:3, 0] *= r
    m[:3, 1] *= r
    return m


def _yaw_only(rot):
    x = rot[:, 0].copy()
    x[2] = 0.0
    n = np.linalg.norm(x)
    phi = math.atan2(x[1], x[0]) if n > 1e-9 else 0.0
    return T.rot_z(phi)[:3, :3]


def _darker(hex_colour: str, f: float = 0.6) -> str:
    r, g, b = _rgb(hex_colour)
    return "#%02x%02x%02x" % (int(r * f * 255), int(g * f * 255), int(b * f * 255))
