// Visitline page: loads data, drives the engine through engine-client.js
// (protocol in wasm/protocol.go) and draws the day plan. ES modules, no
// framework; for visitline.html the Go side bundles them into one script
// (web/bundle.go). Nothing here talks to a network.

import { $, el, setStatus } from "./dom.mjs";
import { timeModel, costWords, boundWords, boundDetails, duration, longDuration, plural } from "./fmt.mjs";
import { decodeBytes } from "./textin.mjs";
import { readOptions, applyOptions, sameOptions, showSummary, showWarnings, showErrors, hideErrors } from "./input.mjs";
import { timelineDrawing, clearTimeline, wireTimeline } from "./timeline.mjs";
import { tableDrawing, drawTable, clearTable } from "./table.mjs";
import { isFleetPlan, drawFleetTimeline, drawFleetTable, drawUnserved, fleetWords, vehicleColumn } from "./fleet.mjs";
import { drawChart } from "./chart.mjs";
import { baseName, download } from "./exports.mjs";
import { pack, unpack, linkPayload, isShareHash, LinkError, MAX_LINK } from "./share.mjs";
import { KEEP_SENTENCE, keepWanted, setKeep, save, forget, startup, readKept } from "./session.mjs";
import { connectEngine, defaultCores, MAX_CORES } from "./engine.mjs";
import { updateVehicleChoice, chosenVehicle, fileTag, buildTeamPrint, csvForVehicle } from "./team-exports.mjs";
import { wireVehicleEditor, vehiclesText, vehicleProblems, focusFirstProblem, editorSeesSites } from "./vehicle-editor.mjs";

const state = {
  engine: null,
  ready: false,
  summary: null,
  model: timeModel(null),
  run: 0,
  running: false,
  budget: 10,
  plan: null,
  planCSV: "",
  planJSON: "",
  history: [],
  lastProgress: null,
  rateWindow: [],
  mixAcks: 0,
  pendingExample: null,
  pendingData: null, // sent to the engine, until it answers
  loadSeq: 0, // the number of the last load asked for (load_id)
  reading: 0, // the number of the load under way (0: none)
  beforeLoad: null, // the status and Start as they were before the load under way
  pendingStart: null, // a start waiting for the options to be applied
  data: null, // {name, text, matrix, matrix_name, options} read last
  tableAll: false, // a long plan's table shows every row (Show all)
  origin: "", // where the data came from: example, file, paste, link, kept
  exampleKey: "",
  matrixFromExample: false,
  restorePlan: null,
  restoreDraft: null,
  link: null, // payload of the share link this tab opened
  notes: [],
};

const store = (() => {
  try {
    return window.sessionStorage;
  } catch (e) {
    return null;
  }
})();
const noStore = { getItem: () => null, setItem: () => { throw new Error("off"); }, removeItem: () => {} };
const storage = store || noStore;

// ---------- the engine ----------
function onEngine(m) {
  switch (m.type) {
    case "ready":
      state.ready = true;
      setStatus("Ready. Load sites: open a file, paste, or try an example.");
      document.body.dataset.engine = "ready";
      document.body.dataset.readyMs = String(Math.round(performance.now()));
      startupData();
      break;
    case "reading":
      if (readingNow(m)) onReading(m);
      break;
    case "load_cancelled":
      break; // the page went back when Cancel was pressed
    case "loaded":
      if (!readingNow(m)) break;
      endReading();
      if (typeof m.memory_mb === "number") document.body.dataset.loadedMb = String(m.memory_mb); // the worker's memory, for measurements
      onLoaded(m.summary);
      break;
    case "errors":
      if (!readingNow(m)) break;
      endReading();
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
      if (m.format === "csv") {
        if (m.error) setStatus("No CSV file: " + m.error, "error");
        else saved(baseName(state.data && state.data.name) + "-plan.csv", "text/csv", m.text);
      } else if (m.error) setStatus("No calendar file: " + m.error, "error");
      else saved(baseName(state.data && state.data.name) + "-plan" + (state.exportTag || "") + ".ics", "text/calendar", m.text);
      break;
    case "failed":
      setStatus(m.message, "error");
      if (m.fatal) document.body.dataset.engine = "failed";
      if (state.pendingStart) state.pendingStart = null;
      break;
  }
}

function send(msg) {
  if (state.engine) state.engine.send(msg);
}

// ---------- data in ----------
function firstLine(text) {
  return (text || "").split("\n").map((l) => l.trim()).find((l) => l && !l.startsWith("#")) || "";
}

function currentData(name) {
  const matrix = $("matrix-input").value;
  const vehicles = $("vehicles-input").value;
  return { name: name, text: $("paste-input").value, matrix: matrix,
    matrix_name: matrix.trim() ? state.matrixName || "pasted matrix" : "", options: readOptions(),
    vehicles: vehicles, vehicles_name: vehicles.trim() ? state.vehiclesName || "pasted vehicles" : "", fleet: vehicles.trim() ? 0 : readFleetSize() };
}

// readFleetSize is the number of like vehicles asked for (0: none).
function readFleetSize() {
  const n = Number($("fleet-size").value);
  return Number.isInteger(n) && n > 0 ? n : 0;
}

