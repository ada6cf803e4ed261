// The vehicles table as the page's editor sees it: read from the text of
// a vehicles CSV (the reader's rules: delimiter sniffed or given by a
// "sep=" line, quoting, # comments, column names matched as the sites
// file's are), changed field by field, and written back as text. What the
// editor does not touch is written back as it was: comment lines, other
// columns, rows left alone. Pure functions, unit-tested under Node
// (web/jstest/vehicles.test.mjs); the engine's reader stays the judge of
// the file (sites named, times against the sites file).

// FIELDS: what the editor edits, in its order, with the header written
// for a column it adds.
export const FIELDS = ["id", "name", "start", "end", "shift start", "shift end", "capacity", "max duration"];

// MAX_VEHICLES: the editor's count runs from 1 to this.
export const MAX_VEHICLES = 200;

// Column names by field, as solver/format/vehicles.go accepts them.
const SYNONYMS = {
  id: ["id", "vehicle", "vehicleid", "code", "ref", "key"],
  name: ["name", "vehiclename", "label", "title", "driver"],
  start: ["start", "startsite", "from", "depot", "base"],
  end: ["end", "endsite", "to", "return", "finish site"],
  "shift start": ["shiftstart", "starttime", "begin", "availablefrom", "on duty"],
  "shift end": ["shiftend", "endtime", "availableto", "off duty"],
  capacity: ["capacity", "cap", "loadlimit", "maxload"],
  "max duration": ["maxduration", "longestday", "maxhours", "maxworkingtime", "maxday"],
};

// normHeader as the Go reader's: case, spaces, _ and - and bracketed
// parts ignored.
export function normHeader(h) {
  return String(h).toLowerCase().replace(/\([^)]*\)|\[[^\]]*\]/g, "").replace(/[\s_-]+/g, "");
}

export function fieldOf(h) {
  const n = normHeader(h);
  for (const f of FIELDS) if (SYNONYMS[f].some((s) => normHeader(s) === n)) return f;
  return "";
}

// splitRecord reads the fields of one record starting at line i of lines
// (quoted fields may hold the delimiter and run over lines). It returns
// the fields and the index of the record's last line.
function splitRecord(lines, i, comma) {
  const out = [];
  let cell = "";
  let quoted = false;
  let line = lines[i];
  let k = 0;
  let start = true;
  for (;;) {
    if (k >= line.length) {
      if (quoted && i + 1 < lines.length) {
        cell += "\n";
        line = lines[++i];
        k = 0;
        continue;
      }
      out.push(quoted ? cell : cell.trim());
      return { fields: out, last: i };
    }
    const c = line[k];
    if (quoted) {
      if (c === '"') {
        if (line[k + 1] === '"') {
          cell += '"';
          k += 2;
          continue;
        }
        quoted = false;
        k++;
        continue;
      }
      cell += c;
      k++;
      continue;
    }
    if (c === comma) {
      out.push(cell.trim());
      cell = "";
      start = true;
      k++;
      continue;
    }
    if (c === '"' && start && cell.trim() === "") {
      quoted = true;
      cell = "";
      start = false;
      k++;
      continue;
    }
    start = false;
    cell += c;
    k++;
  }
}

function sniff(line) {
  let best = ",";
  let most = 0;
  for (const c of [",", ";", "\t", "|"]) {
    const n = line.split(c).length - 1;
    if (n > most) {
      most = n;
      best = c;
    }
  }
  return best;
}

