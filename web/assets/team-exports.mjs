// Exports of a team's day for one vehicle or for all: the chooser beside
// the export buttons, and the printed pages (a section per vehicle, each
// starting a new page: its lane on the shared axis and its visits in
// words, with the cautions, so that each driver or technician can be
// handed their own sheet). The calendar for one vehicle is the worker's
// (export with "vehicle", checked by fleet.Evaluate there).

import { $, el } from "./dom.mjs";
import { isOpen, clock, duration, plural } from "./fmt.mjs";
import { isFleetPlan, vehicleLabel, laneFigures } from "./fleet.mjs";

export const ALL = "";

// updateVehicleChoice fills the chooser with the plan's vehicles (hidden
// for a one-vehicle plan), keeping the one chosen while it is still in
// the plan.
export function updateVehicleChoice(p) {
  const sel = $("export-vehicle");
  const box = $("export-vehicle-box");
  const fleet = isFleetPlan(p);
  box.hidden = !fleet;
  if (!fleet) {
    sel.textContent = "";
    return;
  }
  const want = [ALL].concat(p.routes.map((r) => r.vehicle));
  const have = [...sel.options].map((o) => o.value);
  if (want.join("\n") === have.join("\n")) {
    p.routes.forEach((r, k) => (sel.options[k + 1].textContent = vehicleLabel(r)));
    return;
  }
  const keep = sel.value;
  sel.textContent = "";
  const all = el("option", "", "all vehicles");
  all.value = ALL;
  sel.appendChild(all);
  for (const r of p.routes) {
    const o = el("option", "", vehicleLabel(r));
    o.value = r.vehicle;
    sel.appendChild(o);
  }
  sel.value = want.includes(keep) ? keep : ALL;
}

// chosenVehicle is the vehicle chosen for the exports ("" all).
export function chosenVehicle(p) {
  if (!isFleetPlan(p)) return ALL;
  const v = $("export-vehicle").value;
  return p.routes.some((r) => r.vehicle === v) ? v : ALL;
}

// fileTag names a file for the vehicle chosen: "-T2", or "" for all.
export function fileTag(v) {
  return v ? "-" + String(v).replace(/[^A-Za-z0-9._-]+/g, "-") : "";
}

// buildTeamPrint writes the printed pages of a team's plan into
// #print-team: one section per vehicle (only the chosen one when one is
// chosen). The lanes are copies of the ones drawn, axis included, so the
// paper shows what the screen shows. For a one-vehicle plan it empties
// the container and the page prints as before.
export function buildTeamPrint(p, model, chosen, title) {
  const out = $("print-team");
  out.textContent = "";
  document.body.classList.toggle("team-sheets", isFleetPlan(p));
  document.body.classList.toggle("team-sheet-one", isFleetPlan(p) && !!chosen);
  if (!isFleetPlan(p)) return;
  const tl = $("timeline");
  const axis = tl.querySelector(".axis");
  const c = (t) => clock(t, model);
  p.routes.forEach((r, k) => {
    if (chosen && r.vehicle !== chosen) return;
    const sec = el("section", "print-vehicle");
    sec.dataset.vehicle = r.vehicle;
    sec.appendChild(el("h2", "", "Vehicle " + vehicleLabel(r)));
    sec.appendChild(el("p", "print-sub", title + " · leaves " + r.start + " at " + c(r.begin) + ", " + (r.end ? "back at " + r.end : "ends at the last visit") +
      " at " + c(r.arrival) + " · " + laneFigures(r, model)));
    const lane = el("div", tl.className + " print-lane");
    if (axis) lane.appendChild(axis.cloneNode(true));
    const head = tl.querySelector('.lane-head[data-lane="' + cssEscape(r.vehicle) + '"]');
    if (head) lane.appendChild(head.cloneNode(true));
    for (const row of tl.querySelectorAll('.visit[data-vehicle="' + cssEscape(r.vehicle) + '"]')) lane.appendChild(row.cloneNode(true));
    const legend = document.querySelector(".plan > .legend");
    if (legend) sec.appendChild(legend.cloneNode(true));
    sec.appendChild(lane);
    sec.appendChild(visitTable(r, k, model));
    sec.appendChild(el("p", "print-caution", "Travel times are estimates. Drive within traffic law and working-time and rest rules; local regulations and professional judgement prevail over this plan."));
    out.appendChild(sec);
  });
}

function cssEscape(s) {
  return typeof CSS !== "undefined" && CSS.escape ? CSS.escape(s) : String(s).replace(/["\\]/g, "\\$&");
}

function visitTable(r, k, model) {
  const c = (t) => clock(t, model);
  const t = el("table", "print-visits lane-" + (k % 8));
  const head = el("tr");
  for (const h of ["Order", "Site", "Name", "Arrival", "Start", "Wait", "Departure", "Window"]) {
    const th = el("th", "", h);
    th.scope = "col";
    head.appendChild(th);
  }
  const thead = el("thead");
  thead.appendChild(head);
  t.appendChild(thead);
  const body = el("tbody");
  r.schedule.forEach((v, i) => {
    const tr = el("tr");
    const win = isOpen(v.latest) ? "from " + c(v.earliest) : c(v.earliest) + "–" + c(v.latest);
    const cells = [String(i + 1), v.id, v.name || "", c(v.arrival), c(v.start), v.wait > 0 ? duration(v.wait, model) : "–", c(v.departure), win];
    cells.forEach((x, j) => tr.appendChild(el(j === 1 ? "th" : "td", j === 2 ? "name-col" : "", x)));
    body.appendChild(tr);
  });
  t.appendChild(body);
  const cap = el("caption", "", plural(r.schedule.length, "visit", "visits") + " in route order");
  t.insertBefore(cap, t.firstChild);
  return t;
}

// csvForVehicle keeps, of a team's plan CSV (the vehicle's id in the first
// column), the header and the rows of vehicle v. Fields are read as
// RFC 4180 says (quotes around fields that hold the delimiter, a line end
// or a quote, quotes doubled inside), so a quoted name that holds a line
// end stays one row.
export function csvForVehicle(csv, v) {
  const out = [];
  let i = 0;
  let first = true;
  while (i < csv.length) {
    // One record: from i to the line end that is outside quotes.
    let j = i;
    let quoted = false;
    for (; j < csv.length; j++) {
      const ch = csv[j];
      if (ch === '"') quoted = !quoted;
      else if (ch === "\n" && !quoted) break;
    }
    const rec = csv.slice(i, Math.min(j + 1, csv.length));
    if (first || firstField(rec) === v) out.push(rec);
    first = false;
    i = j + 1;
  }
  return out.join("");
}

// firstField is a CSV record's first field, unquoted.
function firstField(rec) {
  if (rec[0] !== '"') {
    const k = rec.search(/[,\r\n]/);
    return k < 0 ? rec : rec.slice(0, k);
  }
  let s = "";
  for (let k = 1; k < rec.length; k++) {
    if (rec[k] === '"') {
      if (rec[k + 1] === '"') {
        s += '"';
        k++;
      } else return s;
    } else s += rec[k];
  }
  return s;
}
