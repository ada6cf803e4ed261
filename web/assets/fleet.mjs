// A day for several vehicles: one lane group per vehicle on the shared
// time axis (a header row with the vehicle's figures, then its visits in
// route order), or past 60 visits one compact row per vehicle with its
// visits as blocks; the visits left unserved with their reasons; the
// table with a vehicle column. The plan is the fleet plan of `solve
// --format json` (format.FleetPlanJSON).

import { $, el, markup } from "./dom.mjs";
import { isOpen, clock, duration, longDuration, plural, dayHeading } from "./fmt.mjs";
import { describeVisit, axisRow } from "./timeline.mjs";

// COMPACT_OVER: days with more visits than this get one row per vehicle.
export const COMPACT_OVER = 60;

// LANES: one hue per vehicle, repeated past eight; the service blocks of
// the compact rows and the lane headers' edge take it.
const LANES = 8;

export function isFleetPlan(p) {
  return !!(p && Array.isArray(p.routes));
}

function num(t) {
  return typeof t === "number" && Number.isFinite(t) && !isOpen(t);
}

// fleetSpan gives [t0, t1]: from the earliest begin to the latest end of
// any route, with window ends within half that length again shown whole.
export function fleetSpan(p) {
  let t0 = Infinity, t1 = -Infinity;
  const take = (t) => {
    if (num(t)) {
      t0 = Math.min(t0, t);
      t1 = Math.max(t1, t);
    }
  };
  for (const r of p.routes) {
    take(r.begin);
    take(r.arrival);
    for (const v of r.schedule || []) {
      take(v.arrival);
      take(v.departure);
    }
  }
  if (!(t1 >= t0)) return [0, 1];
  const reach = t1 + Math.max(1, (t1 - t0) * 0.5);
  for (const r of p.routes) {
    for (const v of r.schedule || []) if (num(v.latest) && v.latest > t1 && v.latest <= reach) t1 = v.latest;
  }
  if (!(t1 > t0)) t1 = t0 + 1;
  return [t0, t1];
}

// vehicleLabel is "T1 · Ines", or the id alone.
export function vehicleLabel(r) {
  return r.vehicle + (r.vehicle_name ? " · " + r.vehicle_name : "");
}

// laneFigures gives a route's figures in words: visits, travel, working
// day, load.
export function laneFigures(r, model) {
  const parts = [plural(r.visits.length, "visit", "visits"), longDuration(r.travel, model) + " driving", longDuration(r.duration, model) + " working day"];
  if (r.capacity !== undefined && r.capacity !== null) parts.push("load " + fnum(r.load) + " of " + fnum(r.capacity));
  else if (r.load > 0) parts.push("load " + fnum(r.load));
  return parts.join(" · ");
}

function fnum(v) {
  return (Math.round(v * 100) / 100).toLocaleString();
}

// fleetWords is the run bar's line for a fleet plan.
export function fleetWords(p, model) {
  let t = plural(p.vehicles_used, "vehicle", "vehicles") + " of " + p.vehicles + ", " + plural(p.served, "visit", "visits") + " served";
  const u = p.unserved.length;
  t += u ? ", " + u + " unserved" : ", none left out";
  if (p.objective === "completion") t += " · completions " + longDuration(p.cost, model) + " in all";
  else t += " · " + longDuration(p.cost, model) + " driving in all";
  return t;
}

