// Visitline page: loads data, drives the engine in a web worker (protocol in
// wasm/protocol.go), and draws the day plan, the chart and the plan table.
// Plain JavaScript, no framework; nothing here talks to a network.
"use strict";
(function () {
  const $ = (id) => document.getElementById(id);
  const OPEN = 1e14; // window ends at or past this are "no limit" (solver.Horizon/2)

  const state = {
    worker: null,
    ready: false,
    operators: [],
    loadedName: "",
    summary: null,
    run: 0,
    running: false,
    budget: 10,
    plan: null,
    planCSV: "",
    planJSON: "",
    history: [], // [elapsed seconds, cost, feasible]
    lastProgress: null,
    rateWindow: [], // [elapsed, iterations]
    mixAcks: 0,
    pendingExample: null,
    pendingData: null, // what was sent to the engine, until it answers
    data: null, // {name, text} of the loaded data
    restorePlan: null,
    keep: true,
  };

  // ---------- formatting ----------
  function num(v) {
    if (v === null || v === undefined || Number.isNaN(v)) return "–";
    if (v >= OPEN) return "open";
    const r = Math.round(v * 100) / 100;
    return String(r);
  }
  function pad(n) {
    return n < 10 ? "0" + n : String(n);
  }
  // fmtTime is the one place a time is turned into text: clock times for
  // sites files written with them (minutes from midnight of the first day),
  // plain numbers otherwise.
  function fmtTime(v) {
    const s = state.summary;
    if (!s || (s.times !== "clock" && s.times !== "dated")) return num(v);
    if (v === null || v === undefined || Number.isNaN(v)) return "–";
    if (v >= OPEN) return "open";
    const total = Math.round(v * 60);
    const day = Math.floor(total / 86400);
    const sec = total - day * 86400;
    let t = pad(Math.floor(sec / 3600)) + ":" + pad(Math.floor((sec % 3600) / 60));
    if (sec % 60) t += ":" + pad(sec % 60);
    if (day) t += " (+" + day + " d)";
    return t;
  }
  // clockOr prefers the time exactly as the writer wrote it.
  function clockOr(text, v) {
    return text ? text : fmtTime(v);
  }
  function plural(n, one, many) {
    return n + " " + (n === 1 ? one : many);
  }
  function pct(v) {
    return Math.round(v * 1000) / 10 + "%";
  }

  function setStatus(text, kind) {
    const s = $("status");
    s.textContent = text;
    s.dataset.kind = kind || "info";
  }

  // ---------- the worker ----------
  function decodeBase64(text) {
    const clean = text.replace(/\s+/g, "");
    if (typeof Uint8Array.fromBase64 === "function") return Uint8Array.fromBase64(clean);
    const bin = atob(clean);
    const out = new Uint8Array(bin.length);
    for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
    return out;
  }

  // The engine: search workers and a bound worker behind one client
  // (engine-client.js), which finds the inline sources itself.
  function startWorker() {
    try {
      const cores = $("cores");
      state.worker = VisitlineEngine.create({ onMessage: onEngine, cores: cores && cores.value ? Number(cores.value) : undefined });
      if (cores) cores.value = String(state.worker.cores);
    } catch (e) {
      setStatus("The engine could not start in this browser: " + e.message, "error");
    }
  }

  function send(msg) {
    if (!state.worker) return;
    if (msg.type === "start" && $("cores")) msg.cores = Number($("cores").value) || undefined;
    state.worker.send(msg);
  }

  function onEngine(m) {
    switch (m.type) {
      case "ready":
        state.ready = true;
        state.operators = m.operators || [];
        setStatus("Ready. Load sites to begin: open a file, paste, or try the example.");
        document.body.dataset.engine = "ready";
        document.body.dataset.readyMs = String(Math.round(performance.now()));
        startupData();
        break;
      case "loaded":
        onLoaded(m.summary);
        break;
      case "errors":
        onErrors(m.errors || []);
        break;
      case "started":
        onStarted(m);
        break;
      case "plan":
        if (m.run === state.run) onPlan(m);
        break;
      case "progress":
        if (m.run === state.run) onProgress(m);
        break;
      case "mix":
        onMixAck(m);
        break;
      case "finished":
        if (m.run === state.run) onFinished(m);
        break;
      case "export":
        if (m.error) setStatus("No calendar file: " + m.error, "error");
        else download(baseName() + "-plan.ics", "text/calendar", m.text);
        break;
      case "failed":
        setStatus(m.message, "error");
        if (m.fatal) document.body.dataset.engine = "failed";
        break;
    }
  }

  // ---------- loading data ----------
  function readOptions() {
    const endWay = $("route-end").value;
    const o = {
      end: endWay === "site" ? $("end-site").value.trim() : endWay,
      start: $("start-site").value.trim(),
      shift_start: $("shift-start").value.trim(),
      matrix_unit: $("matrix-unit").value,
      speed: Number($("speed").value) || 0,
      road_factor: Number($("road-factor").value) || 0,
      done: $("done-visits").value.split(",").map((x) => x.trim()).filter((x) => x),
      now: $("now").value.trim(),
    };
    return o;
  }
  function applyOptions(o) {
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
    $("done-visits").value = Array.isArray(o.done) ? o.done.join(", ") : (o.done || "");
    $("now").value = o.now || "";
    const any = Object.keys(o).some((k) => o[k] && (!Array.isArray(o[k]) || o[k].length) && !(k === "end" && o[k] === "start") && !(k === "matrix_unit" && o[k] === "minutes"));
    if (any) $("route-box").open = true;
  }

  // currentData gathers what the page holds: the text box, the matrix box
  // and the options.
  function currentData(name) {
    const matrix = $("matrix-input").value;
    return { name: name, text: $("paste-input").value, matrix: matrix,
      matrix_name: matrix.trim() ? state.matrixName || "pasted matrix" : "", options: readOptions() };
  }
  function applyData(d) {
    $("paste-input").value = d.text || "";
    $("matrix-input").value = d.matrix || "";
    state.matrixName = d.matrix_name || "";
    if (d.matrix) $("matrix-box").open = true;
    applyOptions(d.options);
  }

  function loadData(d) {
    if (!state.ready) {
      setStatus("The engine is still starting; try again in a moment.", "error");
      return;
    }
    state.loadedName = d.name;
    state.pendingData = d;
    setStatus("Reading " + d.name + "…");
    send({ type: "load", name: d.name, text: d.text, matrix: d.matrix || "", matrix_name: d.matrix_name || "", options: d.options || {} });
  }
  function loadText(text, name) {
    $("paste-input").value = text;
    loadData(currentData(name));
  }

  async function loadFile(file) {
    if (!file) return;
    if (file.size > 64 * 1024 * 1024) {
      setStatus(file.name + " is larger than 64 MB; this page reads files up to that size.", "error");
      return;
    }
    const text = await file.text();
    // Show what was read, so the user can fix it in place after an error.
    loadText(text, file.name);
  }

  async function loadMatrixFile(file) {
    if (!file) return;
    $("matrix-input").value = await file.text();
    state.matrixName = file.name;
    $("matrix-box").open = true;
    setStatus("Matrix " + file.name + " is ready: open or paste the sites, or read them again.");
    if ($("paste-input").value.trim()) loadData(currentData(state.loadedName || "pasted text"));
  }

  function examples() {
    try {
      return JSON.parse($("examples-data").textContent) || [];
    } catch (e) {
      return [];
    }
  }

  function findExample(key) {
    const list = examples();
    return list.find((e) => e.key === key) || list.find((e) => e.key.split("/")[0] === key) || null;
  }

  function loadExample(key) {
    const ex = findExample(key);
    if (!ex) {
      setStatus("There is no example named " + key + ".", "error");
      return;
    }
    if (!state.ready) {
      state.pendingExample = key;
      return;
    }
    state.pendingExample = null;
    $("example-pick").value = ex.key;
    applyData({ text: ex.text, matrix: ex.matrix || "", matrix_name: ex.matrix_name || "", options: ex.options || {} });
    loadData(currentData(ex.key.split("/").pop()));
  }

  function showExampleAbout() {
    const ex = findExample($("example-pick").value);
    $("example-about").textContent = ex ? ex.about : "";
  }

  function onLoaded(s) {
    state.summary = s;
    state.data = state.pendingData;
    clearPlan();
    const errs = $("errors");
    errs.hidden = true;
    errs.textContent = "";
    const box = $("summary");
    box.textContent = "";
    const h = document.createElement("h3");
    h.textContent = s.name || state.loadedName;
    box.appendChild(h);
    const dl = document.createElement("dl");
    const shape = { closed: "closed: back to the start", open: "open: ends at the last visit", "open-fixed-end": "open: ends at " + s.end };
    const rows = [
      ["Sites to visit", String(s.sites)],
      ["Start", s.start + (s.at ? " (re-planned from " + s.at + " after " + plural(s.done.length, "visit", "visits") + " made)" : "")],
      ["Route", shape[s.shape] || s.shape],
      ["Day", (s.day_start_text || fmtTime(s.day_start)) + " to " + (s.day_end_text || fmtTime(s.day_end)) + (s.times === "minutes" ? " (minutes)" : "")],
      ["Window tightness", tightnessText(s)],
      ["Asymmetry", asymmetryText(s)],
    ];
    if (s.travel) rows.push(["Travel times", s.travel === "benchmark" ? "from the matrix in the file" : "from " + s.travel]);
    for (const [k, v] of rows) {
      const d = document.createElement("div");
      const dt = document.createElement("dt");
      dt.textContent = k;
      const dd = document.createElement("dd");
      dd.textContent = v;
      d.append(dt, dd);
      dl.appendChild(d);
    }
    box.appendChild(dl);
    showWarnings(s.warnings || []);
    $("ics-day-row").hidden = !(s.unit && s.times !== "dated");
    $("start").disabled = false;
    $("share-link").disabled = false;
    setStatus("Loaded " + plural(s.sites, "site", "sites") + " from " + (s.name || state.loadedName) + ". Press Start to search.");
    if (state.restorePlan) {
      const r = state.restorePlan;
      state.restorePlan = null;
      showPlan(r);
      setStatus("Restored your last session: " + (s.name || state.loadedName) + " and its best plan. Press Start to search again.", "done");
    }
    saveSession();
  }

  function showWarnings(list) {
    const box = $("warnings");
    box.textContent = "";
    box.hidden = list.length === 0;
    if (!list.length) return;
    box.appendChild(el("h3", "", list.length === 1 ? "One thing to check" : list.length + " things to check"));
    const ul = el("ul");
    for (const w of list) {
      const li = el("li");
      const where = [];
      if (w.line) where.push("line " + w.line);
      if (w.column) where.push("column " + w.column);
      li.textContent = (where.length ? where.join(", ") + ": " : "") + (w.field ? w.field + ": " : "") + w.message;
      ul.appendChild(li);
    }
    box.appendChild(ul);
    box.appendChild(el("p", "help", "The data was read; these look odd but are allowed."));
  }

  function tightnessText(s) {
    if (s.sites === 0) return "no visits";
    let t = "windows leave " + pct(s.tightness) + " of the day open on average";
    if (s.sites - s.open_windows > 0) t += " (narrowest " + num(s.narrowest_window) + ", widest " + num(s.widest_window) + ")";
    if (s.open_windows) t += "; " + plural(s.open_windows, "visit has", "visits have") + " no closing time";
    return t;
  }
  function asymmetryText(s) {
    if (!s.pairs) return "no travel";
    if (!s.asymmetric_pairs) return "none: every trip takes as long both ways";
    return s.asymmetric_pairs + " of " + s.pairs + " pairs differ by direction, by " + pct(s.asymmetry) + " on average";
  }

  function onErrors(list) {
    state.summary = null;
    showWarnings([]);
    $("start").disabled = true;
    clearPlan();
    $("summary").textContent = "";
    $("summary").appendChild(el("p", "muted", "No sites loaded: the data above has to be fixed first."));
    const box = $("errors");
    box.textContent = "";
    box.hidden = false;
    const h = document.createElement("h3");
    h.textContent = list.length === 1 ? "The data has a problem" : "The data has " + list.length + " problems";
    box.appendChild(h);
    const ul = document.createElement("ul");
    for (const e of list) {
      const li = document.createElement("li");
      const where = [];
      if (e.line) where.push("line " + e.line);
      if (e.column) where.push("column " + e.column);
      const place = where.length ? where.join(", ") : "";
      const what = (e.field ? e.field + ": " : "") + e.message;
      if (e.line) {
        const b = document.createElement("button");
        b.type = "button";
        b.className = "link";
        b.textContent = place.charAt(0).toUpperCase() + place.slice(1);
        b.title = "Show this place in the text box";
        b.addEventListener("click", () => selectPlace(e.line, e.column));
        li.append(b, document.createTextNode(": " + what));
      } else {
        li.textContent = what;
      }
      li.dataset.line = e.line || 0;
      li.dataset.column = e.column || 0;
      ul.appendChild(li);
    }
    box.appendChild(ul);
    const p = document.createElement("p");
    p.className = "help";
    p.textContent = "Your text is kept as it was: fix it in the box and read it again.";
    box.appendChild(p);
    setStatus("The data could not be read (" + plural(list.length, "problem", "problems") + ", listed in “Sites and travel”).", "error");
  }

  // selectPlace puts the caret on line:column of the text box.
  function selectPlace(line, column) {
    const ta = $("paste-input");
    const lines = ta.value.split("\n");
    let pos = 0;
    for (let i = 0; i < line - 1 && i < lines.length; i++) pos += lines[i].length + 1;
    let end = pos + (lines[line - 1] || "").length;
    if (column > 0 && lines[line - 1] !== undefined) {
      // Columns count whitespace-separated fields or CSV fields; find the field.
      const re = /\S+/g;
      let m, k = 0;
      while ((m = re.exec(lines[line - 1]))) {
        k++;
        if (k === column) {
          end = pos + m.index + m[0].length;
          pos = pos + m.index;
          break;
        }
      }
    }
    ta.focus();
    ta.setSelectionRange(pos, end);
  }

  // ---------- search ----------
  function readMix() {
    const mix = {};
    for (const el of document.querySelectorAll("input[data-operator]")) mix[el.dataset.operator] = Number(el.value);
    return mix;
  }

  function start() {
    const budget = Number($("budget").value);
    const seed = Number($("seed").value);
    if (!(budget > 0 && budget <= 3600)) {
      setStatus("Time to search must be a number of seconds above 0 and at most 3600.", "error");
      $("budget").focus();
      return;
    }
    if (!Number.isInteger(seed) || seed < 0) {
      setStatus("The seed must be a whole number, 0 or more.", "error");
      $("seed").focus();
      return;
    }
    const mix = readMix();
    if (!Object.values(mix).some((w) => w > 0)) {
      setStatus("Give at least one way to rework the plan a weight above 0.", "error");
      return;
    }
    state.budget = budget;
    document.body.dataset.run = "starting";
    send({ type: "start", budget: budget, seed: seed, mix: mix, fixed: $("fixed-mix").checked, objective: $("objective").value,
      fewest_late: $("fewest-late").checked, no_bound: !$("with-bound").checked });
  }

  function onStarted(m) {
    state.run = m.run;
    state.running = true;
    state.history = [];
    state.rateWindow = [];
    state.lastProgress = null;
    clearPlan();
    $("start").disabled = true;
    $("stop").disabled = false;
    $("progress").max = m.budget;
    $("progress").value = 0;
    $("rate").textContent = "–";
    $("iterations").textContent = "0";
    $("improvements").textContent = "0";
    $("quality").textContent = "–";
    document.body.dataset.run = "running";
    setStatus("Searching for " + m.budget + " s with seed " + m.seed + "…");
  }

  function onPlan(m) {
    state.history.push([m.plan.seconds_to_best, m.plan.cost, m.plan.feasible]);
    showPlan(m);
    saveSoon();
  }

  function showPlan(m) {
    state.plan = m.plan;
    state.planCSV = m.csv;
    state.planJSON = m.json;
    const p = m.plan;
    const late = p.late ? p.late.length : 0;
    const unit = p.unit === "min" ? " min" : "";
    $("best-cost").textContent = num(p.cost) + unit + (p.feasible ? " · every window met" : " · " + plural(late, "visit", "visits") + " late");
    $("best-cost").dataset.cost = p.cost;
    $("improvements").textContent = String(p.improvements);
    for (const id in exporters) $(id).disabled = false;
    const ics = $("export-ics");
    ics.disabled = !(state.summary && state.summary.unit);
    ics.title = ics.disabled ? "A calendar needs a sites file with clock times; this data has no times of day." : "";
    showWhy(p);
    $("quality").textContent = qualityText(p);
    $("print-title").textContent = (state.data ? state.data.name + " · " : "") + "cost " + num(p.cost) +
      (p.feasible ? ", every window met" : ", " + plural(late, "visit", "visits") + " late") + " · planned " + new Date().toLocaleString("en-GB");
    drawTimeline(p);
    drawTable(p);
    drawChart();
  }

  function qualityText(p) {
    const unit = p.unit === "min" ? " min" : "";
    if (p.proven_optimal) return "proven the best possible" + (typeof p.lower_bound === "number" ? " (no plan can cost less than " + num(p.lower_bound) + unit + ")" : "");
    if (typeof p.gap_bound_pct === "number") return "at most " + (Math.round(p.gap_bound_pct * 100) / 100) + "% above the best possible (no plan can cost less than " + num(p.lower_bound) + unit + ")";
    if (typeof p.lower_bound === "number") return "no plan can cost less than " + num(p.lower_bound) + unit;
    return "–";
  }

  function showWhy(p) {
    const box = $("why");
    box.textContent = "";
    if (p.feasible) {
      box.hidden = true;
      return;
    }
    box.hidden = false;
    const late = p.late || [];
    let t = "No order found meets every window: " + plural(late.length, "visit is", "visits are") + " late (" +
      late.map((l) => l.id + " by " + num(l.by) + (p.unit === "min" ? " min" : "")).join(", ") + "). The plan keeps " +
      (p.late && $("fewest-late").checked ? "the number of late visits" : "the total lateness") + " as small as it could.";
    if (p.reason) t += " " + p.reason;
    box.appendChild(el("p", "", t));
    if (p.conflict && p.conflict.length) box.appendChild(el("p", "", "These visits cannot all be on time together: " + p.conflict.join(", ") + "."));
  }

  function onProgress(m) {
    if (m.explaining) {
      setStatus("The search is over; looking for why the windows cannot all be met (a few seconds)…");
      return;
    }
    state.lastProgress = m;
    $("progress").value = Math.min(m.elapsed, state.budget);
    $("iterations").textContent = m.iterations.toLocaleString("en");
    state.rateWindow.push([m.elapsed, m.iterations]);
    while (state.rateWindow.length > 2 && m.elapsed - state.rateWindow[0][0] > 1) state.rateWindow.shift();
    const [t0, i0] = state.rateWindow[0];
    if (m.elapsed - t0 > 0.05) $("rate").textContent = Math.round((m.iterations - i0) / (m.elapsed - t0)).toLocaleString("en");
    if (m.weights) {
      for (const op in m.weights) {
        const now = $("mix-" + op + "-now");
        if (now) now.textContent = Math.round(m.weights[op] * 100) + "%";
      }
    }
    drawChart();
  }

  function onMixAck(m) {
    const parts = Object.keys(m.mix).map((k) => k + " " + m.mix[k]).join(", ");
    state.mixAcks++;
    $("status").dataset.mixAcks = String(state.mixAcks);
    if (m.running) setStatus("Weights changed at " + m.elapsed.toFixed(1) + " s: " + parts + ". The search goes on.");
    else setStatus("Weights set: " + parts + ". They apply to the next search.");
  }

  function onFinished(m) {
    state.running = false;
    $("start").disabled = !state.summary;
    $("stop").disabled = true;
    document.body.dataset.run = "finished";
    $("status").dataset.why = m.why;
    if (state.plan) {
      state.plan.iterations = m.iterations;
    }
    $("iterations").textContent = (m.iterations || 0).toLocaleString("en");
    if (m.elapsed > 0 && m.iterations) $("rate").textContent = Math.round(m.iterations / m.elapsed).toLocaleString("en");
    if (m.why === "budget") $("progress").value = state.budget;
    const took = " after " + (m.elapsed || 0).toFixed(1) + " s and " + plural(m.iterations || 0, "iteration", "iterations");
    const why = {
      budget: "Finished: the time was used up" + took + ".",
      iterations: "Finished: the iteration limit was reached" + took + ".",
      stopped: "Stopped" + took + ". The best plan found is kept below.",
      complete: "Finished early: nothing was left to search" + took + (state.plan && state.plan.proven_optimal ? "; the plan is proven the best possible." : "."),
      error: "The search failed: " + (m.message || "unknown error"),
    };
    setStatus(why[m.why] || "Finished (" + m.why + ")" + took + ".", m.why === "error" ? "error" : "done");
    drawChart();
    saveSession();
  }

  // ---------- the day plan ----------
  function clearPlan() {
    state.plan = null;
    state.planCSV = state.planJSON = "";
    $("best-cost").textContent = "–";
    delete $("best-cost").dataset.cost;
    for (const id in exporters) $(id).disabled = true;
    $("print-title").textContent = "";
    $("why").hidden = true;
    const tl = $("timeline");
    tl.textContent = "";
    const p = document.createElement("p");
    p.className = "muted";
    p.textContent = "The plan appears here as soon as the search finds one.";
    tl.appendChild(p);
    $("plan-table").tBodies[0].textContent = "";
    $("visit-detail").textContent = "";
    drawChart();
  }

  function planRows(p) {
    const rows = p.schedule.map((v, k) => ({ v: v, order: k, ret: false }));
    if (p.return) rows.push({ v: p.return, order: rows.length, ret: true });
    return rows;
  }

  function niceStep(span, target) {
    const raw = span / Math.max(1, target);
    const pow = Math.pow(10, Math.floor(Math.log10(raw)));
    for (const m of [1, 2, 2.5, 5, 10]) if (m * pow >= raw) return m * pow;
    return 10 * pow;
  }

  function el(tag, cls, text) {
    const e = document.createElement(tag);
    if (cls) e.className = cls;
    if (text !== undefined) e.textContent = text;
    return e;
  }

  function describe(r) {
    const v = r.v;
    if (r.ret) {
      let t = "Back at " + v.id + ": arrive " + clockOr(v.arrival_clock, v.arrival);
      if (v.latest < OPEN) t += ", must be back by " + clockOr(v.latest_clock, v.latest);
      if (v.lateness > 0) t += ", late by " + num(v.lateness);
      return t + ".";
    }
    let t = (r.order === 0 ? "Start at " : "Stop " + r.order + ", site ") + v.id + (v.name ? " (" + v.name + ")" : "") + ": ";
    if (r.order === 0) t += "leave at " + clockOr(v.departure_clock, v.departure);
    else {
      t += "arrive " + clockOr(v.arrival_clock, v.arrival);
      if (v.wait > 0) t += ", wait " + num(v.wait);
      t += ", service " + clockOr(v.start_clock, v.start) + " to " + clockOr(v.departure_clock, v.departure);
    }
    t += "; window " + clockOr(v.earliest_clock, v.earliest) + " to " + clockOr(v.latest_clock, v.latest);
    if (v.lateness > 0) t += "; late by " + num(v.lateness);
    else if (r.order > 0 && v.latest < OPEN) t += "; slack " + num(v.slack);
    return t + ".";
  }

  function drawTimeline(p) {
    const rows = planRows(p);
    const tl = $("timeline");
    let t0 = Infinity, t1 = -Infinity;
    for (const r of rows) {
      const v = r.v;
      t0 = Math.min(t0, v.arrival, v.start);
      t1 = Math.max(t1, v.departure, v.arrival);
      if (v.earliest < OPEN) t0 = Math.min(t0, v.earliest);
      if (v.latest < OPEN) t1 = Math.max(t1, v.latest);
    }
    // Windows that open long before the route starts are clipped at the start.
    t0 = Math.max(t0, Math.min(rows[0].v.start, t1));
    if (!(t1 > t0)) t1 = t0 + 1;
    const span = t1 - t0;
    const x = (t) => (Math.max(t0, Math.min(t1, t)) - t0) / span * 100;
    const place = (node, a, b, minPct) => {
      const left = x(a);
      const w = Math.max(minPct || 0, x(b) - left);
      node.style.left = left + "%";
      node.style.width = w + "%";
      return node;
    };
    const focused = document.activeElement && document.activeElement.closest && document.activeElement.closest("[data-row]");
    const focusRow = focused ? focused.dataset.row : null;
    const frag = document.createDocumentFragment();

    const axis = el("div", "axis");
    axis.setAttribute("aria-hidden", "true");
    axis.appendChild(el("div", "who", "stop · site"));
    const ticks = el("div", "track ticks");
    const clockAxis = state.summary && (state.summary.times === "clock" || state.summary.times === "dated");
    let step = niceStep(span, 6);
    if (clockAxis) step = [5, 10, 15, 20, 30, 60, 120, 180, 240, 360, 720, 1440].find((m) => span / m <= 8) || 1440;
    for (let t = Math.ceil(t0 / step) * step; t <= t1 + 1e-9; t += step) {
      const tk = el("span", "tick", fmtTime(t));
      tk.style.left = x(t) + "%";
      ticks.appendChild(tk);
    }
    axis.appendChild(ticks);
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
      const text = describe(r);
      row.setAttribute("aria-label", text);
      row.dataset.detail = text;
      const who = el("div", "who");
      who.appendChild(el("span", "ord", r.ret ? "↩" : String(r.order)));
      who.appendChild(el("span", "sid", v.id));
      if (v.name) who.appendChild(el("span", "nm", v.name));
      row.appendChild(who);
      const track = el("div", "track");
      const late = v.latest < OPEN ? v.latest : t1;
      const band = place(el("span", "band" + (v.latest >= OPEN ? " open-end" : "")), v.earliest < OPEN ? v.earliest : t0, late, 0.4);
      track.appendChild(band);
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
    tl.appendChild(frag);
    tl.dataset.count = String(p.schedule.length);
    if (focusRow !== null) {
      const again = tl.querySelector('[data-row="' + focusRow + '"]');
      if (again) again.focus({ preventScroll: true });
    }
  }

  function showDetail(ev) {
    const row = ev.target.closest && ev.target.closest(".visit");
    if (row) $("visit-detail").textContent = row.dataset.detail;
  }

  function moveFocus(ev) {
    const row = ev.target.closest && ev.target.closest(".visit");
    if (!row) return;
    let next = null;
    if (ev.key === "ArrowDown") next = row.nextElementSibling;
    else if (ev.key === "ArrowUp") next = row.previousElementSibling;
    else if (ev.key === "Home") next = $("timeline").querySelector(".visit");
    else if (ev.key === "End") next = $("timeline").lastElementChild;
    if (next && next.classList.contains("visit")) {
      ev.preventDefault();
      next.focus();
    }
  }

  function drawTable(p) {
    const body = $("plan-table").tBodies[0];
    const frag = document.createDocumentFragment();
    const rowsAll = planRows(p);
    $("plan-table").classList.toggle("no-names", !rowsAll.some((r) => r.v.name));
    $("units-note").textContent = p.unit === "min" ? "(waits and slack in minutes)" : "";
    for (const r of rowsAll) {
      const v = r.v;
      const tr = document.createElement("tr");
      if (v.lateness > 0) tr.className = "is-late";
      const window = "[" + clockOr(v.earliest_clock, v.earliest) + ", " + clockOr(v.latest_clock, v.latest) + "]";
      let slack = v.latest >= OPEN ? "open" : num(v.slack);
      if (v.lateness > 0) slack = "late by " + num(v.lateness);
      const cells = [r.ret ? "back" : String(r.order), v.id, v.name || "", clockOr(v.arrival_clock, v.arrival), clockOr(v.start_clock, v.start),
        num(v.wait), clockOr(v.departure_clock, v.departure), window, slack];
      cells.forEach((c, i) => {
        const td = document.createElement(i === 1 ? "th" : "td");
        if (i === 1) td.scope = "row";
        if (i === 2) td.className = "name-col";
        td.textContent = c;
        tr.appendChild(td);
      });
      frag.appendChild(tr);
    }
    body.textContent = "";
    body.appendChild(frag);
  }

  // ---------- the chart ----------
  const SVG = "http://www.w3.org/2000/svg";
  function svg(tag, attrs) {
    const e = document.createElementNS(SVG, tag);
    for (const k in attrs) e.setAttribute(k, attrs[k]);
    return e;
  }

  function drawChart() {
    const box = $("chart");
    const W = 320, H = 130, L = 44, R = 8, T = 8, B = 22;
    const s = svg("svg", { viewBox: "0 0 " + W + " " + H, role: "img", class: "chart-svg" });
    const hist = state.history;
    const tEnd = Math.max(state.budget || 1, 0.001);
    const label = hist.length
      ? "Best cost over time: " + num(hist[0][1]) + " at first, " + num(hist[hist.length - 1][1]) + " now, after " + plural(hist.length, "plan", "plans")
      : "Best cost over time: no plan yet";
    s.setAttribute("aria-label", label);
    s.appendChild(svg("rect", { x: L, y: T, width: W - L - R, height: H - T - B, class: "plot" }));
    if (hist.length) {
      let lo = Infinity, hi = -Infinity;
      for (const [, c] of hist) {
        lo = Math.min(lo, c);
        hi = Math.max(hi, c);
      }
      if (hi === lo) {
        hi += 1;
        lo -= 1;
      }
      const now = state.lastProgress ? state.lastProgress.elapsed : hist[hist.length - 1][0];
      const xs = (t) => L + (Math.min(t, tEnd) / tEnd) * (W - L - R);
      const ys = (c) => T + (1 - (c - lo) / (hi - lo)) * (H - T - B);
      let d = "";
      hist.forEach(([t, c], i) => {
        const X = xs(t), Y = ys(c);
        d += i === 0 ? "M" + X + " " + Y : "H" + X + "V" + Y;
      });
      d += "H" + xs(Math.max(now, hist[hist.length - 1][0]));
      s.appendChild(svg("path", { d: d, class: "line" }));
      const last = hist[hist.length - 1];
      s.appendChild(svg("circle", { cx: xs(last[0]), cy: ys(last[1]), r: 3, class: last[2] ? "dot" : "dot late" }));
      const yl = (v, y) => {
        const t = svg("text", { x: L - 4, y: y, class: "ylab" });
        t.textContent = num(v);
        s.appendChild(t);
      };
      yl(hi, T + 8);
      yl(lo, H - B);
    }
    const xl = (txt, x, anchor) => {
      const t = svg("text", { x: x, y: H - 6, class: "xlab", "text-anchor": anchor });
      t.textContent = txt;
      s.appendChild(t);
    };
    xl("0 s", L, "start");
    xl(num(tEnd) + " s", W - R, "end");
    box.textContent = "";
    box.appendChild(s);
  }

  // ---------- exports ----------
  function baseName() {
    const n = state.loadedName || "plan";
    return n.replace(/\.[^.]*$/, "").replace(/[^A-Za-z0-9._-]+/g, "-") || "plan";
  }

  function download(name, type, text) {
    const url = URL.createObjectURL(new Blob([text], { type: type }));
    const a = document.createElement("a");
    a.href = url;
    a.download = name;
    a.hidden = true;
    document.body.appendChild(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 10000);
    setStatus("Saved " + name + " to your downloads.", "done");
  }

  // Each export takes the current best plan; more formats slot in here.
  const exporters = {
    "export-csv": () => download(baseName() + "-plan.csv", "text/csv", state.planCSV),
    "export-json": () => download(baseName() + "-plan.json", "application/json", state.planJSON),
    "export-ics": () => {
      if (!state.plan) return;
      setStatus("Writing the calendar file…");
      send({ type: "export", format: "ics", route: state.plan.route, date: $("ics-date").value, objective: $("objective").value });
    },
    "print-plan": () => window.print(),
  };

  // ---------- keeping the session, and share links ----------
  // The session (data, settings, best plan) is kept in this browser's
  // localStorage only. A share link carries the data and settings in the
  // URL fragment, which browsers never send to a server.
  const STORE = "visitline.session.v1";
  const KEEP = "visitline.keep";
  const MAX_LINK = 64000; // characters; longer links break in mail and chat programs (common practice)

  function mixInputs() {
    return document.querySelectorAll("input[data-operator]");
  }
  function settings() {
    return { budget: $("budget").value, seed: $("seed").value, mix: readMix(), fixed: $("fixed-mix").checked, objective: $("objective").value,
      fewest_late: $("fewest-late").checked, with_bound: $("with-bound").checked };
  }
  function applySettings(st) {
    if (!st) return;
    if (st.budget) $("budget").value = st.budget;
    if (st.seed !== undefined) $("seed").value = st.seed;
    if (st.mix) {
      for (const el of mixInputs()) {
        const w = st.mix[el.dataset.operator];
        if (typeof w === "number") {
          el.value = String(w);
          $(el.id + "-value").textContent = el.value;
        }
      }
    }
    $("fixed-mix").checked = !!st.fixed;
    $("fewest-late").checked = !!st.fewest_late;
    if (st.with_bound !== undefined) $("with-bound").checked = !!st.with_bound;
    if (st.objective) $("objective").value = st.objective;
  }

  let saveTimer = 0;
  function saveSoon() {
    if (!saveTimer) saveTimer = setTimeout(() => { saveTimer = 0; saveSession(); }, 1000);
  }
  function saveSession() {
    if (!state.keep || !state.data) return;
    const s = { data: state.data, settings: settings(), saved: Date.now(),
      plan: state.plan ? { plan: state.plan, csv: state.planCSV, json: state.planJSON } : null };
    try {
      localStorage.setItem(STORE, JSON.stringify(s));
    } catch (e) {
      try {
        s.plan = null;
        localStorage.setItem(STORE, JSON.stringify(s));
      } catch (e2) {
        $("keep-note").textContent = "This data is too large to keep in the browser; it will not come back after a reload.";
      }
    }
  }
  function readSession() {
    try {
      return JSON.parse(localStorage.getItem(STORE) || "null");
    } catch (e) {
      return null;
    }
  }
  function forgetSession() {
    try {
      localStorage.removeItem(STORE);
      localStorage.setItem(KEEP, "no");
    } catch (e) { /* storage off: nothing is kept anyway */ }
    state.keep = false;
    $("keep-session").checked = false;
    setStatus("Forgotten: nothing of this session is kept in this browser. What is on the page stays until you close it.", "done");
  }

  function b64url(bytes) {
    let bin = "";
    for (let i = 0; i < bytes.length; i += 0x8000) bin += String.fromCharCode.apply(null, bytes.subarray(i, i + 0x8000));
    return btoa(bin).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
  }
  function unb64url(text) {
    return decodeBase64(text.replace(/-/g, "+").replace(/_/g, "/") + "===".slice((text.length + 3) % 4));
  }
  async function squeeze(text, way) {
    const stream = new Blob([text]).stream().pipeThrough(way);
    return new Uint8Array(await new Response(stream).arrayBuffer());
  }

  async function makeShareLink() {
    if (!state.data) {
      setStatus("Load data first: the link carries the data.", "error");
      return;
    }
    const d = state.data;
    const payload = JSON.stringify({ v: 1, name: d.name, text: d.text, matrix: d.matrix || "", matrix_name: d.matrix_name || "",
      options: d.options || {}, settings: settings() });
    const packed = b64url(await squeeze(payload, new CompressionStream("deflate-raw")));
    const link = location.href.split("#")[0] + "#data=" + packed;
    const out = $("share-url");
    if (link.length > MAX_LINK) {
      out.hidden = true;
      setStatus("This data is too large for a link (" + link.length.toLocaleString("en") + " characters even compressed; links up to " +
        MAX_LINK.toLocaleString("en") + " travel safely). Send the file itself instead.", "error");
      return;
    }
    out.value = link;
    out.hidden = false;
    out.focus();
    out.select();
    let copied = false;
    try {
      await navigator.clipboard.writeText(link);
      copied = true;
    } catch (e) { /* no clipboard permission: the link is selected for copying */ }
    setStatus("Share link ready (" + link.length.toLocaleString("en") + " characters)" + (copied ? ", copied." : "; copy it from the box.") +
      " The data rides in the part after #, which is never sent to a server.", "done");
  }

  async function readShareLink() {
    const m = location.hash.match(/^#data=([A-Za-z0-9_-]+)$/);
    if (!m) return null;
    try {
      const text = new TextDecoder().decode(await squeeze(unb64url(m[1]), new DecompressionStream("deflate-raw")));
      const obj = JSON.parse(text);
      if (!obj || typeof obj.text !== "string") throw new Error("no data");
      return obj;
    } catch (e) {
      setStatus("This link's data is damaged or cut short, so nothing was loaded from it. Ask for the link again, or for the file.", "error");
      return { damaged: true };
    }
  }

  async function startupData() {
    const shared = await readShareLink();
    if (shared && shared.damaged) return;
    if (shared) {
      applySettings(shared.settings);
      const d = { name: shared.name || "shared data", text: shared.text, matrix: shared.matrix || "", matrix_name: shared.matrix_name || "", options: shared.options || {} };
      applyData(d);
      loadData(d);
      return;
    }
    if (state.pendingExample) {
      loadExample(state.pendingExample);
      return;
    }
    const kept = state.keep ? readSession() : null;
    if (kept && kept.data && typeof kept.data.text === "string") {
      applySettings(kept.settings);
      applyData(kept.data);
      state.restorePlan = kept.plan;
      loadData(kept.data);
    }
  }

  // ---------- wiring ----------
  function wire() {
    $("file-input").addEventListener("change", (ev) => loadFile(ev.target.files[0]));
    $("matrix-file").addEventListener("change", (ev) => loadMatrixFile(ev.target.files[0]));
    const today = new Date();
    $("ics-date").value = today.getFullYear() + "-" + pad(today.getMonth() + 1) + "-" + pad(today.getDate());
    const zone = $("data-panel");
    zone.addEventListener("dragover", (ev) => {
      ev.preventDefault();
      zone.classList.add("dragging");
    });
    zone.addEventListener("dragleave", (ev) => {
      if (!zone.contains(ev.relatedTarget)) zone.classList.remove("dragging");
    });
    zone.addEventListener("drop", (ev) => {
      ev.preventDefault();
      zone.classList.remove("dragging");
      const files = ev.dataTransfer && ev.dataTransfer.files ? [...ev.dataTransfer.files] : [];
      // Two files at once: the one named like a matrix is the matrix.
      const mx = files.length > 1 ? files.find((x) => /travel|matrix|distance|time/i.test(x.name)) : null;
      const f = files.find((x) => x !== mx);
      if (mx && f) {
        loadMatrixFile(mx).then(() => loadFile(f));
      } else if (f) loadFile(f);
      else if (ev.dataTransfer) {
        const t = ev.dataTransfer.getData("text/plain");
        if (t) {
          $("paste-input").value = t;
          loadText(t, "dropped text");
        }
      }
    });
    $("paste-load").addEventListener("click", () => loadText($("paste-input").value, "pasted text"));
    $("example-load").addEventListener("click", () => loadExample($("example-pick").value));
    $("example-pick").addEventListener("change", showExampleAbout);
    $("start").addEventListener("click", start);
    $("stop").addEventListener("click", () => {
      $("stop").disabled = true;
      setStatus("Stopping…");
      send({ type: "stop" });
    });
    for (const input of document.querySelectorAll("input[data-operator]")) {
      const out = $(input.id + "-value");
      input.addEventListener("input", () => {
        out.textContent = input.value;
      });
      input.addEventListener("change", () => {
        out.textContent = input.value;
        const mix = readMix();
        if (!Object.values(mix).some((w) => w > 0)) {
          setStatus("At least one weight must stay above 0.", "error");
          return;
        }
        if (state.running) send({ type: "mix", mix: mix });
      });
    }
    for (const id in exporters) $(id).addEventListener("click", exporters[id]);
    try {
      state.keep = localStorage.getItem(KEEP) !== "no";
    } catch (e) {
      state.keep = false;
    }
    $("keep-session").checked = state.keep;
    $("keep-session").addEventListener("change", (ev) => {
      state.keep = ev.target.checked;
      try {
        localStorage.setItem(KEEP, state.keep ? "yes" : "no");
      } catch (e) { /* storage off */ }
      if (state.keep) saveSession();
      else forgetSession();
    });
    $("forget-session").addEventListener("click", forgetSession);
    $("share-link").addEventListener("click", makeShareLink);
    for (const id of ["budget", "seed", "objective", "fixed-mix", "fewest-late", "with-bound"]) $(id).addEventListener("change", saveSoon);
    for (const el of mixInputs()) el.addEventListener("change", saveSoon);
    const tl = $("timeline");
    tl.addEventListener("focusin", showDetail);
    tl.addEventListener("mouseover", showDetail);
    tl.addEventListener("keydown", moveFocus);
    showExampleAbout();
    drawChart();
    // A share link pasted into the address bar of an open page only
    // changes the fragment: read it then too.
    window.addEventListener("hashchange", () => {
      if (state.ready && location.hash.startsWith("#data=")) startupData();
    });
    const params = new URLSearchParams(location.search);
    if (params.get("example")) state.pendingExample = params.get("example");
    startWorker();
  }

  wire();
})();
