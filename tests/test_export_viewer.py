"""viewer.html: self-contained, fresh against its sources, and showing the lift where the simulation puts it.

Outside references: the bundle's digest is recomputed with :mod:`hashlib` (SHA-256, FIPS 180-4);
the page is opened by headless Chromium (Debian ``chromium``) driven through the Chrome DevTools
Protocol (``--remote-debugging-pipe``); the camera projection is the OpenGL convention
(clip = P @ V @ world, NDC = clip / w; see the OpenGL 4.6 core specification, section 13.8 "Coordinate
Transformations"), recomputed here with numpy from the page's own matrices; glTF's axes (+Y up,
right-handed) from the glTF 2.0 specification, section 3.4.
"""

from __future__ import annotations

import base64
import hashlib
import html
import io
import json
import os
import re
import shutil
import subprocess
import tempfile
import time
from pathlib import Path

import numpy as np
import pytest

from conftest import make_scene
from swingsim.export import viewer
from swingsim.export.write import write_export
from swingsim.metrics.cautions import CAUTION
from swingsim.metrics.single import summarize
from swingsim.render import facts
from swingsim.report.tables import timeseries_columns
from swingsim.simulation import simulate

VIEWER_DIR = Path(viewer.__file__).resolve().parent / "viewer"
MOVE = {"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 8.0, "speed_m_s": 1.5,
        "accel_m_s2": 0.6, "label": "travel east"}
TRICKY_TITLE = 'Yard trial <script>alert("x")</script> & </title> "quoted"'


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    """A short invented lift exported at 30 keys a second: (traj, summary, out folder, html text)."""
    scene = make_scene(moves=[MOVE], duration_s=14.0, title=TRICKY_TITLE)
    traj = simulate(scene)
    summary = summarize(traj)
    out = tmp_path_factory.mktemp("viewer")
    write_export(traj, summary, out, fps=30.0)
    return traj, summary, out, (out / "viewer.html").read_text(encoding="utf-8")


def _page_data(page: str) -> dict:
    m = re.search(r'<script type="application/json" id="swingsim-data">(.*?)</script>', page, re.S)
    assert m, "the page embeds its data"
    return json.loads(m.group(1))


def _to_gltf(p):
    p = np.asarray(p, dtype=float)
    return np.stack([p[..., 0], p[..., 2], -p[..., 1]], axis=-1)


# ---------------------------------------------------------------------------- the bundle

def _sources_digest() -> str:
    # The rule of build.mjs: build.mjs, package.json, package-lock.json and src/**, by relative POSIX
    # path in code-point order; each adds its path, NUL, its bytes, NUL (SHA-256, FIPS 180-4 via hashlib).
    files = ["build.mjs", "package.json", "package-lock.json"]
    files += [p.relative_to(VIEWER_DIR).as_posix() for p in (VIEWER_DIR / "src").rglob("*") if p.is_file()]
    digest = hashlib.sha256()
    for rel in sorted(files):
        digest.update(rel.encode() + b"\0")
        digest.update((VIEWER_DIR / rel).read_bytes())
        digest.update(b"\0")
    return digest.hexdigest()


def test_bundle_is_fresh_against_its_sources():
    first = viewer.bundle_text().split("\n", 1)[0]
    m = re.fullmatch(r"/\* swingsim viewer bundle; sources-sha256: ([0-9a-f]{64}) \*/", first)
    assert m, f"the bundle's first line names its sources' digest: {first[:120]!r}"
    assert m.group(1) == _sources_digest(), "dist/viewer.bundle.js is stale: run `npm run build` in swingsim/export/viewer"


def test_three_licence_is_shipped_and_packaged():
    licence = (VIEWER_DIR / "LICENSE-three.txt").read_text(encoding="utf-8")
    assert "MIT" in licence or "Permission is hereby granted" in licence
    assert "three.js authors" in licence.lower()
    lock = json.loads((VIEWER_DIR / "package-lock.json").read_text(encoding="utf-8"))
    assert lock["packages"]["node_modules/three"]["license"] == "MIT"
    pyproject = (Path(__file__).resolve().parent.parent / "pyproject.toml").read_text(encoding="utf-8")
    for name in ("export/viewer/dist/viewer.bundle.js", "export/viewer/LICENSE-three.txt"):
        assert name in pyproject, f"{name} is package data"


