// The day plan drawn as a timeline: one row per visit in route order, its
// window, the drive to it, the wait, the service and any lateness. The
// axis stays in view while the rows scroll (CSS sticky); past 60 visits
// the rows get thinner and the names show on hover or focus.

import { $, el } from "./dom.mjs";
import { isOpen, clock, duration } from "./fmt.mjs";
import { planRows, axisSpan, ticks, density } from "./axis.mjs";

export function describeVisit(r, model) {
  const v = r.v;
  const c = (t) => clock(t, model);
  if (r.ret) {
    let t = "Back at " + v.id + ": arrive " + c(v.arrival);
    if (!isOpen(v.latest)) t += ", must be back by " + c(v.latest);
    if (v.lateness > 0) t += ", late by " + duration(v.lateness, model, "ceil");
    return t + ".";
  }
  let t = (r.order === 0 ? "Start at " : "Stop " + r.order + ", site ") + v.id + (v.name ? " (" + v.name + ")" : "") + ": ";
  if (r.order === 0) t += "leave at " + c(v.departure);
  else {
    t += "arrive " + c(v.arrival);
    if (v.wait > 0) t += ", wait " + duration(v.wait, model);
    t += ", service " + c(v.start) + " to " + c(v.departure);
  }
  t += "; window " + c(v.earliest) + " to " + (isOpen(v.latest) ? "open" : c(v.latest));
  if (v.lateness > 0) t += "; late by " + duration(v.lateness, model, "ceil");
  else if (r.order > 0 && !isOpen(v.latest)) t += "; slack " + duration(v.slack, model, "floor");
  return t + ".";
}

export function clearTimeline() {
  const tl = $("timeline");
  tl.textContent = "";
  tl.className = "timeline";
  tl.appendChild(el("p", "muted", "The plan appears here as soon as the search finds one."));
  $("visit-detail").textContent = "";
}

export function drawTimeline(p, model) {
  const t00 = performance.now();
  const rows = planRows(p);
  const tl = $("timeline");
  const [t0, t1] = axisSpan(rows);
  const span = t1 - t0;
  const x = (t) => ((Math.max(t0, Math.min(t1, t)) - t0) / span) * 100;
  const place = (node, a, b, minPct) => {
    const left = x(a);
    node.style.left = left + "%";
    node.style.width = Math.max(minPct || 0, x(b) - left) + "%";
    return node;
  };
  const focused = document.activeElement && document.activeElement.closest && document.activeElement.closest("[data-row]");
  const focusRow = focused ? focused.dataset.row : null;
  const frag = document.createDocumentFragment();
  const dens = density(rows.length);

  const axis = el("div", "axis");
  axis.setAttribute("aria-hidden", "true");
  axis.appendChild(el("div", "who", "stop · site"));
  const tk = el("div", "track ticks");
  for (const t of ticks(t0, t1, model.clock)) {
    const s = el("span", "tick", clock(t, model));
    s.style.left = x(t) + "%";
    tk.appendChild(s);
  }
  axis.appendChild(tk);
  frag.appendChild(axis);

  let prevDep = null;
  for (const r of rows) {
    const v = r.v;
    const row = el("div", "visit" + (r.ret ? " return" : "") + (v.lateness > 0 ? " is-late" : "") + (v.wait > 0 ? " has-wait" : ""));
    row.setAttribute("role", "listitem");
    row.tabIndex = 0;
    row.dataset.row = String(r.order);
    if (r.ret) row.dataset.return = v.id;
    else row.dataset.visit = v.id;
    const text = describeVisit(r, model);
    row.setAttribute("aria-label", text);
    row.dataset.detail = text;
    if (dens !== "full") row.title = text;
    const who = el("div", "who");
    who.appendChild(el("span", "ord", r.ret ? "↩" : String(r.order)));
    who.appendChild(el("span", "sid", v.id));
    if (v.name && dens === "full") who.appendChild(el("span", "nm", v.name));
    row.appendChild(who);
    const track = el("div", "track");
    const open = isOpen(v.latest) || v.latest > t1;
    track.appendChild(place(el("span", "band" + (open ? " open-end" : "")), isOpen(v.earliest) ? t0 : v.earliest, open ? t1 : v.latest, 0.4));
    if (prevDep !== null && v.arrival > prevDep) track.appendChild(place(el("span", "drive"), prevDep, v.arrival, 0));
    if (v.wait > 0) track.appendChild(place(el("span", "wait"), v.arrival, v.start, 0.3));
    if (v.lateness > 0) track.appendChild(place(el("span", "late"), v.latest, v.start, 0.6));
    if (r.ret) track.appendChild(place(el("span", "arrive"), v.arrival, v.arrival, 0.5));
    else if (r.order > 0) track.appendChild(place(el("span", "service"), v.start, v.departure, 0.5));
    else track.appendChild(place(el("span", "depart"), v.departure, v.departure, 0.5));
    row.appendChild(track);
    frag.appendChild(row);
    prevDep = v.departure;
  }
  tl.textContent = "";
  tl.className = "timeline rows-" + dens;
  tl.appendChild(frag);
  tl.dataset.count = String(p.schedule.length);
  if (focusRow !== null) {
    const again = tl.querySelector('[data-row="' + focusRow + '"]');
    if (again) again.focus({ preventScroll: true });
  }
  // How long the drawing took (with layout forced), for the browser tests
  // to report.
  void tl.offsetHeight;
  tl.dataset.drawMs = String(Math.round((performance.now() - t00) * 10) / 10);
}

export function wireTimeline() {
  const tl = $("timeline");
  const show = (ev) => {
    const row = ev.target.closest && ev.target.closest(".visit");
    if (row) $("visit-detail").textContent = row.dataset.detail;
  };
  tl.addEventListener("focusin", show);
  tl.addEventListener("mouseover", show);
  tl.addEventListener("keydown", (ev) => {
    const row = ev.target.closest && ev.target.closest(".visit");
    if (!row) return;
    let next = null;
    if (ev.key === "ArrowDown") next = row.nextElementSibling;
    else if (ev.key === "ArrowUp") next = row.previousElementSibling;
    else if (ev.key === "Home") next = tl.querySelector(".visit");
    else if (ev.key === "End") next = tl.lastElementChild;
    if (next && next.classList.contains("visit")) {
      ev.preventDefault();
      next.focus();
    }
  });
}
