// The 3D stage: the lift's glTF with its animation, the lights, the named views and orbit controls.
import {
  AnimationMixer, Box3, Color, DirectionalLight, HemisphereLight, LoopOnce,
  OrthographicCamera, PerspectiveCamera, Scene, Vector3, WebGLRenderer,
} from "three";
import { OrbitControls } from "three/examples/jsm/controls/OrbitControls.js";
import { GLTFLoader } from "three/examples/jsm/loaders/GLTFLoader.js";

export const VIEW_NAMES = ["side", "end", "plan", "oblique", "follow"];

function decodeBase64(text) {
  const raw = atob(text.replace(/\s+/g, ""));
  const bytes = new Uint8Array(raw.length);
  for (let i = 0; i < raw.length; i++) bytes[i] = raw.charCodeAt(i);
  return bytes.buffer;
}

export function parseGlb(base64) {
  return new Promise((resolve, reject) => {
    new GLTFLoader().parse(decodeBase64(base64), "", resolve, reject);
  });
}

export class Stage {
  constructor(container, gltf, data) {
    this.container = container;
    this.data = data;
    this.renderer = new WebGLRenderer({ antialias: true, preserveDrawingBuffer: true });
    this.renderer.setPixelRatio(window.devicePixelRatio || 1);
    this.renderer.domElement.className = "view3d";
    this.renderer.domElement.tabIndex = 0;
    container.appendChild(this.renderer.domElement);

    this.scene = new Scene();
    this.scene.background = new Color(data.colours.sky);
    const hemi = new HemisphereLight(0xffffff, new Color(data.colours.grid_major), 2.2);
    this.scene.add(hemi);
    this.sun = new DirectionalLight(0xffffff, 2.0);
    this.scene.add(this.sun);
    this.scene.add(this.sun.target);

    this.root = gltf.scene;
    this.scene.add(this.root);
    this.clip = gltf.animations[0] || null;
    this.mixer = new AnimationMixer(this.root);
    if (this.clip) {
      this.action = this.mixer.clipAction(this.clip);
      this.action.setLoop(LoopOnce, 1);
      this.action.clampWhenFinished = true;
      this.action.play();
    }
    this.range = this.timeRange();
    this.node = (name) => this.root.getObjectByName(name) || null;
    this.load = this.node("load");
    this.trolley = this.node("trolley");
    // each tag line and its person get materials of their own, recoloured by the line's pull
    this.tagLines = (data.tag_lines || []).map((line) => {
      const meshes = [];
      for (const name of [line.node, line.person]) {
        const node = this.node(name);
        if (!node) continue;
        node.traverse((o) => {
          if (o.isMesh) {
            o.material = o.material.clone();
            meshes.push(o);
          }
        });
      }
      return { meshes, colour: null };
    });

    const box = new Box3().setFromObject(this.root);
    this.sceneRadius = box.isEmpty() ? 100 : box.getSize(new Vector3()).length() / 2;
    const centre = box.isEmpty() ? new Vector3() : box.getCenter(new Vector3());
    this.sun.position.copy(centre).add(new Vector3(0.5, 1.0, 0.35).multiplyScalar(this.sceneRadius * 2));
    this.sun.target.position.copy(centre);

    this.perspective = new PerspectiveCamera(30, 1, 0.1, 1000);
    this.ortho = new OrthographicCamera(-1, 1, 1, -1, 0.1, 1000);
    this.controls = {
      perspective: new OrbitControls(this.perspective, this.renderer.domElement),
      ortho: new OrbitControls(this.ortho, this.renderer.domElement),
    };
    for (const c of Object.values(this.controls)) {
      c.enableDamping = false;
      c.screenSpacePanning = true;
    }
    this.camera = this.perspective;
    this.view = "oblique";
    this.followFocus = null;
    this.resize();
  }

  timeRange() {
    if (!this.clip) {
      const ts = this.data.series.t_s;
      return [ts[0], ts[ts.length - 1]];
    }
    let t0 = Infinity;
    let t1 = -Infinity;
    for (const track of this.clip.tracks) {
      t0 = Math.min(t0, track.times[0]);
      t1 = Math.max(t1, track.times[track.times.length - 1]);
    }
    return [t0, t1];
  }

  size() {
    const w = Math.max(1, this.container.clientWidth);
    const h = Math.max(1, this.container.clientHeight);
    return [w, h];
  }

  resize() {
    const [w, h] = this.size();
    this.renderer.setSize(w, h, false);
    this.setView(this.view);
  }