def test_node_modules_is_not_committed():
    ignore = (Path(__file__).resolve().parent.parent / ".gitignore").read_text(encoding="utf-8").split()
    assert "node_modules/" in ignore


# ---------------------------------------------------------------------------- the page's text

def test_page_is_self_contained_and_embeds_the_glb(exported):
    traj, summary, out, page = exported
    assert not re.search(r"<(script|img|iframe|link)\b[^>]*\b(src|href)\s*=", page, re.I), "nothing is fetched"
    assert "@import" not in page
    m = re.search(r'<script type="application/octet-stream" id="swingsim-glb">([A-Za-z0-9+/=]*)</script>', page)
    assert m, "the glb is embedded as base64"
    assert base64.b64decode(m.group(1)) == (out / "lift.glb").read_bytes()
    assert page.count("</script>") == 3, "no stray </script> inside the inlined script or data"


def test_user_text_is_escaped_and_caution_shown(exported):
    traj, summary, out, page = exported
    assert "<script>alert" not in page
    assert f"<title>{html.escape(TRICKY_TITLE)} - swingsim 3D viewer</title>" in page
    assert html.escape(CAUTION) in page
    data = _page_data(page)
    assert data["title"] == TRICKY_TITLE and data["caution"] == CAUTION


def test_page_series_and_events_follow_the_run(exported):
    traj, summary, out, page = exported
    data = _page_data(page)
    t = np.asarray(data["series"]["t_s"])
    assert t[0] == 0.0 and abs(t[-1] - traj.t_end_s) < 1e-9 and np.all(np.diff(t) > 0)
    cols = timeseries_columns(traj, t)  # the columns of timeseries.csv at the same times
    for name, decimals in viewer.SERIES_COLUMNS.items():
        np.testing.assert_allclose(data["series"][name], cols[name], atol=0.51 * 10.0 ** -decimals, err_msg=name)
    expected = facts.collect(traj, summary).events
    assert [(e["kind"], e["label"]) for e in data["events"]] == [(e.kind, e.label) for e in expected]
    np.testing.assert_allclose([e["t_s"] for e in data["events"]], [e.t_s for e in expected], atol=5e-4)
    assert {f["key"]: f["value"] for f in data["facts"]}["peak_rope_angle_deg"] == pytest.approx(
        summary["peak_rope_angle_deg"], abs=0.051)


def test_axis_change_is_a_proper_rotation_to_y_up():
    # glTF 2.0 spec 3.4: +Y up, right-handed. The map is a rotation (det +1) taking +Z (up) to +Y.
    m = viewer.scene_to_gltf_axes(np.eye(3))
    np.testing.assert_allclose(m @ m.T, np.eye(3), atol=1e-15)
    assert np.linalg.det(m) == pytest.approx(1.0)
    np.testing.assert_allclose(viewer.scene_to_gltf_axes([0.0, 0.0, 1.0]), [0.0, 1.0, 0.0])
    np.testing.assert_allclose(viewer.scene_to_gltf_axes([1.0, 2.0, 3.0]), [1.0, 3.0, -2.0])


def test_named_views_are_the_video_presets_in_gltf_axes(exported):
    from swingsim.render import views
    from swingsim.scene3d import build

    traj, summary, out, page = exported
    data = _page_data(page)
    assert set(data["views"]) == set(views.PRESETS)
    cam = views.fit("plan", build(traj).interest_points(), viewer.FIT_ASPECT)
    np.testing.assert_allclose(data["views"]["plan"]["target"], _to_gltf(cam.focus), atol=1e-3)
    np.testing.assert_allclose(data["views"]["plan"]["position"], _to_gltf(cam.position), atol=1e-3)
    assert data["views"]["plan"]["ortho_half_height_m"] == pytest.approx(cam.parallel_scale, abs=1e-3)
    assert data["views"]["side"]["ortho_half_height_m"] is None


# ---------------------------------------------------------------------------- headless Chromium

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
SIZE = (1280, 720)


