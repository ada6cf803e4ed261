// Numbers and times as people read them. Pure functions: no DOM, no state;
// unit-tested under Node (web/jstest/fmt.test.mjs).

// OPEN_AT: a window end at or past this many input units has no bound. The
// engine writes an absent bound as JSON null; older builds wrote a large
// number (about 1.9e11 minutes for an empty closing time), so anything this
// large (about 19,000 years in minutes) is read as "open" too.
export const OPEN_AT = 1e10;

export function isOpen(v) {
  return v === null || v === undefined || typeof v !== "number" || Number.isNaN(v) || v >= OPEN_AT;
}

export function plural(n, one, many) {
  return n.toLocaleString() + " " + (n === 1 ? one : many);
}

function pad(n) {
  return n < 10 ? "0" + n : String(n);
}

// timeModel says how a plan's numbers read: minutes from a clock origin
// (sites files with clock times or dates) or plain units of the file.
export function timeModel(summary) {
  const s = summary || {};
  const clock = s.times === "clock" || s.times === "dated";
  let origin = null; // UTC milliseconds of minute 0 when the file gives a date
  if (s.times === "dated" && typeof s.time_origin === "string") {
    const m = s.time_origin.match(/^(\d{4})-(\d{2})-(\d{2})/);
    if (m) origin = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  }
  return { clock: clock, dated: origin !== null, origin: origin, minutes: s.unit === "min" };
}

// unitName is the unit of durations: minutes, or the file's own units.
export function unitName(model) {
  return model.minutes ? "min" : "units";
}

// duration writes a length of time: whole minutes below an hour, H:MM
// above, for minute data; a plain number in the file's units otherwise.
// how is "round" (waits), "floor" (slack: never claim more than there is)
// or "ceil" (lateness: never claim less).
export function duration(v, model, how) {
  if (isOpen(v)) return "open";
  const r = how === "floor" ? Math.floor : how === "ceil" ? Math.ceil : Math.round;
  if (!model.minutes) {
    const x = Math.round(v * 10) / 10;
    return numberFormat(undefined, false).format(x) + " units";
  }
  // A hair of float noise must not turn 12 into 11 or 13.
  const m = r(Math.round(v * 1000) / 1000);
  if (Math.abs(m) < 60) return m + " min";
  const sign = m < 0 ? "-" : "";
  const a = Math.abs(m);
  return sign + Math.floor(a / 60) + ":" + pad(a % 60) + " h";
}

// longDuration writes a total such as the day's travel: "3 h 42 min".
export function longDuration(v, model) {
  if (isOpen(v)) return "open";
  if (!model.minutes) return duration(v, model);
  const m = Math.round(v);
  if (m < 60) return m + " min";
  return Math.floor(m / 60) + " h " + pad(m % 60) + " min";
}

// clockParts splits minutes from the origin into a day offset and the
// time of day in seconds.
function clockParts(v) {
  const total = Math.round(v * 60);
  const day = Math.floor(total / 86400);
  return { day: day, sec: total - day * 86400 };
}

// clockFormat keeps one formatter per locale and precision: making one
// per call costs about a millisecond, too much for 500 visits.
const formats = new Map();
function clockFormat(locale, seconds) {
  const key = (locale || "") + (seconds ? "/s" : "");
  let f = formats.get(key);
  if (!f) {
    const o = { hour: "2-digit", minute: "2-digit", timeZone: "UTC" };
    if (seconds) o.second = "2-digit";
    f = new Intl.DateTimeFormat(locale, o);
    formats.set(key, f);
  }
  return f;
}

// numberFormat keeps one number formatter per locale, as clockFormat:
// toLocaleString with options makes a formatter per call, which took most
// of the drawing time of a 3,000-visit plan. plain: no grouping, at most
// two decimals (times in the file's units); else the locale's default.
const numbers = new Map();
function numberFormat(locale, plain) {
  const key = (locale || "") + (plain ? "/plain" : "");
  let f = numbers.get(key);
  if (!f) {
    f = new Intl.NumberFormat(locale, plain ? { useGrouping: false, maximumFractionDigits: 2 } : undefined);
    numbers.set(key, f);
  }
  return f;
}

// clock writes a time of day in the browser's locale (locale undefined:
// the browser's), with "+1 d" for later days than the first. Plain-unit
// data gives the number.
export function clock(v, model, opts) {
  opts = opts || {};
  if (isOpen(v)) return "open";
  if (!model.clock) {
    const x = Math.round(v * 100) / 100;
    return numberFormat(opts.locale, true).format(x);
  }
  const { day, sec } = clockParts(opts.seconds ? v : Math.round(v));
  let t = clockFormat(opts.locale, !!opts.seconds).format(Date.UTC(2000, 0, 1) + sec * 1000);
  if (day) t += " +" + day + " d";
  return t;
}

// dayHeading names the plan's first day in the browser's locale, for
// dated files; empty otherwise.
export function dayHeading(model, opts) {
  if (!model.dated) return "";
  return new Date(model.origin).toLocaleDateString((opts || {}).locale, { weekday: "long", year: "numeric", month: "long", day: "numeric", timeZone: "UTC" });
}

// boundWords puts how good a plan is in plain words. The exact figures
// stay in the plan's JSON and the details view.
export const USEFUL_GAP_PCT = 5;
export function boundWords(p) {
  if (!p) return "";
  if (p.proven_optimal) return "proven best";
  const gap = p.gap_bound_pct;
  if (typeof gap === "number" && Number.isFinite(gap) && gap < USEFUL_GAP_PCT) {
    const g = gap < 0.1 ? "0.1" : (Math.ceil(gap * 10) / 10).toLocaleString();
    return "within " + g + " % of the best possible";
  }
  if (typeof p.lower_bound === "number") return "no proof of quality yet for a day this size";
  return "no proof of quality worked out";
}

// boundDetails gives the exact figures behind boundWords.
export function boundDetails(p, model) {
  if (!p) return "";
  const parts = [];
  if (typeof p.lower_bound === "number") parts.push("no plan can cost less than " + (Math.round(p.lower_bound * 100) / 100).toLocaleString() + " " + unitName(model));
  if (typeof p.gap_bound_pct === "number") parts.push("this plan is at most " + (Math.round(p.gap_bound_pct * 100) / 100).toLocaleString() + " % above that");
  if (p.proven_optimal) parts.push("the exact search proved that no better plan exists");
  return parts.length ? parts.join("; ") + "." : "No lower bound was worked out for this plan.";
}

// costWords writes a plan's cost as what it is: the travel time, or for
// the completion objective the time the route ends.
export function costWords(p, model) {
  if (p.objective === "completion") return "ends at " + clock(p.cost, model);
  return longDuration(p.cost, model) + " travel";
}