function applyData(d) {
  $("paste-input").value = d.text || "";
  $("matrix-input").value = d.matrix || "";
  state.matrixName = d.matrix_name || "";
  $("matrix-box").open = !!d.matrix;
  vehiclesText(d.vehicles);
  state.vehiclesName = d.vehicles_name || "";
  if (!(d.vehicles || "").trim()) $("fleet-size").value = d.fleet ? String(d.fleet) : "";
  if (d.vehicles || d.fleet) $("team-box").open = true;
  applyOptions(d.options);
}

// ownData is called when the user brings sites of their own: a matrix the
// last example put in the box no longer belongs to them, and the
// example's description goes.
function ownData(text) {
  state.notes = [];
  if (state.matrixFromExample && firstLine(text) !== firstLine(state.exampleText)) {
    $("matrix-input").value = "";
    state.matrixName = "";
    state.notes.push("The example's travel matrix was cleared: these are new sites.");
  }
  state.matrixFromExample = false;
  state.exampleKey = "";
  $("example-about").hidden = true;
}

function loadData(d, origin) {
  if (!state.ready) {
    setStatus("The engine is still starting; try again in a moment.", "error");
    return;
  }
  if (state.reading) {
    // A new load replaces the one under way: that one is given up.
    send({ type: "cancel_load", load_id: state.reading });
  } else {
    const s = $("status");
    state.beforeLoad = { text: s.textContent, kind: s.dataset.kind, start: $("start").disabled };
  }
  const id = ++state.loadSeq;
  state.pendingData = Object.assign({}, d, { origin: origin, load_id: id });
  state.reading = id;
  $("start").disabled = true;
  setStatus("Reading " + d.name + "…");
  document.body.dataset.reading = "0";
  $("cancel-load").hidden = false;
  send({ type: "load", load_id: id, name: d.name, text: d.text, matrix: d.matrix || "", matrix_name: d.matrix_name || "", options: d.options || {},
    vehicles: d.vehicles || "", vehicles_name: d.vehicles_name || "", fleet: d.fleet || 0 });
}

// readingNow says whether an answer of the engine is to the load under
// way (answers to a load given up, or to an earlier one, are dropped).
function readingNow(m) {
  return !!state.reading && (!m.load_id || m.load_id === state.reading);
}

function onReading(m) {
  const d = state.pendingData;
  const f = m.total > 0 ? Math.min(1, m.done / m.total) : 0;
  document.body.dataset.reading = String(f);
  const mb = (b) => (b / 1048576).toLocaleString(undefined, { maximumFractionDigits: 1 });
  setStatus("Reading " + d.name + "… " + (m.total > 0 ? Math.floor(100 * f) + " % of " + mb(m.total) + " MB" : mb(m.done) + " MB") +
    ". Cancel gives up reading it and keeps your text.");
}

function endReading() {
  state.reading = 0;
  $("cancel-load").hidden = true;
  delete document.body.dataset.reading;
  state.beforeLoad = null;
}

// cancelLoad gives up the load under way: the engine keeps the data it
// had, and the page goes back to how it was, the text boxes as they are.
function cancelLoad() {
  const d = state.pendingData;
  if (!state.reading || !d) return;
  send({ type: "cancel_load", load_id: state.reading });
  state.pendingData = null;
  state.pendingStart = null;
  const before = state.beforeLoad;
  endReading();
  if (before) $("start").disabled = before.start;
  setStatus("Stopped reading " + d.name + ". " + (state.data ? "The data read before, " + state.data.name + ", is still loaded" : "Nothing is loaded") +
    "; the text box keeps your text as it is.", "done");
}

async function loadFile(file) {
  if (!file) return;
  if (file.size > 64 * 1024 * 1024) {
    setStatus(file.name + " is larger than 64 MB; this page reads files up to that size.", "error");
    return;
  }
  const read = decodeBytes(new Uint8Array(await file.arrayBuffer()));
  $("paste-input").value = read.text;
  ownData(read.text);
  if (read.note) state.notes.push(file.name + ": " + read.note);
  loadData(currentData(file.name), "file");
}

async function loadMatrixFile(file) {
  if (!file) return;
  const read = decodeBytes(new Uint8Array(await file.arrayBuffer()));
  $("matrix-input").value = read.text;
  state.matrixName = file.name;
  state.matrixFromExample = false;
  $("matrix-box").open = true;
  setStatus("Matrix " + file.name + " is ready: open or paste the sites, or read them again.");
  if ($("paste-input").value.trim()) loadData(currentData(state.data ? state.data.name : "pasted text"), state.origin || "paste");
}

async function loadVehiclesFile(file) {
  if (!file) return;
  const read = decodeBytes(new Uint8Array(await file.arrayBuffer()));
  vehiclesText(read.text);
  state.vehiclesName = file.name;
  $("team-box").open = true;
  setStatus("Vehicles " + file.name + " are ready: open or paste the sites, or read them again.");
  if ($("paste-input").value.trim()) loadData(currentData(state.data ? state.data.name : "pasted text"), state.origin || "paste");
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
  state.notes = [];
  $("example-pick").value = ex.key;
  applyData({ text: ex.text, matrix: ex.matrix || "", matrix_name: ex.matrix_name || "", options: ex.options || {} });
  state.matrixFromExample = !!ex.matrix;
  state.exampleText = ex.text;
  state.exampleKey = ex.key;
  showExampleAbout();
  loadData(currentData(ex.key.split("/").pop()), "example");
}