class Browser:
    """Headless Chromium driven through the DevTools Protocol over a pipe, the network blocked."""

    def __init__(self):
        self.profile = tempfile.mkdtemp(prefix="swingsim-chromium-")
        to_browser_r, self._to_browser = os.pipe()
        self._from_browser, from_browser_w = os.pipe()

        def wire():  # the pipe protocol: the browser reads fd 3 and writes fd 4 (kept open by pass_fds)
            os.dup2(to_browser_r, 3)
            os.dup2(from_browser_w, 4)

        self.proc = subprocess.Popen(
            [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
             "--disable-background-networking", "--disable-component-update", "--disable-sync",
             "--enable-unsafe-swiftshader", "--use-angle=swiftshader", "--hide-scrollbars",
             f"--user-data-dir={self.profile}", '--host-resolver-rules=MAP * ~NOTFOUND',
             "--remote-debugging-pipe", "about:blank"],
            preexec_fn=wire, pass_fds=(3, 4),
            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        os.close(to_browser_r)
        os.close(from_browser_w)
        self._buffer = b""
        self._next_id = 0
        self.events = []
        target = self.call("Target.createTarget", url="about:blank")["targetId"]
        self.session = self.call("Target.attachToTarget", targetId=target, flatten=True)["sessionId"]
        for method in ("Page.enable", "Runtime.enable", "Log.enable"):
            self.call(method, session=True)
        self.call("Emulation.setDeviceMetricsOverride", session=True, width=SIZE[0], height=SIZE[1],
                  deviceScaleFactor=1, mobile=False)

    def _read_message(self, deadline):
        while b"\0" not in self._buffer:
            if time.monotonic() > deadline:
                raise TimeoutError("no answer from chromium")
            chunk = os.read(self._from_browser, 1 << 20)
            if not chunk:
                raise RuntimeError("chromium closed the pipe")
            self._buffer += chunk
        raw, self._buffer = self._buffer.split(b"\0", 1)
        return json.loads(raw)

    def call(self, method, session=False, timeout=60.0, **params):
        self._next_id += 1
        message = {"id": self._next_id, "method": method, "params": params}
        if session:
            message["sessionId"] = self.session
        os.write(self._to_browser, json.dumps(message).encode() + b"\0")
        deadline = time.monotonic() + timeout
        while True:
            reply = self._read_message(deadline)
            if reply.get("id") == self._next_id:
                if "error" in reply:
                    raise RuntimeError(f"{method}: {reply['error']}")
                return reply.get("result", {})
            self.events.append(reply)

    def console_errors(self) -> list:
        out = []
        for e in self.events:
            p = e.get("params", {})
            if e.get("method") == "Runtime.exceptionThrown":
                out.append(p["exceptionDetails"].get("text", "") + str(p["exceptionDetails"].get("exception", "")))
            elif e.get("method") == "Runtime.consoleAPICalled" and p.get("type") in ("error", "assert"):
                out.append(str(p.get("args")))
            elif e.get("method") == "Log.entryAdded" and p["entry"].get("level") == "error":
                out.append(p["entry"].get("text", ""))
        return out

    def open(self, url: str, min_frames: int = 1, timeout: float = 90.0) -> dict:
        """Load a page fresh and wait until the viewer reports it has drawn; its status."""
        self.call("Page.navigate", session=True, url="about:blank")
        self.events.clear()
        self.call("Page.navigate", session=True, url=url)
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            got = self.call("Runtime.evaluate", session=True, returnByValue=True,
                            expression="(document.getElementById('swingsim-status')||{}).textContent||''")
            text = got.get("result", {}).get("value") or ""
            if text:
                status = json.loads(text)
                if status.get("state") == "error" or status.get("frames", 0) >= min_frames:
                    return status
            time.sleep(0.2)
        raise TimeoutError(f"the viewer did not draw within {timeout} s: {url}: {text[:300]}")

    def screenshot(self) -> np.ndarray:
        from PIL import Image

        png = base64.b64decode(self.call("Page.captureScreenshot", session=True, format="png")["data"])
        return np.asarray(Image.open(io.BytesIO(png)).convert("RGB"))

    def close(self):
        try:
            self.call("Browser.close", timeout=10)
        except (RuntimeError, TimeoutError, OSError):
            pass
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()
        for fd in (self._to_browser, self._from_browser):
            os.close(fd)
        shutil.rmtree(self.profile, ignore_errors=True)


@pytest.fixture(scope="module")
def browser():
    if CHROMIUM is None:
        if os.environ.get("CI"):
            pytest.fail("headless Chromium must run in CI (.ci/run installs the Debian package chromium)")
        pytest.skip("headless Chromium (Debian package chromium) is not installed")
    b = Browser()
    yield b
    b.close()


def _open(browser, out, fragment, save_as=None):
    status = browser.open((out / "viewer.html").resolve().as_uri() + "#" + fragment)
    assert status["state"] == "ready", status.get("errors")
    assert status["errors"] == []
    assert browser.console_errors() == []
    image = browser.screenshot()
    if save_as is not None:
        from PIL import Image

        Image.fromarray(image).save(out / save_as)
    return status, image


def _project(status, world) -> np.ndarray:
    # OpenGL convention: clip = P V x (column-major matrices, as three.js stores them); NDC = clip / w.
    proj = np.asarray(status["projection_matrix"], dtype=float).reshape(4, 4).T
    view = np.asarray(status["view_matrix"], dtype=float).reshape(4, 4).T
    clip = proj @ view @ np.append(world, 1.0)
    ndc = clip[:3] / clip[3]
    c = status["canvas"]
    return np.array([c["left"] + (ndc[0] + 1) / 2 * c["width"], c["top"] + (1 - ndc[1]) / 2 * c["height"]])


def test_viewer_draws_without_errors_and_the_canvas_is_not_blank(browser, exported):
    traj, summary, out, page = exported
    status, image = _open(browser, out, "t=0", "shot_t0.png")
    assert status["t"] == 0 and status["playing"] is False and status["view"] == "oblique"
    c = status["canvas"]
    stage = image[int(c["top"]):int(c["top"] + c["height"]), int(c["left"]):int(c["left"] + c["width"])]
    assert stage.shape[0] > 300 and stage.shape[1] > 600
    assert stage.reshape(-1, 3).std(axis=0).max() > 10.0, "the 3D stage is a flat colour"


def test_different_times_give_different_pictures(browser, exported):
    traj, summary, out, page = exported
    _, first = _open(browser, out, "t=0&view=side")
    status, later = _open(browser, out, "t=6&view=side", "shot_t6_side.png")
    assert status["t"] == pytest.approx(6.0) and status["view"] == "side"
    c = status["canvas"]
    rows, cols = slice(int(c["top"]), int(c["top"] + c["height"])), slice(int(c["left"]), int(c["left"] + c["width"]))
    changed = np.abs(first[rows, cols].astype(int) - later[rows, cols].astype(int)).max(axis=2) > 30
    assert changed.sum() > 200, "the lift did not move between t=0 and t=6"


@pytest.mark.parametrize("t_s,view", [(6.0, "side"), (9.0, "oblique"), (4.0, "plan")])
def test_load_drawn_where_the_simulation_puts_it(browser, exported, t_s, view):
    traj, summary, out, page = exported
    status, image = _open(browser, out, f"t={t_s}&view={view}", f"shot_load_{view}.png")
    assert status["view"] == view
    if view == "plan":
        assert status["projection_matrix"][15] == 1.0, "the plan view is orthographic"
    cols = timeseries_columns(traj, np.array([t_s]))
    load = _to_gltf([cols["load_x_m"][0], cols["load_y_m"][0], cols["load_z_m"][0]])
    # the page's load node sits at the simulated centre of gravity (glb keys at true time; 1 mm)
    np.testing.assert_allclose(status["load_world"], load, atol=1e-3)
    expected_px = _project(status, load)
    np.testing.assert_allclose(status["load_px"], expected_px, atol=1.0)
    if view == "plan":
        return  # seen from above, the trolley and hook hide the load: its colour is checked in the other views
    # ... and the picture has the load's orange there (palette "load" #f26b1d, shaded)
    x, y = np.round(expected_px).astype(int)
    patch = image[y - 2:y + 3, x - 2:x + 3].reshape(-1, 3).astype(int)
    orange = (patch[:, 0] > 140) & (patch[:, 0] - patch[:, 2] > 70) & (patch[:, 1] < patch[:, 0] - 25)
    assert orange.sum() >= 5, f"no load colour at {x},{y}: {patch.tolist()}"