  // Poses every node at time t [s] of the run.
  setTime(t) {
    if (!this.action) return;
    const duration = this.clip.duration;
    this.action.enabled = true;
    this.action.paused = false;
    this.action.time = Math.min(Math.max(t, 0), duration);
    this.mixer.update(0);
    this.root.updateMatrixWorld(true);
  }

  followTarget(out) {
    const spec = this.data.views.follow;
    const p = this.trolley ? this.trolley.getWorldPosition(new Vector3()) : new Vector3();
    const load = this.load ? this.load.getWorldPosition(new Vector3()) : p.clone();
    const share = spec.focus_load_share;
    out.set(
      (1 - share) * p.x + share * load.x,
      load.y + spec.focus_rise_share * (p.y - load.y),
      (1 - share) * p.z + share * load.z,
    );
    return out;
  }

  // Places the camera of a named view, fitted to the stage's current aspect.
  setView(name) {
    const spec = this.data.views[name] ? this.data.views[name] : this.data.views.oblique;
    this.view = this.data.views[name] ? name : "oblique";
    const [w, h] = this.size();
    const aspect = w / h;
    const widen = Math.max(1, this.data.fit_aspect / aspect);
    const target = new Vector3(...spec.target);
    const position = new Vector3(...spec.position);
    if (this.view === "follow") {
      const focus = this.followTarget(new Vector3());
      position.sub(target).add(focus);
      target.copy(focus);
      this.followFocus = focus.clone();
    } else {
      this.followFocus = null;
    }
    const offset = position.clone().sub(target);
    const distance = offset.length();
    let camera;
    if (spec.ortho_half_height_m) {
      camera = this.ortho;
      const half = spec.ortho_half_height_m * widen;
      camera.left = -half * aspect;
      camera.right = half * aspect;
      camera.top = half;
      camera.bottom = -half;
      camera.zoom = 1;
      camera.near = Math.max(0.01, distance - 4 * this.sceneRadius);
      camera.far = distance + 4 * this.sceneRadius;
    } else {
      camera = this.perspective;
      camera.fov = spec.fov_deg;
      camera.aspect = aspect;
      position.copy(target).addScaledVector(offset, widen);
      camera.near = Math.max(0.05, distance * widen / 500);
      camera.far = distance * widen + 6 * this.sceneRadius;
    }
    camera.position.copy(position);
    camera.up.set(...spec.up);
    camera.lookAt(target);
    camera.updateProjectionMatrix();
    camera.updateMatrixWorld(true);
    this.camera = camera;
    const active = camera === this.ortho ? "ortho" : "perspective";
    for (const [key, c] of Object.entries(this.controls)) {
      c.enabled = key === active;
    }
    const controls = this.controls[active];
    controls.target.copy(target);
    controls.update();
  }

  // Keeps the follow view on the load as it moves (the user's orbit is kept).
  track() {
    if (this.view !== "follow" || !this.followFocus) return;
    const focus = this.followTarget(new Vector3());
    const delta = focus.clone().sub(this.followFocus);
    this.camera.position.add(delta);
    const controls = this.controls.perspective;
    controls.target.add(delta);
    controls.update();
    this.followFocus = focus;
  }

  // Colours each tag line and its person (CSS colours, one per line; unchanged ones are left).
  colourTagLines(colours) {
    this.tagLines.forEach((line, j) => {
      const colour = colours[j];
      if (!colour || colour === line.colour) return;
      line.colour = colour;
      for (const mesh of line.meshes) mesh.material.color.set(colour); // a CSS colour: three converts sRGB to linear
    });
  }

  render() {
    this.renderer.render(this.scene, this.camera);
    this.camera.updateMatrixWorld(true);
  }

  // Where the load's centre of gravity appears [CSS px from the page's top left], and the camera's matrices.
  probe() {
    const rect = this.renderer.domElement.getBoundingClientRect();
    const out = {
      canvas: { left: rect.left, top: rect.top, width: rect.width, height: rect.height },
      projection_matrix: Array.from(this.camera.projectionMatrix.elements),
      view_matrix: Array.from(this.camera.matrixWorldInverse.elements),
    };
    out.tag_colours = this.tagLines.map((line) => line.colour);
    if (this.load) {
      const p = this.load.getWorldPosition(new Vector3());
      out.load_world = [p.x, p.y, p.z];
      const ndc = p.clone().project(this.camera);
      out.load_px = [rect.left + (ndc.x + 1) / 2 * rect.width, rect.top + (1 - ndc.y) / 2 * rect.height];
    }
    return out;
  }
}