function showExampleAbout() {
  const ex = findExample($("example-pick").value);
  $("example-about").textContent = ex ? ex.about : "";
  $("example-about").hidden = !ex || (state.data !== null && state.origin !== "example");
}

function onLoaded(s) {
  state.summary = s;
  state.model = timeModel(s);
  state.tableAll = false;
  state.data = state.pendingData;
  state.origin = state.data.origin || "paste";
  if (state.origin === "example") $("example-about").hidden = false;
  clearPlan();
  hideErrors();
  showSummary(s, state.data.name);
  showWarnings(s.warnings || [], state.data.matrix_name, state.notes);
  $("ics-day-row").hidden = !(s.unit && s.times !== "dated");
  $("start").disabled = false;
  $("share-link").disabled = false;
  document.body.dataset.loaded = "yes";
  editorSeesSites();
  if (s.fleet) showTeam(s.fleet, state.model);
  if (state.pendingStart) {
    const st = state.pendingStart;
    state.pendingStart = null;
    send(st);
    return;
  }
  // A team's day shows its section open, "fewest vehicles" in view.
  if (s.fleet) $("team-box").open = true;
  setStatus("Loaded " + plural(s.sites, "visit", "visits") + (s.fleet ? " and " + plural(s.fleet.vehicles.length, "vehicle", "vehicles") : "") +
    " from " + (s.name || state.data.name) + ". Press Start to search.");
  if (state.restorePlan) {
    const r = state.restorePlan;
    state.restorePlan = null;
    if (planFits(r.plan, s)) {
      showPlan(r);
      drawNow();
      setStatus(r.from === "link"
        ? "Opened the shared plan of " + (s.name || state.data.name) + ". Press Start to search on from the same data."
        : "Back from this tab's kept session: " + (s.name || state.data.name) + " and its best plan. Press Start to search again.", "done");
    }
  }
  if (state.restoreDraft) {
    const d = state.restoreDraft;
    state.restoreDraft = null;
    if (d.text !== undefined && d.text !== state.data.text) {
      $("paste-input").value = d.text;
      showWarnings(s.warnings || [], state.data.matrix_name, ["The text box holds your text as you left it; it was not read yet. Read it to use it."]);
    }
    if (d.matrix !== undefined) $("matrix-input").value = d.matrix;
    if (d.vehicles !== undefined && d.vehicles !== (state.data.vehicles || "")) vehiclesText(d.vehicles);
  }
  saveSession();
}

// showTeam adds the vehicles to the data's summary: each with its shift
// and capacity.
function showTeam(f, model) {
  const dl = $("summary").querySelector("dl");
  if (!dl) return;
  const d = el("div", "team-row");
  const list = f.vehicles.map((v) => v.id + (v.name ? " " + v.name : "") + " " + (model.clock ? v.shift_start_text + "–" + v.shift_end_text : v.shift_start + "–" + v.shift_end) +
    (v.capacity !== undefined ? ", holds " + v.capacity : ""));
  d.append(el("dt", "", "Vehicles"), el("dd", "", list.join("; ")));
  d.dataset.testid = "team-summary";
  dl.appendChild(d);
}

// planFits: a plan from a link or a kept session goes with this data.
function planFits(p, s) {
  if (isFleetPlan(p)) return !!s.fleet && p.routes.every((r) => Array.isArray(r.schedule) && r.schedule.length === r.visits.length && s.fleet.vehicles.some((v) => v.id === r.vehicle));
  return p && Array.isArray(p.route) && Array.isArray(p.schedule) && p.schedule.length === p.route.length && p.route.length <= s.nodes;
}

function onErrors(list) {
  state.pendingStart = null;
  state.summary = null;
  state.data = null;
  showWarnings([], "", state.notes);
  $("start").disabled = true;
  clearPlan();
  $("summary").textContent = "";
  $("summary").appendChild(el("p", "muted", "No sites loaded: the data has to be fixed first."));
  const d = state.pendingData || {};
  showErrors(list, d.matrix_name);
  setStatus("The data could not be read (" + plural(list.length, "problem", "problems") + ", listed under the data).", "error");
  saveSession();
}

// ---------- the search ----------
function mixInputs() {
  return document.querySelectorAll("input[data-operator]");
}
function readMix() {
  const mix = {};
  for (const e of mixInputs()) mix[e.dataset.operator] = Number(e.value);
  return mix;
}

function readCores() {
  const n = Number($("cores").value);
  return Number.isInteger(n) && n >= 1 && n <= MAX_CORES ? n : 0;
}