const ESC = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };
function esc(s) {
  return String(s).replace(/[&<>"']/g, (c) => ESC[c]);
}

function laneText(r, model) {
  const c = (t) => clock(t, model);
  return "Vehicle " + vehicleLabel(r) + ": leaves " + r.start + " at " + c(r.begin) + ", " + (r.end ? "back at " + r.end : "ends at the last visit") +
    " at " + c(r.arrival) + "; " + laneFigures(r, model) + ".";
}

export function drawFleetTimeline(p, model) {
  const t00 = performance.now();
  const tl = $("timeline");
  const [t0, t1] = fleetSpan(p);
  const span = t1 - t0;
  const x = (t) => ((Math.max(t0, Math.min(t1, t)) - t0) / span) * 100;
  const compact = p.served > COMPACT_OVER;
  const frag = document.createDocumentFragment();

  frag.appendChild(axisRow(tl, compact ? "vehicle" : "vehicle · stop", 180, t0, t1, x, model));

  // As timeline.mjs: rows as one HTML string, every text through esc(),
  // positions set through the style object after parsing.
  const spots = [];
  const pos = (a, b, minPct) => {
    const left = x(a);
    spots.push(left + "%", Math.max(minPct || 0, x(b) - left) + "%");
    return "data-p";
  };
  const html = [];
  p.routes.forEach((r, k) => {
    const hue = " lane-" + (k % LANES);
    const head = esc(laneText(r, model));
    let h = '<div class="lane-head' + hue + (compact ? " compact" : "") + '" role="listitem" tabindex="0" data-lane="' + esc(r.vehicle) + '" aria-label="' + head + '">' +
      '<div class="who"><span class="veh">' + esc(r.vehicle) + "</span>" + (r.vehicle_name ? '<span class="nm">' + esc(r.vehicle_name) + "</span>" : "") + "</div>" +
      '<div class="track">';
    if (!compact) {
      h += '<span class="shift" ' + pos(r.begin, r.arrival, 0.5) + "></span>";
      h += '<span class="figs">' + esc(laneFigures(r, model)) + "</span>";
    } else {
      let prev = r.begin;
      for (const v of r.schedule) {
        if (v.arrival > prev) h += '<span class="drive" ' + pos(prev, v.arrival, 0) + "></span>";
        if (v.wait > 0) h += '<span class="wait" ' + pos(v.arrival, v.start, 0.2) + "></span>";
        h += '<span class="block" title="' + esc(v.id + (v.name ? " " + v.name : "") + " " + clock(v.start, model) + "–" + clock(v.departure, model)) + '" ' +
          pos(v.start, v.departure, 0.3) + "></span>";
        prev = v.departure;
      }
      if (r.end && r.arrival > prev) h += '<span class="drive" ' + pos(prev, r.arrival, 0) + "></span>";
      h += '<span class="arrive" ' + pos(r.arrival, r.arrival, 0.4) + "></span>";
    }
    html.push(h + "</div></div>");
    if (compact) return;
    let prevDep = r.begin;
    r.schedule.forEach((v, i) => {
      const row = { v: v, order: i + 1, ret: false };
      const text = esc(vehicleLabel(r) + ", " + describeVisit(row, model));
      const cls = "visit in-lane" + hue + (v.lateness > 0 ? " is-late" : "") + (v.wait > 0 ? " has-wait" : "");
      let g = '<div class="' + cls + '" role="listitem" tabindex="0" data-row="' + esc(r.vehicle) + "-" + (i + 1) + '" data-visit="' + esc(v.id) +
        '" data-vehicle="' + esc(r.vehicle) + '" aria-label="' + text + '"><div class="who"><span class="ord">' + (i + 1) + '</span><span class="sid">' + esc(v.id) +
        "</span>" + (v.name ? '<span class="nm">' + esc(v.name) + "</span>" : "") + '</div><div class="track">';
      const open = isOpen(v.latest) || v.latest > t1;
      g += '<span class="band' + (open ? " open-end" : "") + '" ' + pos(isOpen(v.earliest) ? t0 : v.earliest, open ? t1 : v.latest, 0.4) + "></span>";
      if (v.arrival > prevDep) g += '<span class="drive" ' + pos(prevDep, v.arrival, 0) + "></span>";
      if (v.wait > 0) g += '<span class="wait" ' + pos(v.arrival, v.start, 0.3) + "></span>";
      if (v.lateness > 0) g += '<span class="late" ' + pos(v.latest, v.start, 0.6) + "></span>";
      g += '<span class="service" ' + pos(v.start, v.departure, 0.5) + "></span>";
      html.push(g + "</div></div>");
      prevDep = v.departure;
    });
  });
  frag.appendChild(markup(html, spots));
  tl.textContent = "";
  tl.className = "timeline fleet" + (compact ? " lanes-compact" : "");
  tl.appendChild(frag);
  tl.dataset.count = String(p.served);
  tl.dataset.lanes = String(p.routes.length);
  tl.dataset.buildMs = String(Math.round((performance.now() - t00) * 10) / 10);
}

// drawUnserved lists the visits left out, each with its reason.
export function drawUnserved(p) {
  const box = $("unserved");
  box.textContent = "";
  const list = isFleetPlan(p) ? p.unserved_reasons || [] : [];
  box.hidden = list.length === 0;
  if (!list.length) return;
  box.appendChild(el("h3", "", "Not served in this plan: " + plural(list.length, "visit", "visits")));
  const ul = el("ul");
  for (const u of list) {
    const li = el("li");
    li.dataset.visit = u.id;
    li.dataset.reason = u.reason;
    li.append(el("span", "sid", u.id), el("span", "nm", u.name || ""), el("span", "reason", u.why));
    ul.appendChild(li);
  }
  box.appendChild(ul);
}

// vehicleColumn puts the table's vehicle column in (a fleet plan) or
// takes it out (one vehicle), header included.
export function vehicleColumn(on) {
  const table = $("plan-table");
  const head = table.tHead.rows[0];
  const th = head.querySelector("th.c-veh");
  table.classList.toggle("with-vehicle", on);
  if (on && !th) {
    const h = document.createElement("th");
    h.scope = "col";
    h.className = "c-veh";
    h.textContent = "Vehicle";
    head.insertBefore(h, head.firstChild);
  } else if (!on && th) th.remove();
}

// TABLE_NOW: tables of up to this many rows are drawn with the lanes.
// Longer ones come a task later, so that the lanes of a new plan show at
// once and the page takes input between the two; while a search runs
// they wait until the table is scrolled into view (or the search ends):
// the plans of a running search come every second or so, and a table of
// hundreds of rows below the lanes would cost the page as much again as
// the lanes each time. A newer plan's table replaces a waiting one.
export const TABLE_NOW = 100;
const waiting = { plan: null, model: null, seen: false, wired: false };

function wireTable(table) {
  if (waiting.wired) return;
  waiting.wired = true;
  if (typeof IntersectionObserver === "function") {
    new IntersectionObserver((es) => {
      waiting.seen = es.some((e) => e.isIntersecting);
      if (waiting.seen) soon();
    }).observe(table);
  } else waiting.seen = true;
  new MutationObserver(() => {
    if (document.body.dataset.run !== "running") soon();
  }).observe(document.body, { attributes: true, attributeFilter: ["data-run"] });
}

function soon() {
  if (waiting.plan) setTimeout(flushTable, 0);
}

function flushTable() {
  const table = $("plan-table");
  const p = waiting.plan, model = waiting.model;
  if (!p) return;
  waiting.plan = null;
  delete table.dataset.pending;
  // Not when the plan was cleared meanwhile.
  if (!$("timeline").classList.contains("fleet")) return;
  const t0 = performance.now();
  fleetRows(p, model);
  void table.offsetHeight;
  table.dataset.rowsMs = String(Math.round((performance.now() - t0) * 10) / 10);
}

export function drawFleetTable(p, model) {
  const table = $("plan-table");
  wireTable(table);
  if (p.served <= TABLE_NOW) {
    waiting.plan = null;
    delete table.dataset.pending;
    fleetRows(p, model);
    return;
  }
  waiting.plan = p;
  waiting.model = model;
  table.dataset.pending = "yes";
  if (document.body.dataset.run !== "running" || waiting.seen) soon();
}

function fleetRows(p, model) {
  vehicleColumn(true);
  const table = $("plan-table");
  table.classList.toggle("no-names", !p.routes.some((r) => r.schedule.some((v) => v.name)));
  const day = dayHeading(model);
  $("table-day").textContent = (day ? day + " · " : "") + (model.clock ? "times of day" : "times in the file's units") +
    ", waits and slack in " + (model.minutes ? "minutes (H:MM from an hour)" : "the file's units") + ", " + plural(p.routes.length, "vehicle", "vehicles") + " in the vehicles' order";
  const c = (v) => clock(v, model);
  // The rows as one HTML string, every text through esc(), parsed at once:
  // at 200 visits this is several times quicker than a node per cell.
  const html = [];
  p.routes.forEach((r, k) => {
    const veh = esc(r.vehicle);
    r.schedule.forEach((v, i) => {
      const cls = "lane-" + (k % LANES) + (i === 0 ? " first-of-lane" : "") + (v.lateness > 0 ? " is-late" : "");
      const win = isOpen(v.latest) ? "from " + c(v.earliest) : c(v.earliest) + "–" + c(v.latest);
      const slack = isOpen(v.latest) ? "open" : duration(v.slack, model, "floor");
      html.push('<tr class="' + cls + '"><td class="c-veh">' + veh + '</td><td class="c-ord">' + (i + 1) + '</td><th scope="row" class="c-site">' + esc(v.id) +
        '</th><td class="name-col">' + esc(v.name || "") + '</td><td class="c-arr">' + esc(c(v.arrival)) + '</td><td class="c-start">' + esc(c(v.start)) +
        '</td><td class="c-wait">' + (v.wait > 0 ? esc(duration(v.wait, model)) : "–") + '</td><td class="c-dep">' + esc(c(v.departure)) +
        '</td><td class="win-col">' + esc(win) + '</td><td class="c-slack">' + esc(slack) + "</td></tr>");
    });
  });
  const t = document.createElement("template");
  t.innerHTML = "<table><tbody>" + html.join("") + "</tbody></table>";
  table.tBodies[0].replaceWith(t.content.querySelector("tbody"));
}
