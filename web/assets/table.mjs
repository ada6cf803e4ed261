// The plan as a table: one clock format per column, waits and slack in
// whole minutes or H:MM, the day once in the caption.

import { $ } from "./dom.mjs";
import { isOpen, clock, duration, dayHeading } from "./fmt.mjs";
import { planRows } from "./axis.mjs";

// COLS are the columns' classes (page.go gives the headers the same).
const COLS = ["c-ord", "c-site", "name-col", "c-arr", "c-start", "c-wait", "c-dep", "win-col", "c-slack"];

// A plan of more than MANY_ROWS rows shows its first SHOWN_ROWS and a
// button for the rest: at thousands of visits the table's cells were half
// of the second or more that Chromium took to lay out each new plan, with
// the page frozen meanwhile. Every row is in the CSV export and in print.
export const MANY_ROWS = 600;
export const SHOWN_ROWS = 400;

export function clearTable() {
  $("plan-table").tBodies[0].textContent = "";
  $("table-day").textContent = "";
}

// tableDrawing prepares plan p's table without touching the page: step
// builds rows into a body of its own until performance.now() passes the
// deadline and says whether all are built; commit() swaps it in.
export function tableDrawing(p, model, all) {
  const table = $("plan-table");
  const every = planRows(p);
  const rows = all || every.length <= MANY_ROWS ? every : every.slice(0, SHOWN_ROWS);
  // Every clock in whole minutes, one format for all (the exports keep
  // the exact times).
  const c = (v) => clock(v, model);
  const body = document.createElement("tbody");
  let next = 0;
  return {
    step(deadline) {
      while (next < rows.length) {
        const r = rows[next++];
        const v = r.v;
        const tr = document.createElement("tr");
        if (v.lateness > 0) tr.className = "is-late";
        const win = isOpen(v.latest) ? "from " + c(v.earliest, "window") : c(v.earliest, "window") + "–" + c(v.latest, "window");
        let slack = isOpen(v.latest) ? "open" : duration(v.slack, model, "floor");
        if (v.lateness > 0) slack = "late by " + duration(v.lateness, model, "ceil");
        const cells = [r.ret ? "back" : String(r.order), v.id, v.name || "", c(v.arrival, "arrival"), c(v.start, "start"),
          v.wait > 0 ? duration(v.wait, model) : "–", c(v.departure, "departure"), win, slack];
        cells.forEach((text, i) => {
          const td = document.createElement(i === 1 ? "th" : "td");
          if (i === 1) td.scope = "row";
          td.className = COLS[i];
          td.textContent = text;
          tr.appendChild(td);
        });
        body.appendChild(tr);
        if ((next & 15) === 0 && performance.now() > deadline) break;
      }
      if (next < rows.length) return false;
      if (rows.length < every.length && !body.querySelector(".more-rows")) {
        const tr = document.createElement("tr");
        tr.className = "more-rows";
        const td = document.createElement("td");
        td.colSpan = COLS.length;
        const b = document.createElement("button");
        b.type = "button";
        b.dataset.testid = "table-all";
        b.dataset.rows = String(every.length);
        b.textContent = "Show all " + every.length.toLocaleString() + " rows";
        td.append(b, " " + (every.length - rows.length).toLocaleString() + " more below; the CSV export and the printed sheet have them all.");
        tr.appendChild(td);
        body.appendChild(tr);
      }
      return true;
    },
    commit() {
      table.classList.toggle("no-names", !rows.some((r) => r.v.name));
      const day = dayHeading(model);
      $("table-day").textContent = (day ? day + " · " : "") + (model.clock ? "times of day" : "times in the file's units") +
        ", waits and slack in " + (model.minutes ? "minutes (H:MM from an hour)" : "the file's units");
      table.replaceChild(body, table.tBodies[0]);
    },
  };
}

// drawTable draws plan p's table at once.
export function drawTable(p, model, all) {
  const d = tableDrawing(p, model, all);
  while (!d.step(Infinity));
  d.commit();
}
