// The run's embedded time series: values at any time by linear interpolation.

export class Series {
  constructor(columns) {
    this.columns = columns;
    this.t = columns.t_s;
  }

  has(name) {
    return Array.isArray(this.columns[name]);
  }

  // Value of a column at time t [s], held at the ends.
  at(name, t) {
    const y = this.columns[name];
    const ts = this.t;
    if (!y || ts.length === 0) return null;
    if (t <= ts[0]) return y[0];
    const last = ts.length - 1;
    if (t >= ts[last]) return y[last];
    let lo = 0;
    let hi = last;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (ts[mid] <= t) lo = mid; else hi = mid;
    }
    const a = y[lo];
    const b = y[hi];
    if (a === null || b === null) return a === null ? b : a;
    const w = (t - ts[lo]) / (ts[hi] - ts[lo]);
    return a + (b - a) * w;
  }
}