// parseTable reads a vehicles text into the editor's model:
//   {comma, items: [{kind: "raw", text} | {kind: "header", cells, raw} |
//    {kind: "row", cells, raw, line}], header: index of the header item,
//    cols: {field: column}, idFromName}
// An empty text gives null. It never throws: a text the editor cannot
// show (no header row) gives {problem}.
export function parseTable(text) {
  text = String(text || "").replace(/^\ufeff/, "").replace(/\r\n?/g, "\n");
  if (!text.trim()) return null;
  const lines = text.split("\n");
  if (lines.length && lines[lines.length - 1] === "") lines.pop();
  const items = [];
  let comma = "";
  let header = -1;
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i];
    const t = l.trim();
    if (t === "" || l.startsWith("#")) {
      items.push({ kind: "raw", text: l });
      continue;
    }
    if (header < 0 && !comma && /^sep=.$/i.test(t)) {
      comma = t.charAt(4);
      items.push({ kind: "raw", text: l });
      continue;
    }
    if (header < 0) {
      if (!comma) comma = sniff(l);
      const r = splitRecord(lines, i, comma);
      header = items.length;
      items.push({ kind: "header", cells: r.fields, raw: lines.slice(i, r.last + 1).join("\n") });
      i = r.last;
      continue;
    }
    const r = splitRecord(lines, i, comma);
    items.push({ kind: "row", cells: r.fields, raw: lines.slice(i, r.last + 1).join("\n"), line: i + 1 });
    i = r.last;
  }
  if (header < 0) return { problem: "the text has no header row; want one such as id,name,start,end,shift start,shift end,capacity" };
  const cols = {};
  items[header].cells.forEach((h, c) => {
    const f = fieldOf(h);
    if (f && cols[f] === undefined) cols[f] = c;
  });
  const t = { comma: comma, items: items, header: header, cols: cols, idFromName: false };
  if (cols.id === undefined && cols.name !== undefined) {
    cols.id = cols.name;
    t.idFromName = true;
  }
  return t;
}

// rows gives the table's vehicles: {item, values: {field: text}, line}.
export function rows(t) {
  if (!t || t.problem) return [];
  const out = [];
  t.items.forEach((it, k) => {
    if (it.kind !== "row") return;
    const values = {};
    for (const f of FIELDS) values[f] = t.cols[f] !== undefined ? it.cells[t.cols[f]] || "" : "";
    out.push({ item: k, values: values, line: it.line });
  });
  return out;
}

