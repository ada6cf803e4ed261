// The day plan drawn as a timeline: one row per visit in route order, its
// window, the drive to it, the wait, the service and any lateness. The
// axis stays in view while the rows scroll (CSS sticky); past 60 visits
// the rows get thinner and the names show on hover or focus.

import { $, el, markup } from "./dom.mjs";
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

const ESC = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };
function esc(s) {
  return String(s).replace(/[&<>"']/g, (c) => ESC[c]);
}

export function clearTimeline() {
  const tl = $("timeline");
  tl.textContent = "";
  tl.className = "timeline";
  tl.appendChild(el("p", "muted", "The plan appears here as soon as the search finds one."));
  $("visit-detail").textContent = "";
}

// axisRow is the time axis over a timeline's rows: label is the heading of
// the names' column, gutter the pixels that column takes, x the position
// in percent of the track of a time between t0 and t1.
export function axisRow(tl, label, gutter, t0, t1, x, model) {
  const axis = el("div", "axis");
  axis.setAttribute("aria-hidden", "true");
  axis.appendChild(el("div", "who", label));
  const tk = el("div", "track ticks");
  // About one tick per 80 px of track, so that the labels never overlap.
  const trackPx = Math.max(120, (timelineWidth || tl.clientWidth || 800) - gutter);
  for (const t of ticks(t0, t1, model.clock, Math.max(2, Math.min(8, Math.floor(trackPx / 80))))) {
    const at = x(t);
    // Labels near an end of the track lean inwards, so none is cut off.
    const s = el("span", "tick" + (at > 92 ? " at-end" : at < 8 ? " at-start" : ""), clock(t, model));
    s.style.left = at + "%";
    tk.appendChild(s);
  }
  axis.appendChild(tk);
  return axis;
}

// timelineWidth is the timeline's width as last laid out, kept by a
// ResizeObserver (wireTimeline) so that drawing never forces a layout.
let timelineWidth = 0;

// timelineDrawing prepares the timeline of plan p without touching the
// page: step(deadline) builds rows until performance.now() passes the
// deadline and says whether all are built; commit() puts them on the page
// at once (the old plan stays until then).
export function timelineDrawing(p, model) {
  const rows = planRows(p);
  const tl = $("timeline");
  const [t0, t1] = axisSpan(rows);
  const span = t1 - t0;
  const x = (t) => ((Math.max(t0, Math.min(t1, t)) - t0) / span) * 100;
  const frag = document.createDocumentFragment();
  const dens = density(rows.length);
  let busy = 0;
  let next = 0;
  let prevDep = null;

  frag.appendChild(axisRow(tl, "stop · site", dens === "full" ? 180 : 110, t0, t1, x, model));

  // Rows as HTML strings, a slice at a time: at 500 visits this is several
  // times faster than building the nodes one by one. Every text goes
  // through esc(). The page's policy allows no style attributes in markup:
  // positions are collected here and set through the style object after
  // parsing.
  function slice(deadline) {
    const spots = [];
    const pos = (a, b, minPct) => {
      const left = x(a);
      spots.push(left + "%", Math.max(minPct || 0, x(b) - left) + "%");
      return "data-p";
    };
    const html = [];
    while (next < rows.length) {
      const r = rows[next++];
      const v = r.v;
      const text = esc(describeVisit(r, model));
      const cls = "visit" + (r.ret ? " return" : "") + (v.lateness > 0 ? " is-late" : "") + (v.wait > 0 ? " has-wait" : "");
      let h = '<div class="' + cls + '" role="listitem" tabindex="0" data-row="' + r.order + '" ' + (r.ret ? "data-return" : "data-visit") + '="' + esc(v.id) +
        '" aria-label="' + text + '"><div class="who">' +
        // Dense rows are too thin for text (the line under the plan names
        // the visit pointed at): no spans, fewer nodes to lay out.
        (dens === "dense" ? "" : '<span class="ord">' + (r.ret ? "↩" : r.order) + '</span><span class="sid">' + esc(v.id) + "</span>") +
        (v.name && dens === "full" ? '<span class="nm">' + esc(v.name) + "</span>" : "") +
        '</div><div class="track">';
      const open = isOpen(v.latest) || v.latest > t1;
      h += '<span class="band' + (open ? " open-end" : "") + '" ' + pos(isOpen(v.earliest) ? t0 : v.earliest, open ? t1 : v.latest, 0.4) + "></span>";
      if (prevDep !== null && v.arrival > prevDep) h += '<span class="drive" ' + pos(prevDep, v.arrival, 0) + "></span>";
      if (v.wait > 0) h += '<span class="wait" ' + pos(v.arrival, v.start, 0.3) + "></span>";
      if (v.lateness > 0) h += '<span class="late" ' + pos(v.latest, v.start, 0.6) + "></span>";
      if (r.ret) h += '<span class="arrive" ' + pos(v.arrival, v.arrival, 0.5) + "></span>";
      else if (r.order > 0) h += '<span class="service" ' + pos(v.start, v.departure, 0.5) + "></span>";
      else h += '<span class="depart" ' + pos(v.departure, v.departure, 0.5) + "></span>";
      html.push(h + "</div></div>");
      prevDep = v.departure;
      if ((next & 31) === 0 && performance.now() > deadline) break;
    }
    frag.appendChild(markup(html, spots));
  }

  return {
    step(deadline) {
      const a = performance.now();
      slice(deadline);
      busy += performance.now() - a;
      return next >= rows.length;
    },
    commit() {
      const a = performance.now();
      const focused = document.activeElement && document.activeElement.closest && document.activeElement.closest("[data-row]");
      const focusRow = focused && tl.contains(focused) ? focused.dataset.row : null;
      tl.textContent = "";
      tl.className = "timeline rows-" + dens;
      tl.appendChild(frag);
      tl.dataset.count = String(p.schedule.length);
      if (focusRow !== null) {
        const again = tl.querySelector('[data-row="' + focusRow + '"]');
        if (again) again.focus({ preventScroll: true });
      }
      busy += performance.now() - a;
      // The script time the rows took, for the browser tests to report.
      tl.dataset.buildMs = String(Math.round(busy * 10) / 10);
    },
  };
}

// drawTimeline draws plan p's timeline at once.
export function drawTimeline(p, model) {
  const d = timelineDrawing(p, model);
  while (!d.step(Infinity));
  d.commit();
}

export function wireTimeline() {
  const tl = $("timeline");
  if (typeof ResizeObserver === "function") new ResizeObserver(() => { timelineWidth = tl.clientWidth; }).observe(tl);
  const show = (ev) => {
    const row = ev.target.closest && ev.target.closest(".visit");
    if (row) $("visit-detail").textContent = row.getAttribute("aria-label");
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
