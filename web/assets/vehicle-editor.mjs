// The vehicles table's own small editor, under "Several vehicles": a
// count, a line that sets the shift and the capacity of every vehicle,
// and a card per vehicle (id, name, capacity; shift, start site, end,
// longest day). The vehicles text box is the one source: every edit here
// rewrites it at once (so it is kept, shared and read with the sites as
// typed), and typing in the box redraws the cards. A table that is not
// loaded is made for the count, as `--fleet N` makes its vehicles: ids 1
// to N from the start site, ending as the route settings say (a file in
// Solomon's format has vehicles of its own: there the count is sent as
// such and keeps the file's first N). Problems are
// listed under the cards, each naming the vehicle and the field; the
// engine's reader checks the rest (site ids) when the day is read.

import { $, el } from "./dom.mjs";
import { parseTable, rows, writeTable, setValue, newTable, resize, removeAt, check, checkCount, isSolomon, MAX_VEHICLES, LABELS } from "./vehicles.mjs";

const ed = {
  table: null, // parseTable of the box's text
  stash: [], // vehicles taken off by the count, last first
  summary: () => null, // the sites read last (time mode, day)
  changed: () => {},
  note: "",
};

// CARD: the fields of a card, line by line, with the width they take.
const CARD = [
  [["id", 1], ["name", 2], ["capacity", 1]],
  [["shift start", 1], ["shift end", 1], ["start", 1], ["end", 1], ["max duration", 1]],
];

// SHORT: a cell's label where the field's own name is too long for it.
const SHORT = { "max duration": "max day" };

const HINTS = { id: "T1", name: "Ines", capacity: "none", "shift start": "", "shift end": "", start: "", end: "back", "max duration": "none" };

function timeMode() {
  const s = ed.summary();
  return s && s.unit ? s.times || "" : "";
}

// routeEnd is where vehicles made for a count end, as the route settings
// say for `--fleet`: "" back at the start, "free", or a site id.
function routeEnd() {
  const w = $("route-end").value;
  if (w === "free") return "free";
  if (w === "site") return $("end-site").value.trim();
  return "";
}

// write puts the table's text in the box and tells the page.
function write() {
  const box = $("vehicles-input");
  box.value = writeTable(ed.table);
  ed.changed();
  showProblems();
}

// vehiclesText sets the box from outside (a file, a link, a kept
// session) and redraws the cards.
export function vehiclesText(text) {
  $("vehicles-input").value = text || "";
  ed.stash = [];
  ed.note = "";
  fromBox();
}

function fromBox() {
  ed.table = parseTable($("vehicles-input").value);
  const n = rows(ed.table).length;
  if (n) $("fleet-size").value = String(n);
  else if (ed.table) $("fleet-size").value = "";
  draw();
}

function draw() {
  const list = $("vehicle-cards");
  list.textContent = "";
  const rs = rows(ed.table);
  const mode = timeMode();
  const s = ed.summary();
  const hint = (f) => {
    if (f === "shift start" && s && s.day_start_text) return s.day_start_text;
    if (f === "shift end" && s && s.day_end_text) return s.day_end_text;
    if (f === "start" && s && s.start) return s.start;
    return HINTS[f] || (mode === "minutes" ? "480" : "08:00");
  };
  rs.forEach((r, k) => {
    const li = el("li", "veh-card");
    li.dataset.row = String(k);
    for (const line of CARD) {
      for (const [f, span] of line) {
        const lab = el("label", "veh-cell span-" + span);
        lab.appendChild(el("span", "veh-lab", SHORT[f] || LABELS[f]));
        const inp = el("input");
        inp.type = "text";
        inp.autocomplete = "off";
        inp.spellcheck = false;
        inp.value = r.values[f];
        inp.placeholder = hint(f);
        inp.dataset.field = f;
        inp.dataset.testid = "vehicle-" + f.replace(" ", "-");
        inp.setAttribute("aria-label", "Vehicle " + (k + 1) + ", " + LABELS[f]);
        inp.addEventListener("input", () => {
          setValue(ed.table, k, f, inp.value.trim());
          write();
        });
        lab.appendChild(inp);
        li.appendChild(lab);
      }
      if (line === CARD[0]) {
        const del = el("button", "veh-del secondary", "×");
        del.type = "button";
        del.title = "Take this vehicle off the table";
        del.setAttribute("aria-label", "Take vehicle " + (k + 1) + (r.values.id ? " (" + r.values.id + ")" : "") + " off the table");
        del.addEventListener("click", () => {
          removeAt(ed.table, k, ed.stash);
          ed.note = "Took " + (r.values.id || "vehicle " + (k + 1)) + " off; raise the count to bring it back as it was.";
          write();
          fromBox();
        });
        li.appendChild(del);
      }
    }
    list.appendChild(li);
  });
  $("vehicle-cards").hidden = rs.length === 0;
  const p = ed.table && ed.table.problem;
  $("veh-note").textContent = p ? "The editor shows the table once the text has a header row; your text is kept as it is." : ed.note;
  showProblems();
}

