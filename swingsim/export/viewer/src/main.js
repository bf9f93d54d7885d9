// swingsim viewer: plays the exported lift (glTF inlined as base64) with its time series and events.
// URL fragment: #t=12.5 opens paused at 12.5 s; #view=plan picks a view; both: #t=12.5&view=plan.
import css from "./viewer.css";
import { EVENT_COLOURS, SwingPlot } from "./plot.js";
import { Series } from "./series.js";
import { Stage, VIEW_NAMES, parseGlb } from "./stage.js";
import * as status from "./status.js";
import { tagLineState, TAG_LINE_COLOUR } from "./tags.js";
import { SPEEDS, buildPage, formatTime } from "./ui.js";

function readFragment() {
  const out = {};
  const params = new URLSearchParams(window.location.hash.replace(/^#/, ""));
  const t = parseFloat(params.get("t"));
  if (Number.isFinite(t)) out.t = t;
  const view = (params.get("view") || "").toLowerCase();
  if (VIEW_NAMES.includes(view)) out.view = view;
  const speed = parseFloat(params.get("speed"));
  if (SPEEDS.includes(speed)) out.speed = speed;
  return out;
}

function format(value, digits, unit) {
  return value === null || value === undefined ? "-" : `${value.toFixed(digits)} ${unit}`;
}

async function start() {
  status.installErrorCapture();
  status.publish();
  const style = document.createElement("style");
  style.textContent = css;
  document.head.appendChild(style);

  const data = JSON.parse(document.getElementById("swingsim-data").textContent);
  const series = new Series(data.series);
  const colourOf = (kind) => data.colours[EVENT_COLOURS[kind]] || data.colours.crane;

  let gltf = null;
  try {
    gltf = await parseGlb(document.getElementById("swingsim-glb").textContent);
  } catch (err) {
    status.fail(`the embedded glTF could not be read: ${err && err.message ? err.message : err}`);
  }
  let stage = null;
  let range = [series.t[0], series.t[series.t.length - 1]];
  // the page is laid out first (the stage needs its box); the slider then takes the animation's range
  const ui = buildPage(data, range, colourOf);
  if (gltf) {
    try {
      stage = new Stage(ui.stage, gltf, data);
      range = stage.range;
      ui.slider.min = String(range[0]);
      ui.slider.max = String(range[1]);
    } catch (err) {
      stage = null;
      status.fail(`3D view unavailable (WebGL): ${err && err.message ? err.message : err}`);
    }
  }
  if (!stage) {
    const notice = document.createElement("div");
    notice.className = "notice";
    notice.textContent = "The 3D view could not start in this browser (it needs WebGL). The readouts and the plot still work; lift.glb opens in any glTF 2.0 viewer.";
    ui.stage.appendChild(notice);
  }
  const plot = new SwingPlot(ui.plot, series, data.events, range, data.colours, data.settle_deg);

  const state = { t: range[0], playing: true, speed: 1, view: "oblique", last: null, dirty: 0 };
  const redraw = () => { state.dirty += 1; };
  if (stage) for (const c of Object.values(stage.controls)) c.addEventListener("change", redraw);
  const clamp = (t) => Math.min(range[1], Math.max(range[0], t));

  function applyFragment(fragment) {
    if (fragment.t !== undefined) {
      state.t = clamp(fragment.t);
      state.playing = false;
    }
    if (fragment.speed !== undefined) {
      state.speed = fragment.speed;
      ui.speed.value = String(fragment.speed);
    }
    if (fragment.view !== undefined) setView(fragment.view);
  }

  function setView(name) {
    state.view = name;
    redraw();
    for (const [key, button] of Object.entries(ui.viewButtons)) button.classList.toggle("on", key === name);
    if (stage) {
      stage.setTime(state.t);
      stage.setView(name);
    }
  }

  function setPlaying(playing) {
    if (playing && state.t >= range[1]) state.t = range[0];
    state.playing = playing;
    state.last = null;
    redraw();
  }

  function seek(t) {
    state.t = clamp(t);
    setPlaying(false);
  }

  let eventIndex = -2;
  function showReadouts(t) {
    ui.value.time.textContent = formatTime(t);
    ui.value.angle.textContent = format(series.at("rope_angle_deg", t), 2, "deg");
    ui.value.hookload.textContent = format(series.at("rope_tension_kN", t), 1, "kN");
    ui.value.speed.textContent = format(series.at("load_speed_m_s", t), 2, "m/s");
    const pulls = [];
    (data.tag_lines || []).forEach((line, j) => {
      const pull = series.at(line.column, t);
      const state = tagLineState(pull, line.max_pull_N, data.tag_near_share);
      pulls.push({ pull, state });
      const dd = ui.value.tag[j];
      dd.textContent = pull === null ? "-" : state === "slack" ? "slack" : `${pull.toFixed(0)} N${state === "over" ? " over limit" : ""}`;
      dd.style.color = state === "near" || state === "over" ? data.colours[TAG_LINE_COLOUR[state]] : "";
    });
    if (stage) stage.colourTagLines(pulls.map((p) => data.colours[TAG_LINE_COLOUR[p.state]]));
    if (ui.value.ground) {
      const kN = series.at("ground_reaction_kN", t);
      ui.value.ground.textContent = kN === null ? "-" : `${(kN / 9.80665).toFixed(2)} t`;
    }
    ui.clock.textContent = `${t.toFixed(2)} / ${range[1].toFixed(1)} s`;
    if (document.activeElement !== ui.slider) ui.slider.value = String(t);
    ui.play.textContent = state.playing ? "Pause" : "Play";
    let index = -1;
    for (let i = 0; i < ui.eventItems.length; i++) {
      ui.eventItems[i].item.classList.toggle("past", ui.eventItems[i].t <= t + 1e-9);
      if (ui.eventItems[i].t <= t + 1e-9) index = i;
    }
    if (index !== eventIndex) {
      eventIndex = index;
      ui.eventNow.textContent = index >= 0 ? `Last event: ${data.events[index].label} (${formatTime(data.events[index].t_s)})` : "Before the first move";
    }
  }

  ui.play.addEventListener("click", () => setPlaying(!state.playing));
  ui.slider.addEventListener("input", () => seek(parseFloat(ui.slider.value)));
  ui.speed.addEventListener("change", () => { state.speed = parseFloat(ui.speed.value); });
  for (const button of Object.values(ui.viewButtons)) button.addEventListener("click", () => setView(button.dataset.view));
  ui.events.addEventListener("click", (e) => {
    const item = e.target.closest("li");
    if (item) seek(parseFloat(item.dataset.t));
  });
  ui.plot.addEventListener("click", (e) => {
    const rect = ui.plot.getBoundingClientRect();
    seek(plot.timeAt(e.clientX - rect.left));
  });
  ui.link.addEventListener("click", () => {
    setPlaying(false);
    const hash = `#t=${state.t.toFixed(2)}&view=${state.view}`;
    history.replaceState(null, "", hash);
    ui.linkNote.textContent = "Link to this moment is in the address bar";
    if (navigator.clipboard && window.isSecureContext) {
      navigator.clipboard.writeText(window.location.href).then(
        () => { ui.linkNote.textContent = "Link copied"; }, () => {});
    }
  });
  window.addEventListener("hashchange", () => applyFragment(readFragment()));
  window.addEventListener("keydown", (e) => {
    if (e.target && (e.target.tagName === "INPUT" || e.target.tagName === "SELECT")) return;
    if (e.key === " ") { e.preventDefault(); setPlaying(!state.playing); }
    if (e.key === "ArrowRight") seek(state.t + 0.1);
    if (e.key === "ArrowLeft") seek(state.t - 0.1);
  });
  window.addEventListener("resize", () => {
    if (stage) stage.resize();
    plot.layout();
    redraw();
  });

  setView(state.view);
  applyFragment(readFragment());

  // Draws only when something changed: playing, a seek, a view, an orbit or a resize.
  let frames = 0;
  let drawn = null;
  function frame(now) {
    if (state.playing) {
      if (state.last !== null) state.t = clamp(state.t + (now - state.last) / 1000 * state.speed);
      state.last = now;
      if (state.t >= range[1]) state.playing = false;
    }
    const key = `${state.t}|${state.playing}|${state.view}|${state.dirty}`;
    if (key === drawn) {
      requestAnimationFrame(frame);
      return;
    }
    drawn = key;
    showReadouts(state.t);
    plot.draw(state.t);
    const report = { t: state.t, playing: state.playing, view: state.view, range,
      readouts: Object.fromEntries(Object.entries(ui.value).filter(([, v]) => v && v.textContent !== undefined).map(([k, v]) => [k, v.textContent])),
      tag_readouts: ui.value.tag.map((v) => v.textContent) };
    if (stage) {
      stage.setTime(state.t);
      stage.track();
      stage.render();
      Object.assign(report, stage.probe());
    }
    frames += 1;
    status.update(Object.assign(report, { frames, state: status.hasErrors() ? "error" : "ready" }));
    status.publish();
    requestAnimationFrame(frame);
  }
  requestAnimationFrame(frame);
}

start().catch((err) => status.fail(err && err.stack ? err.stack : String(err)));
