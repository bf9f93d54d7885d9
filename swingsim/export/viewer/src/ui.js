// The page around the 3D stage: side panel (title, readouts, swing plot, events, facts) and control bar.
// User text (titles, labels) is only ever set as textContent.

export const SPEEDS = [0.25, 0.5, 1, 2, 4];
const VIEW_LABELS = { side: "Side", end: "End", plan: "Plan", oblique: "Oblique", follow: "Follow" };

function el(tag, attrs = {}, ...children) {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(attrs)) {
    if (key === "text") node.textContent = value;
    else if (key === "class") node.className = value;
    else node.setAttribute(key, value);
  }
  for (const child of children) node.appendChild(child);
  return node;
}

export function formatTime(t) {
  return `${t.toFixed(2)} s`;
}

export function buildPage(data, range, eventColour) {
  const stage = el("div", { id: "stage" });
  const side = el("aside", { id: "side" });
  side.appendChild(el("h1", { text: data.title }));

  const readouts = el("dl", { class: "readouts" });
  const value = {};
  for (const [key, label] of [["time", "Time"], ["angle", "Rope angle"], ["hookload", "Hook load"], ["speed", "Load speed"]]) {
    readouts.appendChild(el("dt", { text: label }));
    value[key] = el("dd", { text: "-" });
    readouts.appendChild(value[key]);
  }
  // a row per tag line (its pull, coloured by what one person can hold) and the load's weight on the ground
  value.tag = [];
  for (const line of data.tag_lines || []) {
    readouts.appendChild(el("dt", { text: `${line.name.charAt(0).toUpperCase()}${line.name.slice(1)} pull` }));
    const dd = el("dd", { text: "-", title: `what one person can hold: ${line.max_pull_N.toFixed(0)} N` });
    value.tag.push(dd);
    readouts.appendChild(dd);
  }
  if (data.ground) {
    readouts.appendChild(el("dt", { text: "On the ground" }));
    value.ground = el("dd", { text: "-" });
    readouts.appendChild(value.ground);
  }
  side.appendChild(readouts);
  const eventNow = el("div", { class: "event-now", "aria-live": "polite" });
  side.appendChild(eventNow);

  side.appendChild(el("h2", { text: "Rope angle from vertical [deg]" }));
  const plot = el("canvas", { class: "plot", title: "Click to go to a time" });
  side.appendChild(plot);

  if (data.facts.length) {
    side.appendChild(el("h2", { text: "Summary" }));
    const facts = el("dl", { class: "readouts" });
    for (const f of data.facts) {
      facts.appendChild(el("dt", { text: f.label }));
      facts.appendChild(el("dd", { text: `${f.value} ${f.unit}` }));
    }
    side.appendChild(facts);
  }
  side.appendChild(el("h2", { text: "Events" }));
  const events = el("ul", { class: "events" });
  const eventItems = [];
  for (const e of data.events) {
    const swatch = el("span", { class: "swatch" });
    swatch.style.background = eventColour(e.kind);
    const item = el("li", { title: "Go to this moment" }, swatch, el("span", { class: "when", text: formatTime(e.t_s) }),
      el("span", { text: e.label }));
    item.dataset.t = String(e.t_s);
    events.appendChild(item);
    eventItems.push({ item, t: e.t_s });
  }
  side.appendChild(events);

  side.appendChild(el("div", { class: "version", text: `swingsim ${data.version} - drag to orbit, right-drag to pan, wheel to zoom` }));

  const bar = el("div", { id: "bar" });
  const play = el("button", { class: "play", type: "button", text: "Play" });
  const clock = el("span", { class: "clock" });
  const timeline = el("div", { class: "timeline" });
  const slider = el("input", { type: "range", min: String(range[0]), max: String(range[1]), step: "any", value: String(range[0]), "aria-label": "Time" });
  timeline.appendChild(slider);
  const span = Math.max(range[1] - range[0], 1e-9);
  for (const e of data.events) {
    if (e.t_s < range[0] || e.t_s > range[1]) continue;
    const mark = el("span", { class: "mark", title: `${formatTime(e.t_s)}  ${e.label}` });
    mark.style.left = `calc(8px + (100% - 16px) * ${(e.t_s - range[0]) / span})`;
    mark.style.background = eventColour(e.kind);
    timeline.appendChild(mark);
  }
  const speed = el("select", { "aria-label": "Playback speed", title: "Playback speed" });
  for (const s of SPEEDS) {
    const option = el("option", { value: String(s), text: `${s}x` });
    if (s === 1) option.selected = true;
    speed.appendChild(option);
  }
  const views = el("div", { class: "views", role: "group", "aria-label": "Views" });
  const viewButtons = {};
  for (const name of Object.keys(VIEW_LABELS)) {
    viewButtons[name] = el("button", { type: "button", text: VIEW_LABELS[name], title: `${VIEW_LABELS[name]} view` });
    viewButtons[name].dataset.view = name;
    views.appendChild(viewButtons[name]);
  }
  const link = el("button", { type: "button", text: "Link", title: "Put a link to this moment and view in the address bar" });
  const linkNote = el("span", { class: "link-note" });
  for (const node of [play, clock, timeline, speed, views, link, linkNote]) bar.appendChild(node);

  const app = el("div", { id: "app" }, stage, side);
  document.body.appendChild(app);
  document.body.appendChild(bar);
  return { stage, plot, value, eventNow, eventItems, events, play, clock, slider, speed, viewButtons, link, linkNote };
}