// start applies the settings as they are now: if the route or travel
// options changed since the data was read, the data is read again with
// them first (the text as it was read, not the box), then the search
// starts.
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
    openExperts();
    $("seed").focus();
    return;
  }
  const cores = readCores();
  if (!cores) {
    setStatus("Cores must be a whole number from 1 to " + MAX_CORES + ".", "error");
    openExperts();
    $("cores").focus();
    return;
  }
  const mix = readMix();
  if (!Object.values(mix).some((w) => w > 0)) {
    setStatus("Give at least one way to rework the plan a weight above 0.", "error");
    openExperts();
    return;
  }
  const vp = vehicleProblems();
  if (vp.length) {
    setStatus(vp[0].message + (vp.length > 1 ? " (" + plural(vp.length - 1, "more problem", "more problems") + " under the vehicles)" : ""), "error");
    focusFirstProblem();
    return;
  }
  if (state.engine && state.engine.setCores) state.engine.setCores(cores);
  state.budget = budget;
  document.body.dataset.run = "starting";
  const msg = { type: "start", budget: budget, seed: seed, mix: mix, fixed: $("fixed-mix").checked, objective: $("objective").value,
    fewest_late: $("fewest-late").checked, no_bound: !$("with-bound").checked, cores: cores, minimize: $("fewest-vehicles").checked ? "vehicles" : "" };
  const opts = readOptions();
  // The vehicles as the box and the editor have them now.
  const cur = currentData("");
  const team = { vehicles: cur.vehicles, vehicles_name: cur.vehicles_name, fleet: cur.fleet };
  const teamChanged = state.data && (team.vehicles !== (state.data.vehicles || "") || team.fleet !== (state.data.fleet || 0));
  if (state.data && (!sameOptions(opts, state.data.options) || teamChanged)) {
    state.pendingStart = msg;
    loadData(Object.assign({}, state.data, { options: opts }, team), state.origin);
    return;
  }
  send(msg);
}

function openExperts() {
  $("experts").open = true;
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
  document.body.dataset.run = "running";
  setStatus("Searching for " + m.budget + " s…");
}

function onPlan(m) {
  state.history.push([m.plan.seconds_to_best, m.plan.cost, m.plan.feasible]);
  showPlan(m);
  saveSoon();
}

function showPlan(m) {
  state.plan = m.plan;
  state.planCSV = m.csv || "";
  // The worker's JSON export when it sent one; else written when asked for.
  state.planJSON = m.json || "";
  const p = m.plan;
  const model = state.model;
  const late = p.late ? p.late.length : 0;
  const fleet = isFleetPlan(p);
  $("best-cost").textContent = fleet ? fleetWords(p, model) : costWords(p, model) + (p.feasible ? " · every window met" : " · " + plural(late, "visit", "visits") + " late");
  $("best-cost").dataset.cost = p.cost;
  $("improvements").textContent = String(p.improvements || 0);
  for (const id in exporters) $(id).disabled = false;
  // A large day's plans come without the CSV export: it is asked of the
  // engine when wanted.
  $("export-csv").disabled = !state.planCSV && fleet;
  const ics = $("export-ics");
  ics.disabled = !(state.summary && state.summary.unit);
  ics.title = ics.disabled ? "A calendar needs a sites file with clock times; this data has no times of day." : fleet ? "A calendar for the vehicle chosen beside, or for the team: each event names its vehicle first." : "";
  if (fleet) $("why").hidden = true;
  else showWhy(p);
  drawUnserved(p);
  updateVehicleChoice(p);
  $("quality").textContent = boundWords(p);
  $("quality").dataset.proven = p.proven_optimal ? "yes" : "no";
  $("bound-details").textContent = boundDetails(p, model);
  $("print-title").textContent = (state.data ? state.data.name + " · " : "") + (fleet ? fleetWords(p, model) : costWords(p, model)) +
    (fleet ? "" : p.feasible ? ", every window met" : ", " + plural(late, "visit", "visits") + " late") + " · planned " + new Date().toLocaleString();
  drawSoon();
}

// drawSoon draws the best plan soon: plans that arrive faster than the
// page can draw them are skipped, not queued.
// A timer, not an animation frame: frames do not come to a tab in the
// background, and the plan must be there when the user comes back.
// The wait grows with the drawing's own time (twice the last one).
let drawTimer = 0;
let lastDrawMs = 0;
function drawSoon() {
  if (!drawTimer) drawTimer = setTimeout(drawNow, Math.max(30, 2 * lastDrawMs));
}

// A plan is drawn in slices of a few milliseconds, each a task of its own
// (a MessageChannel message: not slowed in a background tab, as timers
// are), so that clicks, weight changes and the engine's messages get in
// between; the rows are built off the page and put on it at once at the
// end, without any forced layout. A newer plan or a new run cancels the
// drawing under way. body[data-drawing] is set while one is under way.
const SLICE_MS = 8;
let drawing = null;
const slices = typeof MessageChannel === "function" ? new MessageChannel() : null;
if (slices) slices.port1.onmessage = () => { if (drawing) drawing.next(); };
function later() {
  if (slices) slices.port2.postMessage(0);
  else setTimeout(() => { if (drawing) drawing.next(); }, 0);
}

function cancelDrawing() {
  if (!drawing) return;
  drawing = null;
  delete document.body.dataset.drawing;
}

