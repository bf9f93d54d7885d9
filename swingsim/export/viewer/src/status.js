// A hidden element holding the page's state as JSON, for automated checks
// (a headless browser reads it with --dump-dom), and the capture of errors.

const status = { state: "loading", errors: [], warnings: [], frames: 0 };
let element = null;

function record(list, text) {
  if (list.length < 20) list.push(String(text).slice(0, 500));
}

export function installErrorCapture() {
  window.addEventListener("error", (e) => {
    record(status.errors, e.message || (e.target && e.target.tagName ? `failed to load ${e.target.tagName}` : "error"));
    publish();
  }, true);
  window.addEventListener("unhandledrejection", (e) => {
    record(status.errors, e.reason && e.reason.message ? e.reason.message : String(e.reason));
    publish();
  });
  const original = console.error.bind(console);
  console.error = (...args) => {
    record(status.errors, args.map((a) => (a && a.message) || String(a)).join(" "));
    publish();
    original(...args);
  };
}

export function update(fields) {
  Object.assign(status, fields);
}

export function hasErrors() {
  return status.errors.length > 0;
}

export function fail(message) {
  record(status.errors, message);
  status.state = "error";
  publish();
}

export function publish() {
  if (!element) {
    element = document.createElement("pre");
    element.id = "swingsim-status";
    element.hidden = true;
    document.body.appendChild(element);
  }
  element.textContent = JSON.stringify(status);
}
