// The swing-angle plot: rope angle from the vertical over the lift, event marks and a moving cursor.

export const EVENT_COLOURS = { move_start: "crane", move_end: "crane_dark", peak: "warn", settled: "sling", stopped: "warn" };

export class SwingPlot {
  constructor(canvas, series, events, range, colours, settleDeg) {
    this.canvas = canvas;
    this.series = series;
    this.events = events;
    this.range = range;
    this.colours = colours;
    this.settleDeg = settleDeg;
    this.background = null;
    this.pad = { left: 30, right: 8, top: 8, bottom: 18 };
  }

  colour(kind) {
    const name = EVENT_COLOURS[kind] || "crane";
    return this.colours[name] || "#3f5d7d";
  }

  // Sizes the canvas to its box and draws the still part once.
  layout() {
    const ratio = window.devicePixelRatio || 1;
    const w = Math.max(50, this.canvas.clientWidth);
    const h = Math.max(40, this.canvas.clientHeight);
    this.canvas.width = Math.round(w * ratio);
    this.canvas.height = Math.round(h * ratio);
    this.ratio = ratio;
    this.w = w;
    this.h = h;
    const y = this.series.columns.rope_angle_deg || [];
    const [t0, t1] = this.range;
    let peak = 0;
    for (let i = 0; i < y.length; i++) {
      const t = this.series.t[i];
      if (t >= t0 && t <= t1 && y[i] !== null && y[i] > peak) peak = y[i];
    }
    this.yMax = niceCeil(Math.max(peak * 1.1, this.settleDeg * 2, 0.5));
    const off = document.createElement("canvas");
    off.width = this.canvas.width;
    off.height = this.canvas.height;
    const g = off.getContext("2d");
    g.scale(ratio, ratio);
    this.drawStill(g, y);
    this.background = off;
  }

  x(t) {
    const [t0, t1] = this.range;
    return this.pad.left + (t - t0) / Math.max(t1 - t0, 1e-9) * (this.w - this.pad.left - this.pad.right);
  }

  y(v) {
    return this.h - this.pad.bottom - v / this.yMax * (this.h - this.pad.top - this.pad.bottom);
  }

  drawStill(g, y) {
    const { left, top, bottom, right } = this.pad;
    g.fillStyle = "#ffffff";
    g.fillRect(0, 0, this.w, this.h);
    g.font = "10px system-ui, sans-serif";
    g.fillStyle = "#4a5560";
    g.strokeStyle = "#e3e8ec";
    g.lineWidth = 1;
    g.textAlign = "right";
    g.textBaseline = "middle";
    for (const v of [0, this.yMax / 2, this.yMax]) {
      const yy = Math.round(this.y(v)) + 0.5;
      g.beginPath();
      g.moveTo(left, yy);
      g.lineTo(this.w - right, yy);
      g.stroke();
      g.fillText(formatTick(v), left - 4, yy);
    }
    g.textAlign = "center";
    g.textBaseline = "top";
    const [t0, t1] = this.range;
    for (const t of [t0, (t0 + t1) / 2, t1]) g.fillText(`${formatTick(t)} s`, Math.min(Math.max(this.x(t), left + 10), this.w - 16), this.h - bottom + 4);
    if (this.settleDeg > 0 && this.settleDeg < this.yMax) {
      g.setLineDash([4, 3]);
      g.strokeStyle = this.colours.sling || "#2e7d32";
      const yy = this.y(this.settleDeg);
      g.beginPath();
      g.moveTo(left, yy);
      g.lineTo(this.w - right, yy);
      g.stroke();
      g.setLineDash([]);
    }
    for (const e of this.events) {
      if (e.t_s < t0 || e.t_s > t1) continue;
      g.strokeStyle = this.colour(e.kind);
      g.globalAlpha = 0.55;
      const xx = Math.round(this.x(e.t_s)) + 0.5;
      g.beginPath();
      g.moveTo(xx, top);
      g.lineTo(xx, this.h - bottom);
      g.stroke();
      g.globalAlpha = 1;
    }
    g.strokeStyle = this.colours.crane || "#3f5d7d";
    g.lineWidth = 1.5;
    g.beginPath();
    let started = false;
    for (let i = 0; i < y.length; i++) {
      const t = this.series.t[i];
      if (t < t0 || t > t1 || y[i] === null) continue;
      const px = this.x(t);
      const py = this.y(y[i]);
      if (started) g.lineTo(px, py); else g.moveTo(px, py);
      started = true;
    }
    g.stroke();
  }

  // Redraws the plot with the cursor at time t [s].
  draw(t) {
    if (!this.background) this.layout();
    const g = this.canvas.getContext("2d");
    g.setTransform(1, 0, 0, 1, 0, 0);
    g.drawImage(this.background, 0, 0);
    g.scale(this.ratio, this.ratio);
    const xx = this.x(t);
    g.strokeStyle = this.colours.load || "#f26b1d";
    g.lineWidth = 1.5;
    g.beginPath();
    g.moveTo(xx, this.pad.top);
    g.lineTo(xx, this.h - this.pad.bottom);
    g.stroke();
    const v = this.series.at("rope_angle_deg", t);
    if (v !== null) {
      g.fillStyle = this.colours.load || "#f26b1d";
      g.beginPath();
      g.arc(xx, this.y(Math.min(v, this.yMax)), 3, 0, 2 * Math.PI);
      g.fill();
    }
  }

  // Time [s] at a horizontal position in the canvas [CSS px].
  timeAt(px) {
    const [t0, t1] = this.range;
    const share = (px - this.pad.left) / (this.w - this.pad.left - this.pad.right);
    return Math.min(t1, Math.max(t0, t0 + share * (t1 - t0)));
  }
}

function niceCeil(v) {
  const p = 10 ** Math.floor(Math.log10(v));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= v) return m * p;
  return 10 * p;
}

function formatTick(v) {
  return Math.abs(v - Math.round(v)) < 1e-6 ? String(Math.round(v)) : v.toFixed(1);
}