function drawNow() {
  clearTimeout(drawTimer);
  drawTimer = 0;
  cancelDrawing();
  if (!state.plan) return;
  const plan = state.plan;
  const model = state.model;
  const fleet = isFleetPlan(plan);
  const t0 = performance.now();
  let busy = 0;
  let parts = null; // the timeline's and the table's drawings, one vehicle
  let stage = 0;
  const job = {
    next() {
      if (drawing !== job) return;
      const a = performance.now();
      const deadline = a + SLICE_MS;
      let done = false;
      if (fleet) {
        // A team's day: its lanes and table in one task.
        drawFleetTimeline(plan, model);
        drawFleetTable(plan, model);
        done = true;
      } else {
        if (!parts) parts = [timelineDrawing(plan, model), tableDrawing(plan, model, state.tableAll)];
        while (stage < 2 && performance.now() < deadline && parts[stage].step(deadline)) stage++;
        if (stage === 2) {
          vehicleColumn(false);
          parts[0].commit();
          parts[1].commit();
          done = true;
        }
      }
      busy += performance.now() - a;
      if (!done) {
        later();
        return;
      }
      drawing = null;
      delete document.body.dataset.drawing;
      state.drawnPlan = plan;
      chart();
      const total = performance.now() - t0;
      lastDrawMs = Math.min(2000, busy);
      $("timeline").dataset.drawMs = String(Math.round(total * 10) / 10);
      $("plan-table").dataset.drawMs = String(Math.round(total));
      // The engine client sends the next plan no sooner than the page can
      // draw it.
      if (state.engine && state.engine.planDrawn) state.engine.planDrawn(total);
    },
  };
  job.plan = plan;
  drawing = job;
  document.body.dataset.drawing = "yes";
  later();
}

function chart() {
  drawChart(state.history, state.budget, state.lastProgress ? state.lastProgress.elapsed : 0, state.model, state.plan && state.plan.objective === "completion");
}

const WHY_NAMES = 12;

function showWhy(p) {
  const box = $("why");
  box.textContent = "";
  if (p.feasible) {
    box.hidden = true;
    return;
  }
  box.hidden = false;
  const late = p.late || [];
  // The first dozen by name; a list of hundreds buries the sentence (the
  // timeline, the table and the exports mark every late visit).
  const named = late.slice(0, WHY_NAMES).map((l) => l.id + " by " + duration(l.by, state.model, "ceil"));
  if (late.length > WHY_NAMES) named.push("and " + (late.length - WHY_NAMES).toLocaleString() + " more, marked in the plan");
  let t = "No order found meets every window: " + plural(late.length, "visit is", "visits are") + " late (" +
    named.join(", ") + "). The plan keeps " +
    ($("fewest-late").checked ? "the number of late visits" : "the total lateness") + " as small as it could.";
  if (p.reason) t += " " + p.reason;
  box.appendChild(el("p", "", t));
  if (p.conflict && p.conflict.length) {
    const c = p.conflict.slice(0, WHY_NAMES);
    if (p.conflict.length > WHY_NAMES) c.push("and " + (p.conflict.length - WHY_NAMES).toLocaleString() + " more");
    box.appendChild(el("p", "", "These visits cannot all be on time together: " + c.join(", ") + "."));
  }
}

function onProgress(m) {
  if (m.explaining) {
    setStatus("The search is over; looking for why the windows cannot all be met (a few seconds)…");
    return;
  }
  state.lastProgress = m;
  if (typeof m.vehicles_used === "number") {
    setStatus("Searching a team's day: so far " + plural(m.vehicles_used, "vehicle", "vehicles") + ", " + longDuration(m.best_cost, state.model) + ($("objective").value === "completion" ? " of completions" : " driving") +
      (m.unserved_priority ? ", some visits not yet served" : ", every visit served") + ".");
  }
  $("progress").value = Math.min(m.elapsed, state.budget);
  $("iterations").textContent = m.iterations.toLocaleString();
  state.rateWindow.push([m.elapsed, m.iterations]);
  while (state.rateWindow.length > 2 && m.elapsed - state.rateWindow[0][0] > 1) state.rateWindow.shift();
  const [t0, i0] = state.rateWindow[0];
  if (m.elapsed - t0 > 0.05) $("rate").textContent = Math.round((m.iterations - i0) / (m.elapsed - t0)).toLocaleString();
  if (m.weights) {
    for (const op in m.weights) {
      const now = $("mix-" + op + "-now");
      if (now) now.textContent = Math.round(m.weights[op] * 100) + " %";
    }
  }
  chart();
}

function onMixAck(m) {
  const parts = Object.keys(m.mix).map((k) => k + " " + m.mix[k]).join(", ");
  state.mixAcks++;
  $("status").dataset.mixAcks = String(state.mixAcks);
  if (m.running) setStatus("Weights changed at " + m.elapsed.toFixed(1) + " s: " + parts + ". The search goes on.");
  else setStatus("Weights set: " + parts + ". They apply to the next search.");
}

// onFinished says so at once; the last plan is drawn after, in slices.
function onFinished(m) {
  state.running = false;
  $("start").disabled = !state.summary;
  $("stop").disabled = true;
  document.body.dataset.run = "finished";
  $("status").dataset.why = m.why;
  if (state.plan) state.plan.iterations = m.iterations;
  $("iterations").textContent = (m.iterations || 0).toLocaleString();
  if (m.elapsed > 0 && m.iterations) $("rate").textContent = Math.round(m.iterations / m.elapsed).toLocaleString();
  if (m.why === "budget") $("progress").value = state.budget;
  const took = " after " + (m.elapsed || 0).toFixed(1) + " s and " + plural(m.iterations || 0, "iteration", "iterations");
  const why = {
    budget: "Finished: the time was used up" + took + ".",
    iterations: "Finished: the iteration limit was reached" + took + ".",
    stopped: "Stopped" + took + ". The best plan found is kept.",
    complete: "Finished early: nothing was left to search" + took + (state.plan && state.plan.proven_optimal ? "; the plan is proven best." : "."),
    error: "The search failed: " + (m.message || "unknown error"),
  };
  // The budget was too short for a searched plan: say so beside the reason.
  setStatus((why[m.why] || "Finished" + took + ".") + (m.note && m.why !== "error" ? " " + m.note : ""), m.why === "error" ? "error" : "done");
  // The last plan, unless it is the one on the page or being drawn: at
  // thousands of visits a drawing keeps the page busy for a while.
  if (state.plan && state.plan === state.drawnPlan && !drawing) {
    clearTimeout(drawTimer);
    drawTimer = 0;
    chart();
  } else if (!(drawing && drawing.plan === state.plan)) {
    drawNow();
  }
  if (!state.plan) chart();
  setTimeout(saveSession, 0);
}

