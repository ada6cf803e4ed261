// Data in: the route and travel options, the summary of what was read, and
// every warning and error with a place that selects the field it names.

import { $, el } from "./dom.mjs";
import { fieldRange } from "./textin.mjs";
import { clock, duration, plural, timeModel } from "./fmt.mjs";

export function readOptions() {
  const endWay = $("route-end").value;
  return {
    end: endWay === "site" ? $("end-site").value.trim() : endWay,
    start: $("start-site").value.trim(),
    shift_start: $("shift-start").value.trim(),
    matrix_unit: $("matrix-unit").value,
    speed: Number($("speed").value) || 0,
    road_factor: Number($("road-factor").value) || 0,
    done: $("done-visits").value.split(",").map((x) => x.trim()).filter((x) => x),
    now: $("now").value.trim(),
  };
}

export function applyOptions(o) {
  o = o || {};
  const end = o.end || "start";
  if (end === "start" || end === "free") {
    $("route-end").value = end;
    $("end-site").value = "";
  } else {
    $("route-end").value = "site";
    $("end-site").value = end;
  }
  $("start-site").value = o.start || "";
  $("shift-start").value = o.shift_start || "";
  $("matrix-unit").value = o.matrix_unit === "seconds" ? "seconds" : "minutes";
  $("speed").value = o.speed ? String(o.speed) : "";
  $("road-factor").value = o.road_factor ? String(o.road_factor) : "";
  $("done-visits").value = Array.isArray(o.done) ? o.done.join(", ") : o.done || "";
  $("now").value = o.now || "";
}

export function sameOptions(a, b) {
  return JSON.stringify(a || {}) === JSON.stringify(b || {});
}

function pct(v) {
  return Math.round(v * 1000) / 10 + " %";
}

export function showSummary(s, name) {
  const box = $("summary");
  box.textContent = "";
  const model = timeModel(s);
  box.appendChild(el("h3", "", s.name || name));
  const dl = el("dl");
  const shape = { closed: "back to the start", open: "ends at the last visit", "open-fixed-end": "ends at " + s.end };
  const dayText = (t, txt) => (model.clock ? clock(t, model) : txt || String(t));
  const rows = [
    ["Visits", String(s.sites)],
    ["Start", s.start + (s.at ? " (re-planned from " + s.at + " after " + plural(s.done.length, "visit", "visits") + " made)" : "")],
    ["Route", shape[s.shape] || s.shape],
    ["Day", dayText(s.day_start, s.day_start_text) + " to " + dayText(s.day_end, s.day_end_text) + (model.clock ? "" : " (units of the file)")],
    ["Windows", tightnessText(s, model)],
    ["Travel", (s.travel ? (s.travel === "benchmark" ? "from the matrix in the file" : "from " + s.travel) + "; " : "") + asymmetryText(s)],
  ];
  for (const [k, v] of rows) {
    const d = el("div");
    d.append(el("dt", "", k), el("dd", "", v));
    dl.appendChild(d);
  }
  box.appendChild(dl);
}

function tightnessText(s, model) {
  if (s.sites === 0) return "no visits";
  let t = "leave " + pct(s.tightness) + " of the day open on average";
  if (s.sites - s.open_windows > 0) t += " (narrowest " + duration(s.narrowest_window, model) + ", widest " + duration(s.widest_window, model) + ")";
  if (s.open_windows) t += "; " + plural(s.open_windows, "visit has", "visits have") + " no closing time";
  return t;
}

function asymmetryText(s) {
  if (!s.pairs) return "no travel";
  if (!s.asymmetric_pairs) return "every trip takes as long both ways";
  return s.asymmetric_pairs + " of " + s.pairs + " pairs differ by direction, by " + pct(s.asymmetry) + " on average";
}

// placeText names an error's place: line, column, field.
function placeText(e) {
  const where = [];
  if (e.line) where.push("line " + e.line);
  if (e.column) where.push("column " + e.column);
  const p = where.join(", ");
  return p.charAt(0).toUpperCase() + p.slice(1);
}

// boxFor is the text box an error's file was read from: the matrix box
// for the matrix file, the data box otherwise.
function boxFor(e, matrixName) {
  return e.file && matrixName && e.file === matrixName ? $("matrix-input") : $("paste-input");
}

export function selectPlace(box, line, column) {
  const [a, b] = fieldRange(box.value, line, column);
  if (box.id === "matrix-input") $("matrix-box").open = true;
  box.focus();
  box.setSelectionRange(a, b);
}

function problemList(list, matrixName) {
  const ul = el("ul");
  for (const e of list) {
    const li = el("li");
    const what = (e.field ? e.field + ": " : "") + e.message;
    if (e.line) {
      const b = el("button", "link", placeText(e));
      b.type = "button";
      b.title = "Select this field in the text box";
      b.addEventListener("click", () => selectPlace(boxFor(e, matrixName), e.line, e.column));
      li.append(b, document.createTextNode((e.file && e.file === matrixName ? " of " + e.file : "") + ": " + what));
    } else li.textContent = what;
    li.dataset.line = e.line || 0;
    li.dataset.column = e.column || 0;
    ul.appendChild(li);
  }
  return ul;
}

export function showWarnings(list, matrixName, notes) {
  const box = $("warnings");
  box.textContent = "";
  notes = notes || [];
  box.hidden = list.length + notes.length === 0;
  for (const n of notes) box.appendChild(el("p", "note", n));
  if (!list.length) return;
  box.appendChild(el("h3", "", list.length === 1 ? "One thing to check" : list.length + " things to check"));
  box.appendChild(problemList(list, matrixName));
  box.appendChild(el("p", "help", "The data was read; these look odd but are allowed."));
}

export function showErrors(list, matrixName) {
  const box = $("errors");
  box.textContent = "";
  box.hidden = false;
  box.appendChild(el("h3", "", list.length === 1 ? "The data has a problem" : "The data has " + list.length + " problems"));
  box.appendChild(problemList(list, matrixName));
  box.appendChild(el("p", "help", "Your text is kept as it was: fix it in the box and read it again."));
}

export function hideErrors() {
  const box = $("errors");
  box.hidden = true;
  box.textContent = "";
}