function quote(cell, comma, first) {
  const s = String(cell);
  if (s.includes(comma) || s.includes('"') || s.includes("\n") || s !== s.trim() || (first && s.startsWith("#"))) return '"' + s.replace(/"/g, '""') + '"';
  return s;
}

function record(cells, comma) {
  return cells.map((c, i) => quote(c, comma, i === 0)).join(comma);
}

// writeTable gives the text of t: items the editor did not change as they
// were written, the others written afresh.
export function writeTable(t) {
  if (!t || t.problem) return "";
  return t.items.map((it) => (it.kind === "raw" ? it.text : it.raw !== undefined ? it.raw : record(it.cells, t.comma))).join("\n") + "\n";
}

// columnFor gives field f's column, adding it to the header (and an empty
// cell to every row) when the table has none.
function columnFor(t, f) {
  if (f === "name" && t.idFromName) {
    // Names were the ids: give the ids a column of their own first.
    t.idFromName = false;
    t.cols.id = addColumn(t, "id", (it) => it.cells[t.cols.name] || "");
  }
  if (t.cols[f] === undefined) t.cols[f] = addColumn(t, f, () => "");
  return t.cols[f];
}

function addColumn(t, title, fill) {
  const h = t.items[t.header];
  const c = h.cells.length;
  h.cells.push(title);
  delete h.raw;
  for (const it of t.items) {
    if (it.kind !== "row") continue;
    while (it.cells.length < c) it.cells.push("");
    it.cells.push(fill(it));
    delete it.raw;
  }
  return c;
}

// setValue sets field f of the table's k-th vehicle to v.
export function setValue(t, k, f, v) {
  const r = rows(t)[k];
  if (!r) return;
  const it = t.items[r.item];
  const c = columnFor(t, f);
  while (it.cells.length <= c) it.cells.push("");
  if (it.cells[c] === v) return;
  it.cells[c] = v;
  delete it.raw;
}

// newTable is a table of n like vehicles, as `--fleet n` makes them: ids
// 1 to n, from the start site, ending where end says ("" back to the
// start, "free", or a site id), the shift and capacity as given (empty:
// the start site's window, no limit).
export function newTable(n, o) {
  o = o || {};
  const header = ["id", "name", "start", "end", "shift start", "shift end", "capacity"];
  const items = [{ kind: "header", cells: header }];
  for (let k = 1; k <= n; k++) items.push({ kind: "row", cells: [String(k), "", "", o.end || "", o.shiftStart || "", o.shiftEnd || "", o.capacity || ""] });
  const cols = {};
  header.forEach((h, c) => (cols[h] = c));
  return { comma: ",", items: items, header: 0, cols: cols, idFromName: false };
}

// nextID follows the last id: T3 gives T4, V09 gives V10, 7 gives 8;
// others get -2, -3, ...; never an id in use.
export function nextID(last, used) {
  const m = String(last).match(/^(.*?)(\d+)$/);
  const cand = (n) => (m ? m[1] + String(n).padStart(m[2].length, "0") : last + "-" + n);
  let n = m ? Number(m[2]) + 1 : 2;
  while (used.has(cand(n))) n++;
  return cand(n);
}

// resize gives the table n vehicles: the last ones go into stash (their
// rows as written, last first), new ones come back from the stash first,
// then as copies of the last vehicle with the next id and no name.
export function resize(t, n, stash) {
  let rs = rows(t);
  while (rs.length > n) {
    const r = rs[rs.length - 1];
    stash.push(t.items[r.item]);
    t.items.splice(r.item, 1);
    rs = rows(t);
  }
  while (rs.length < n) {
    const at = rs.length ? rs[rs.length - 1].item + 1 : t.header + 1;
    let it;
    if (stash.length) it = stash.pop();
    else {
      const src = rs.length ? t.items[rs[rs.length - 1].item].cells.slice() : t.items[t.header].cells.map(() => "");
      const used = new Set(rs.map((r) => r.values.id));
      const c = t.cols.id;
      src[c] = nextID(rs.length ? rs[rs.length - 1].values.id : "0", used);
      if (t.cols.name !== undefined && t.cols.name !== c) src[t.cols.name] = "";
      it = { kind: "row", cells: src };
    }
    t.items.splice(at, 0, it);
    rs = rows(t);
  }
}

// removeAt takes the table's k-th vehicle out (into stash).
export function removeAt(t, k, stash) {
  const r = rows(t)[k];
  if (!r) return;
  stash.push(t.items[r.item]);
  t.items.splice(r.item, 1);
}

// isSolomon tells a text in Solomon's format as format.IsSolomon does:
// its second line that is not blank is VEHICLE. Such a file carries its
// own vehicles; a count keeps its first N.
export function isSolomon(text) {
  const lines = String(text || "").replace(/^\ufeff/, "").split("\n").map((l) => l.trim()).filter((l) => l);
  return lines.length >= 2 && lines[1].toUpperCase() === "VEHICLE";
}

// ---------- checking ----------

// parseTime reads a time as the sites file writes them (mode "minutes",
// "clock" or "dated"; "" when not known yet: any). It gives {v} in
// minutes (dated: from 1970) or {msg}.
export function parseTime(s, mode, commaDecimal) {
  s = String(s).trim();
  const dated = s.match(/^(\d{4})-(\d{2})-(\d{2})[ T]\s*(.*)$/);
  const clock = (t) => {
    const m = t.match(/^(\d{1,6}):(\d{2})(?::(\d{2}))?$/);
    if (!m) return null;
    const h = Number(m[1]), mi = Number(m[2]), se = Number(m[3] || 0);
    if (h > 24 || mi > 59 || se > 59 || (h === 24 && (mi > 0 || se > 0))) return null;
    return h * 60 + mi + se / 60;
  };
  if (mode === "minutes" || (mode === "" && !s.includes(":"))) {
    const m = s.match(commaDecimal ? /^\d+(?:[.,]\d+)?$/ : /^\d+(?:\.\d+)?$/);
    if (m) return { v: Number(s.replace(",", ".")) };
    if (mode === "minutes") {
      if (s.includes(":")) return { msg: "“" + s + "” is a clock time, but the sites file gives times as minutes; give minutes, such as 480" };
      return { msg: "“" + s + "” is not a time; want minutes from the sites file's reference, such as 480" };
    }
  }
  if (dated) {
    if (mode === "clock") return { msg: "“" + s + "” has a date, but the sites file's times have none; give the clock time alone, such as 08:00" };
    const day = Date.UTC(Number(dated[1]), Number(dated[2]) - 1, Number(dated[3]));
    const c = clock(dated[4]);
    if (!Number.isFinite(day) || c === null) return { msg: "“" + s + "” is not a date and time; want YYYY-MM-DD HH:MM, such as 2026-12-01 08:00" };
    return { v: day / 60000 + c };
  }
  const c = clock(s);
  if (c === null) return { msg: "“" + s + "” is not a time; want HH:MM on the 24-hour clock, such as 08:00" + (mode === "" ? " (or minutes, as the sites file writes times)" : "") };
  return { v: c };
}

function number(s, commaDecimal) {
  s = String(s).trim();
  const re = commaDecimal ? /^[+-]?\d+(?:[.,]\d+)?$|^[+-]?[.,]\d+$/ : /^[+-]?\d+(?:\.\d+)?$|^[+-]?\.\d+$/;
  return re.test(s) ? Number(s.replace(",", ".")) : NaN;
}

// LABELS: each field as the editor names it.
export const LABELS = { id: "id", name: "name", start: "start site", end: "end", "shift start": "shift start", "shift end": "shift end", capacity: "capacity", "max duration": "longest day" };

// check gives every problem of the table's vehicles, in order:
// {row (0-based), field, message}, each message naming the vehicle and
// the field. mode is the sites file's time mode ("" when none is read).
export function check(t, mode) {
  const out = [];
  if (!t) return out;
  if (t.problem) return [{ row: -1, field: "", message: "Vehicles table: " + t.problem + "." }];
  const commaDecimal = t.comma !== ",";
  const seen = new Map();
  rows(t).forEach((r, k) => {
    const v = r.values;
    const who = "Vehicle " + (k + 1) + (v.id ? " (" + v.id + ")" : "");
    const bad = (f, msg) => out.push({ row: k, field: f, message: who + ", " + LABELS[f] + ": " + msg + "." });
    if (!v.id) bad("id", "empty; every vehicle needs an id of its own");
    else if (seen.has(v.id)) bad("id", "“" + v.id + "” is used by vehicle " + (seen.get(v.id) + 1) + " too; ids must differ");
    else seen.set(v.id, k);
    const times = {};
    for (const f of ["shift start", "shift end"]) {
      if (!v[f]) continue;
      const p = parseTime(v[f], mode || "", commaDecimal);
      if (p.msg) bad(f, p.msg);
      else times[f] = p.v;
    }
    if (times["shift start"] !== undefined && times["shift end"] !== undefined && times["shift end"] < times["shift start"])
      bad("shift end", "“" + v["shift end"] + "” is before the shift start “" + v["shift start"] + "”; want an end at or after the start");
    if (v.capacity) {
      const c = number(v.capacity, commaDecimal);
      if (Number.isNaN(c)) bad("capacity", "“" + v.capacity + "” is not a number; want the most it carries, in the unit of the sites' demand (12, 1.5), or empty for no limit");
      else if (c < 0) bad("capacity", "“" + v.capacity + "” is negative; want 0 or more, or empty for no limit");
    }
    if (v["max duration"]) {
      const d = v["max duration"].trim();
      const hm = d.match(/^(\d+):(\d{2})$/);
      const ok = hm ? Number(hm[2]) < 60 : number(d, commaDecimal) >= 0;
      if (!ok) bad("max duration", "“" + d + "” is not a duration; want minutes (450) or hours and minutes (7:30), or empty for no limit");
    }
  });
  return out;
}

// checkCount is the message for a count that is not one, else "".
export function checkCount(text) {
  const s = String(text).trim();
  const n = Number(s);
  if (s === "" || !Number.isInteger(n) || n < 1 || n > MAX_VEHICLES) return "Count: “" + s + "” is not a number of vehicles; want a whole number from 1 to " + MAX_VEHICLES + ".";
  return "";
}