function clearPlan() {
  cancelDrawing();
  clearTimeout(drawTimer);
  drawTimer = 0;
  state.plan = null;
  state.drawnPlan = null;
  state.planCSV = state.planJSON = "";
  $("best-cost").textContent = "–";
  delete $("best-cost").dataset.cost;
  $("quality").textContent = "–";
  $("bound-details").textContent = "";
  for (const id in exporters) $(id).disabled = true;
  $("print-title").textContent = "";
  $("why").hidden = true;
  drawUnserved(null);
  updateVehicleChoice(null);
  clearTimeline();
  clearTable();
  vehicleColumn(false);
  chart();
}

// ---------- exports ----------
// planJSON is the plan's JSON export: the worker's own, or the plan as the
// page holds it (the bound's figures merged in).
function planJSON() {
  if (state.planJSON) return state.planJSON;
  return state.plan ? JSON.stringify(state.plan, null, 2) + "\n" : "";
}

function saved(name, type, text) {
  download(name, type, text);
  setStatus("Saved " + name + " to your downloads.", "done");
}

const exporters = {
  "export-csv": () => {
    if (!state.planCSV && state.plan && !isFleetPlan(state.plan)) {
      setStatus("Writing the CSV file…");
      send({ type: "export", format: "csv", route: state.plan.route, objective: state.plan.objective || $("objective").value });
      return;
    }
    // A team's day: the vehicle chosen beside the buttons alone, or all.
    const v = state.plan ? chosenVehicle(state.plan) : "";
    saved(baseName(state.data && state.data.name) + "-plan" + fileTag(v) + ".csv", "text/csv", v ? csvForVehicle(state.planCSV, v) : state.planCSV);
  },
  "export-json": () => saved(baseName(state.data && state.data.name) + "-plan.json", "application/json", planJSON()),
  "export-ics": () => {
    if (!state.plan) return;
    setStatus("Writing the calendar file…");
    const p = state.plan;
    const m = { type: "export", format: "ics", date: $("ics-date").value, objective: p.objective || $("objective").value };
    state.exportTag = "";
    if (isFleetPlan(p)) {
      m.routes = p.routes.map((r) => ({ vehicle: r.vehicle, visits: r.visits }));
      const v = chosenVehicle(p);
      if (v) m.vehicle = v;
      state.exportTag = fileTag(v);
    } else m.route = p.route;
    send(m);
  },
  "print-plan": () => {
    printPages();
    window.print();
  },
};

// printPages readies the printed pages: a team's day prints a page per
// vehicle (or the one chosen).
function printPages() {
  // The printed sheet has every row.
  if (state.plan && !isFleetPlan(state.plan) && document.querySelector("[data-testid=table-all]")) drawTable(state.plan, state.model, true);
  if (state.plan) buildTeamPrint(state.plan, state.model, chosenVehicle(state.plan), (state.data ? state.data.name + " · " : "") + "printed " + new Date().toLocaleString());
}

// ---------- session and share link ----------
function settings() {
  return { budget: $("budget").value, seed: $("seed").value, mix: readMix(), fixed: $("fixed-mix").checked, objective: $("objective").value,
    fewest_late: $("fewest-late").checked, with_bound: $("with-bound").checked, cores: $("cores").value,
    fewest_vehicles: $("fewest-vehicles").checked };
}

function applySettings(st) {
  if (!st) return;
  const str = (v) => (typeof v === "string" || typeof v === "number" ? String(v) : "");
  if (str(st.budget)) $("budget").value = str(st.budget);
  if (str(st.seed)) $("seed").value = str(st.seed);
  if (str(st.cores)) $("cores").value = str(st.cores);
  if (st.mix && typeof st.mix === "object") {
    for (const e of mixInputs()) {
      const w = st.mix[e.dataset.operator];
      if (typeof w === "number") {
        e.value = String(w);
        $(e.id + "-value").textContent = e.value;
      }
    }
  }
  $("fixed-mix").checked = !!st.fixed;
  $("fewest-late").checked = !!st.fewest_late;
  if (st.with_bound !== undefined) $("with-bound").checked = !!st.with_bound;
  if (st.fewest_vehicles !== undefined) $("fewest-vehicles").checked = !!st.fewest_vehicles;
  if (st.objective === "travel" || st.objective === "completion") $("objective").value = st.objective;
}