// problems gives the editor's problems now (an empty list when none).
export function vehicleProblems() {
  const out = check(ed.table, timeMode());
  const c = $("fleet-size").value.trim();
  if (c !== "" && checkCount(c)) out.unshift({ row: -1, field: "count", message: checkCount(c) });
  return out;
}

function showProblems() {
  const list = vehicleProblems();
  const box = $("vehicles-problems");
  box.textContent = "";
  box.hidden = list.length === 0;
  for (const inp of $("vehicle-cards").querySelectorAll("input")) inp.removeAttribute("aria-invalid");
  $("fleet-size").removeAttribute("aria-invalid");
  if (!list.length) return;
  const ul = el("ul");
  for (const p of list) {
    const li = el("li", "", p.message);
    li.dataset.field = p.field;
    li.dataset.row = String(p.row);
    ul.appendChild(li);
    const inp = inputOf(p);
    if (inp) inp.setAttribute("aria-invalid", "true");
  }
  box.appendChild(ul);
}

function inputOf(p) {
  if (p.field === "count") return $("fleet-size");
  const card = $("vehicle-cards").querySelector('li[data-row="' + p.row + '"]');
  return card ? card.querySelector('input[data-field="' + p.field + '"]') : null;
}

// focusFirstProblem puts the cursor on the first problem's field.
export function focusFirstProblem() {
  const list = vehicleProblems();
  if (!list.length) return;
  $("team-box").open = true;
  const inp = inputOf(list[0]);
  if (inp) inp.focus();
}

// solomonDay: the sites text is in Solomon's format, which gives its own
// vehicles (a vehicles table is refused with it).
function solomonDay() {
  return isSolomon($("paste-input").value);
}

const SOLOMON_NOTE = "This file is in Solomon's format and has vehicles of its own: the count keeps its first ones (or adds like ones), with no table.";

function count() {
  const c = $("fleet-size").value.trim();
  if (checkCount(c)) return 0;
  return Number(c);
}

function onCount() {
  const n = count();
  if (!n) {
    showProblems();
    return;
  }
  ed.note = "";
  if (!rows(ed.table).length && solomonDay()) {
    $("veh-note").textContent = SOLOMON_NOTE;
    ed.changed();
    return;
  }
  if (!rows(ed.table).length) {
    if (ed.table && ed.table.problem) {
      showProblems();
      return;
    }
    ed.table = newTable(n, { end: routeEnd() });
  } else {
    const before = rows(ed.table).length;
    resize(ed.table, n, ed.stash);
    if (n < before) ed.note = "Took " + (before - n === 1 ? "the last vehicle" : "the last " + (before - n) + " vehicles") + " off; raise the count to bring them back as they were.";
  }
  write();
  draw();
}

// setAll sets what the line above the cards gives on every vehicle,
// making the table for the count first when there is none.
function setAll() {
  const given = { "shift start": $("all-shift-start").value.trim(), "shift end": $("all-shift-end").value.trim(), capacity: $("all-capacity").value.trim() };
  if (!rows(ed.table).length && solomonDay()) {
    $("veh-note").textContent = SOLOMON_NOTE + " Shifts and capacity are the file's.";
    return;
  }
  if (!rows(ed.table).length) {
    const n = count();
    if (!n) {
      showProblems();
      const msg = checkCount($("fleet-size").value);
      $("veh-note").textContent = msg + " Give the count first, then set every vehicle.";
      $("fleet-size").setAttribute("aria-invalid", "true");
      $("fleet-size").focus();
      return;
    }
    if (ed.table && ed.table.problem) return;
    ed.table = newTable(n, { end: routeEnd() });
  }
  const n = rows(ed.table).length;
  const set = Object.keys(given).filter((f) => given[f] !== "");
  for (let k = 0; k < n; k++) for (const f of set) setValue(ed.table, k, f, given[f]);
  ed.note = set.length ? "Set the " + set.map((f) => LABELS[f]).join(", ") + " of all " + n + " vehicles." : "Fill in a shift or a capacity to set it on every vehicle.";
  write();
  draw();
}

// wireVehicleEditor connects the editor: summary gives the sites read
// last, changed is called after each edit of the box.
export function wireVehicleEditor(o) {
  ed.summary = o.summary;
  ed.changed = o.changed;
  $("fleet-size").max = String(MAX_VEHICLES);
  $("fleet-size").addEventListener("change", onCount);
  $("vehicles-set-all").addEventListener("click", setAll);
  $("vehicles-input").addEventListener("input", () => {
    ed.stash = [];
    ed.note = "";
    // Emptied: one vehicle again (a Solomon file keeps its count).
    if (!$("vehicles-input").value.trim() && !solomonDay()) $("fleet-size").value = "";
    fromBox();
  });
  fromBox();
}

// editorSeesSites redraws the cards' hints and checks for the sites read.
export function editorSeesSites() {
  draw();
}
