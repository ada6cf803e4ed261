// The day plan's time axis: what span to draw and where the ticks go.
// Pure, unit-tested under Node. However far a window reaches (an open or
// huge bound), the span follows the plan's own times and the tick count
// stays small, so drawing never runs away.

import { isOpen } from "./fmt.mjs";

export const MAX_TICKS = 12;

export function planRows(p) {
  const rows = p.schedule.map((v, k) => ({ v: v, order: k, ret: false }));
  if (p.return) rows.push({ v: p.return, order: rows.length, ret: true });
  return rows;
}

// axisSpan gives [t0, t1]: from the route's start to its last time, with
// window ends inside half the plan's length again shown whole.
export function axisSpan(rows) {
  let t0 = Infinity, t1 = -Infinity;
  for (const r of rows) {
    const v = r.v;
    for (const t of [v.arrival, v.start, v.departure]) {
      if (typeof t === "number" && Number.isFinite(t) && !isOpen(t)) {
        t0 = Math.min(t0, t);
        t1 = Math.max(t1, t);
      }
    }
  }
  if (!(t1 >= t0)) return [0, 1];
  t0 = Math.max(t0, rows[0].v.start);
  const reach = t1 + Math.max(1, (t1 - t0) * 0.5);
  for (const r of rows) {
    const l = r.v.latest;
    if (!isOpen(l) && l > t1 && l <= reach) t1 = l;
  }
  if (!(t1 > t0)) t1 = t0 + 1;
  return [t0, t1];
}

function niceStep(span, target) {
  const raw = span / Math.max(1, target);
  const pow = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * pow >= raw) return m * pow;
  return 10 * pow;
}

const CLOCK_STEPS = [5, 10, 15, 20, 30, 60, 120, 180, 240, 360, 720, 1440];

// ticks gives the tick positions in [t0, t1]: clock-friendly steps for
// clock data, 1-2-5 steps otherwise; never more than MAX_TICKS.
export function ticks(t0, t1, clockAxis, target) {
  const span = t1 - t0;
  if (!(span > 0) || !Number.isFinite(span)) return [];
  target = target || 8;
  let step = clockAxis ? CLOCK_STEPS.find((m) => span / m <= target) : 0;
  if (!step) step = niceStep(span, Math.min(target, MAX_TICKS - 1));
  while (span / step > MAX_TICKS - 1) step *= 2;
  const out = [];
  for (let t = Math.ceil(t0 / step) * step; t <= t1 + 1e-9 && out.length < MAX_TICKS; t += step) out.push(t);
  return out;
}

// density says how tall the rows are: full rows with names up to 60
// visits, thin rows above, thinner still past 150 (names on hover/focus).
export function density(n) {
  if (n > 150) return "dense";
  if (n > 60) return "thin";
  return "full";
}