function snapshot() {
  return { data: state.data ? { name: state.data.name, text: state.data.text, matrix: state.data.matrix, matrix_name: state.data.matrix_name, options: state.data.options,
    vehicles: state.data.vehicles, vehicles_name: state.data.vehicles_name, fleet: state.data.fleet } : null,
    origin: state.origin, draft: { text: $("paste-input").value, matrix: $("matrix-input").value, vehicles: $("vehicles-input").value }, options: readOptions(), settings: settings(),
    plan: state.plan ? { plan: state.plan, csv: state.planCSV, json: planJSON() } : null, saved: Date.now() };
}

let saveTimer = 0;
function saveSoon() {
  if (!saveTimer) saveTimer = setTimeout(() => { saveTimer = 0; saveSession(); }, 800);
}
function saveSession() {
  if (!state.link && !keepWanted(storage)) return;
  const snap = snapshot();
  if (!snap.data && !state.link) {
    // Nothing read yet: keep what is typed.
  }
  if (!save(storage, snap, state.link)) $("keep-note").textContent = "This data is too large to keep in the tab; it will not come back after a reload.";
}

function restore(snap, from) {
  applySettings(snap.settings);
  if (snap.data) {
    applyData(snap.data);
    if (snap.options) applyOptions(snap.options);
    state.restorePlan = snap.plan ? Object.assign({ from: from }, snap.plan) : null;
    state.restoreDraft = snap.draft || null;
    loadData(snap.data, snap.origin || from);
  } else if (snap.draft) {
    $("paste-input").value = snap.draft.text || "";
    $("matrix-input").value = snap.draft.matrix || "";
    vehiclesText(snap.draft.vehicles || "");
    if (snap.options) applyOptions(snap.options);
    setStatus("The text box holds your text as you left it; it was not read yet.");
  }
}

async function makeShareLink() {
  if (!state.data) {
    setStatus("Load data first: the link carries the data.", "error");
    return;
  }
  const d = state.data;
  const base = { v: 2, name: d.name, text: d.text, matrix: d.matrix || "", matrix_name: d.matrix_name || "", options: d.options || {}, settings: settings(),
    vehicles: d.vehicles || "", vehicles_name: d.vehicles_name || "", fleet: d.fleet || 0 };
  const head = location.href.split("#")[0] + "#data=";
  let link = state.plan ? head + (await pack(Object.assign({ plan: state.plan, csv: state.planCSV }, base))) : "";
  let withPlan = !!state.plan;
  if (!link || link.length > MAX_LINK) {
    link = head + (await pack(base));
    withPlan = false;
  }
  const out = $("share-url");
  if (link.length > MAX_LINK) {
    out.hidden = true;
    setStatus("This data is too large for a link (" + link.length.toLocaleString() + " characters even compressed; links up to " +
      MAX_LINK.toLocaleString() + " travel safely). Send the file itself instead.", "error");
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
  setStatus("Share link ready (" + link.length.toLocaleString() + " characters, " + (withPlan ? "with the plan" : state.plan ? "the data only: with the plan it would be too long" : "the data; no plan yet") + ")" +
    (copied ? ", copied." : "; copy it from the box.") + " The data rides in the part after #, which is never sent to a server.", "done");
}

async function startupData() {
  const payload = isShareHash(location.hash) ? linkPayload(decodeURIComponent(location.hash)) : null;
  if (isShareHash(location.hash) && payload === null) {
    setStatus("This link is damaged, so nothing was loaded from it. Ask for the link again, or for the file.", "error");
    return;
  }
  const how = startup(storage, { payload: payload, example: state.pendingExample });
  if (how.what === "link" || how.what === "link-copy") {
    state.link = payload;
    if (how.keptAside) {
      $("keep-note").textContent = "This tab's kept session is left as it was; this link's data is shown instead. ";
      const b = el("button", "link", "Open the kept session");
      b.type = "button";
      b.id = "open-kept";
      b.dataset.testid = "open-kept";
      b.addEventListener("click", openKept);
      $("keep-note").appendChild(b);
    }
    if (how.what === "link-copy") {
      restore(how.snap, "link");
      return;
    }
    try {
      const shared = await unpack(payload);
      applySettings(shared.settings);
      const d = { name: shared.name, text: shared.text, matrix: shared.matrix, matrix_name: shared.matrix_name, options: shared.options,
        vehicles: shared.vehicles, vehicles_name: shared.vehicles_name, fleet: shared.fleet };
      applyData(d);
      if (shared.plan) state.restorePlan = { from: "link", plan: shared.plan, csv: shared.csv, json: JSON.stringify(shared.plan, null, 2) };
      loadData(d, "link");
    } catch (e) {
      state.link = null;
      setStatus(e instanceof LinkError ? e.message : "This link could not be read, so nothing was loaded from it.", "error");
    }
    return;
  }
  if (how.what === "example") {
    loadExample(how.example);
    return;
  }
  if (how.what === "kept") restore(how.snap, "kept");
}

function openKept() {
  const kept = readKept(storage);
  state.link = null;
  history.replaceState(null, "", location.pathname + location.search);
  $("keep-note").textContent = "";
  if (kept) restore(kept, "kept");
}

function forgetAll() {
  forget(storage);
  $("keep-session").checked = false;
  $("keep-note").textContent = "";
  setStatus("Forgotten: nothing of this session is kept in this tab. What is on the page stays until you close it.", "done");
}

// ---------- wiring ----------
function wire() {
  $("file-input").addEventListener("change", (ev) => loadFile(ev.target.files[0]));
  $("matrix-file").addEventListener("change", (ev) => loadMatrixFile(ev.target.files[0]));
  $("vehicles-file").addEventListener("change", (ev) => loadVehiclesFile(ev.target.files[0]));
  const today = new Date();
  $("ics-date").value = today.getFullYear() + "-" + String(today.getMonth() + 1).padStart(2, "0") + "-" + String(today.getDate()).padStart(2, "0");
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
    const mx = files.length > 1 ? files.find((x) => /travel|matrix|distance|time/i.test(x.name)) : null;
    const vh = files.length > 1 ? files.find((x) => x !== mx && /vehicle|fleet|team|van|crew/i.test(x.name)) : null;
    const f = files.find((x) => x !== mx && x !== vh);
    if (vh && f) {
      const first = mx ? loadMatrixFile(mx) : Promise.resolve();
      first.then(() => loadVehiclesFile(vh)).then(() => loadFile(f));
    } else if (mx && f) loadMatrixFile(mx).then(() => loadFile(f));
    else if (f) loadFile(f);
    else if (ev.dataTransfer) {
      const t = ev.dataTransfer.getData("text/plain");
      if (t) {
        $("paste-input").value = t;
        ownData(t);
        loadData(currentData("dropped text"), "paste");
      }
    }
  });
  $("paste-load").addEventListener("click", () => {
    const t = $("paste-input").value;
    if (state.exampleKey && t === state.exampleText) {
      loadData(currentData(state.data ? state.data.name : "pasted text"), "example");
      return;
    }
    ownData(t);
    loadData(currentData("pasted text"), "paste");
  });
  $("example-load").addEventListener("click", () => loadExample($("example-pick").value));
  $("example-pick").addEventListener("change", () => {
    $("example-about").hidden = false;
    const ex = findExample($("example-pick").value);
    $("example-about").textContent = ex ? ex.about : "";
  });
  $("start").addEventListener("click", start);
  $("cancel-load").addEventListener("click", cancelLoad);
  $("stop").addEventListener("click", () => {
    $("stop").disabled = true;
    setStatus("Stopping…");
    send({ type: "stop" });
  });
  for (const input of mixInputs()) {
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
      saveSoon();
    });
  }
  for (const id in exporters) $(id).addEventListener("click", exporters[id]);
  window.addEventListener("beforeprint", printPages);
  // A long plan's table shows its first rows; this shows them all, for
  // this data, until other data is read.
  $("plan-table").addEventListener("click", (e) => {
    if (!e.target.closest("[data-testid=table-all]") || !state.plan) return;
    state.tableAll = true;
    drawTable(state.plan, state.model, true);
  });
  $("keep-help").textContent = KEEP_SENTENCE;
  $("keep-session").checked = keepWanted(storage);
  $("keep-session").addEventListener("change", (ev) => {
    if (ev.target.checked) {
      setKeep(storage, true);
      if (state.link) {
        // Keeping what a link opened: it becomes this tab's session.
        state.link = null;
        history.replaceState(null, "", location.pathname + location.search);
        $("keep-note").textContent = "";
      }
      saveSession();
      setStatus("Kept in this tab: " + KEEP_SENTENCE.charAt(0).toLowerCase() + KEEP_SENTENCE.slice(1), "done");
    } else forgetAll();
  });
  $("forget-session").addEventListener("click", forgetAll);
  $("share-link").addEventListener("click", makeShareLink);
  for (const id of ["budget", "seed", "cores", "objective", "fixed-mix", "fewest-late", "with-bound", "route-end", "end-site", "start-site",
    "shift-start", "speed", "road-factor", "done-visits", "now", "matrix-unit", "fewest-vehicles", "fleet-size"]) $(id).addEventListener("change", saveSoon);
  for (const id of ["paste-input", "matrix-input", "vehicles-input"]) $(id).addEventListener("input", saveSoon);
  $("cores").value = String(defaultCores(navigator.hardwareConcurrency));
  $("cores").max = String(MAX_CORES);
  wireTimeline();
  wireVehicleEditor({ summary: () => state.summary, changed: saveSoon });
  // The axis sticks under the run bar, whatever its height.
  const bar = document.querySelector(".runbar");
  const barHeight = () => document.documentElement.style.setProperty("--runbar-h", (innerWidth > 900 ? bar.offsetHeight : 0) + "px");
  if (typeof ResizeObserver === "function") new ResizeObserver(barHeight).observe(bar);
  barHeight();
  // The axis' ticks follow the width: draw again when it changes.
  let lastWidth = innerWidth;
  window.addEventListener("resize", () => {
    if (innerWidth !== lastWidth && state.plan) {
      lastWidth = innerWidth;
      drawSoon();
    }
  });
  showExampleAbout();
  chart();
  window.addEventListener("hashchange", () => {
    if (state.ready && isShareHash(location.hash)) startupData();
  });
  const params = new URLSearchParams(location.search);
  if (params.get("example")) state.pendingExample = params.get("example");
  state.engine = connectEngine(onEngine, defaultCores(navigator.hardwareConcurrency), (why) => setStatus("The engine could not start in this browser: " + why, "error"));
  if (state.engine && state.engine.cores) $("cores").value = String(state.engine.cores);
}

wire();
