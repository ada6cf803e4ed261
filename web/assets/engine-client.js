// Visitline's engine client: runs the engine as N search workers plus one
// worker for the bound, the exact search and the explanation, each a
// separate instance of one WebAssembly module compiled once, and shows the
// page one engine (the messages of wasm/protocol.go). It merges them:
// the best plan over every worker (shared back to the others with "adopt",
// so that each restarts from it, as --workers does natively), the bound's
// figures merged into that plan, summed progress with a per-worker list,
// one mix acknowledgement once every search worker took the change, and one
// "finished" per run with one reason. A classic script: it defines only
// globalThis.VisitlineEngine.
"use strict";
(function () {
  const seedStep = 7919; // as the engine's --workers: seed + 7919·worker

  // now is the time in ms since the epoch, on the clock the workers stamp
  // their messages with (sent_at).
  function now() {
    return performance.timeOrigin + performance.now();
  }

  function defaultCores() {
    const hc = (typeof navigator !== "undefined" && navigator.hardwareConcurrency) || 2;
    return clampCores(hc - 1);
  }

  function clampCores(n) {
    n = Math.floor(Number(n));
    if (!(n >= 1)) return 1;
    return Math.min(8, n);
  }

  function decodeBase64(text) {
    const clean = text.replace(/\s+/g, "");
    if (typeof Uint8Array.fromBase64 === "function") return Uint8Array.fromBase64(clean);
    const bin = atob(clean);
    const out = new Uint8Array(bin.length);
    for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
    return out;
  }

  // The engine module, compiled once for every worker, and the worker's
  // script (a Blob URL in the single-file page, where no URL can be loaded).
  let shared = null;
  function sources() {
    if (shared) return shared;
    const inline = document.getElementById("worker-source");
    let workerURL, module;
    if (inline) {
      workerURL = URL.createObjectURL(new Blob([inline.textContent], { type: "text/javascript" }));
      const bytes = decodeBase64(document.getElementById("engine-base64").textContent);
      module = WebAssembly.compile(bytes);
    } else {
      workerURL = "worker.js";
      module = fetch("engine.wasm").then(function (resp) {
        if (!resp.ok) throw new Error("engine.wasm: " + resp.status + " " + resp.statusText);
        if (WebAssembly.compileStreaming && (resp.headers.get("Content-Type") || "").indexOf("application/wasm") === 0) {
          return WebAssembly.compileStreaming(resp);
        }
        return resp.arrayBuffer().then(function (b) { return WebAssembly.compile(b); });
      });
    }
    shared = { workerURL: workerURL, module: module };
    return shared;
  }

  // better says whether plan a beats plan b: every window met first, then
  // (for days that cannot be met) less lateness, then the cost.
  function better(a, b, fewestLate) {
    if (!b) return true;
    if (a.routes || b.routes) return betterFleet(a, b);
    if (a.feasible !== b.feasible) return a.feasible;
    if (!a.feasible) {
      if (fewestLate) {
        const la = (a.late || []).length, lb = (b.late || []).length;
        if (la !== lb) return la < lb;
      }
      if (a.total_lateness !== b.total_lateness) return a.total_lateness < b.total_lateness;
    }
    return a.cost < b.cost - 1e-9;
  }

  // betterFleet ranks fleet plans as fleet.Value does: less priority left
  // unserved, then (when minimised) fewer vehicles, then the cost.
  function betterFleet(a, b) {
    if (!a.routes) return false;
    if (!b.routes) return true;
    if (a.unserved_priority !== b.unserved_priority) return a.unserved_priority < b.unserved_priority;
    if (a.minimize_vehicles && a.vehicles_used !== b.vehicles_used) return a.vehicles_used < b.vehicles_used;
    return a.cost < b.cost - 1e-9;
  }

  function create(opts) {
    const onMessage = opts.onMessage;
    const paced = !!opts.paced; // the page says when it has drawn a plan
    const client = { cores: clampCores(opts.cores || defaultCores()) };
    const src = sources();
    const workers = []; // index 0..: search workers; boundWorker apart
    let boundWorker = null;
    let lastLoad = null; // the load whose data the workers hold (or are reading)
    let doneLoad = null; // the last load that ended (loaded or errors)
    let reading = null; // the load under way, until worker 0 answers it
    const cancelledLoads = new Set();
    let readySent = false;
    let run = null; // the run under way (or the last one)
    let fatal = false;

    function spawn(kind, index) {
      const w = { kind: kind, index: index, ready: false, pendingStarts: 0, memory: 0, worker: null, holds: 0 };
      try {
        w.worker = new Worker(src.workerURL);
      } catch (e) {
        fail("The engine could not start in this browser: " + e.message);
        return w;
      }
      w.worker.onmessage = function (ev) { onWorker(w, ev.data); };
      w.worker.onerror = function (ev) { fail("The engine stopped with an error: " + (ev.message || "unknown")); };
      src.module.then(function (module) {
        w.worker.postMessage({ type: "boot", module: module });
      }, function (e) {
        fail("the engine could not start: " + e.message);
      });
      if (lastLoad) post(w, lastLoad);
      return w;
    }

    function fail(message) {
      if (fatal) return;
      fatal = true;
      onMessage({ type: "failed", fatal: true, message: message });
    }

    function post(w, msg) {
      if (msg.type === "load") w.lastPosted = msg.load_id || 0;
      if (w.worker) w.worker.postMessage(msg);
    }

    function ensureWorkers(n) {
      while (workers.length < n) workers.push(spawn("search", workers.length));
      if (!boundWorker) boundWorker = spawn("bound", 0);
    }

    function allWorkers() {
      return boundWorker ? workers.concat([boundWorker]) : workers.slice();
    }

    // ---------- page to engine ----------
    client.send = function (msg) {
      switch (msg.type) {
        case "load":
          lastLoad = msg;
          reading = msg;
          for (const w of allWorkers()) post(w, msg);
          break;
        case "cancel_load":
          cancelLoad(msg);
          break;
        case "start":
          start(msg);
          break;
        case "mix":
          if (client.trace) client.trace.push([now(), "page", "mix"]);
          mix(msg);
          break;
        case "stop":
          if (client.trace) client.trace.push([now(), "page", "stop"]);
          if (run && !run.finished) run.userStop = true;
          for (const w of allWorkers()) post(w, msg);
          break;
        default:
          // export and anything else: the first search worker answers.
          post(workers[0], msg);
      }
    };

    client.setCores = function (n) {
      client.cores = clampCores(n);
    };

    client.terminate = function () {
      for (const w of allWorkers()) if (w.worker) w.worker.terminate();
      workers.length = 0;
      boundWorker = null;
    };

    // cancelLoad gives up the load under way: every worker stops reading
    // it, and one that has already read it reads the data before it
    // again, so that every worker holds what the page shows.
    function cancelLoad(msg) {
      if (!reading || reading.load_id !== msg.load_id) return;
      cancelledLoads.add(msg.load_id);
      reading = null;
      lastLoad = doneLoad;
      for (const w of allWorkers()) {
        post(w, msg);
        if (w.holds === msg.load_id) restoreLoad(w, msg.load_id);
      }
    }

    // restoreLoad has w read the data before a cancelled load again, unless
    // a later load was posted to it (that one replaces the data anyway).
    function restoreLoad(w, cancelled) {
      if (w.lastPosted !== cancelled) return;
      w.holds = doneLoad ? doneLoad.load_id : 0;
      if (doneLoad) post(w, doneLoad);
    }

    function start(msg) {
      if (msg.cores) client.setCores(msg.cores);
      // The budget counts from now: each worker takes off the time its
      // start message waited (the workers share the page's Date.now()).
      msg = Object.assign({}, msg, { clicked_at: msg.clicked_at || Date.now() });
      // A day for several vehicles runs in one search worker, with no
      // bound worker (the fleet engine has neither adoption nor a bound).
      const n = client.fleetDay ? 1 : client.cores;
      ensureWorkers(n);
      const withBound = !msg.no_bound && !client.fleetDay;
      run = {
        id: (run ? run.id : 0) + 1, msg: msg, n: n, withBound: withBound, search: [], bound: null,
        best: null, bestFrom: -1, pending: null, lastPost: 0, timer: null,
        finished: false, userStop: false, complete: false, mixes: [], startedSent: false,
        every: 50, fewestLate: !!msg.fewest_late, t0: performance.now(),
      };
      for (let i = 0; i < workers.length; i++) {
        const w = workers[i];
        if (i < n) {
          run.search.push({ w: w, progress: null, finished: null, started: false });
          w.pendingStarts++;
          post(w, Object.assign({}, msg, { type: "start", role: "search", worker: i, cores: undefined }));
        } else {
          post(w, { type: "stop" }); // an idle extra worker from an earlier, wider run
        }
      }
      if (withBound) {
        run.bound = { w: boundWorker, finished: null, verdict: null, started: false };
        boundWorker.pendingStarts++;
        post(boundWorker, Object.assign({}, msg, { type: "start", role: "bound", worker: 0, cores: undefined }));
      } else {
        post(boundWorker, { type: "stop" });
      }
    }

    function mix(msg) {
      if (!run || run.finished) {
        // Nothing runs: the first worker answers (running false).
        post(workers[0] || spawn("search", 0), msg);
        return;
      }
      run.mixes.push({ acks: 0, first: null });
      for (const s of run.search) post(s.w, msg);
    }

    // ---------- engine to page ----------
    function entryOf(w) {
      if (!run) return null;
      if (w.kind === "bound") return run.bound && run.bound.w === w ? run.bound : null;
      return run.search[w.index] || null;
    }

    function onWorker(w, m) {
      if (client.trace) client.trace.push([m.sent_at || now(), w.kind + w.index, m.type]);
      if (typeof m.memory_mb === "number") w.memory = m.memory_mb;
      switch (m.type) {
        case "ready":
          w.ready = true;
          if (!readySent && w.kind === "search" && w.index === 0) {
            readySent = true;
            onMessage(m);
          }
          return;
        case "reading":
        case "load_cancelled":
          if (w.kind === "search" && w.index === 0 && reading && m.load_id === reading.load_id) onMessage(m);
          return;
        case "loaded":
        case "errors":
          if (m.load_id && cancelledLoads.has(m.load_id)) {
            // It ended before the cancel got there: back to the data before.
            restoreLoad(w, m.load_id);
            return;
          }
          w.holds = m.load_id || 0;
          if (w.kind === "search" && w.index === 0) {
            if (m.load_id && (!reading || m.load_id !== reading.load_id)) return; // an earlier load read again
            if (reading) doneLoad = reading;
            reading = null;
          }
        // falls through
        case "export":
          if (w.kind === "search" && w.index === 0) {
            if (m.type !== "export") client.fleetDay = m.type === "loaded" && !!(m.summary && m.summary.fleet);
            onMessage(m);
          }
          return;
        case "failed":
          if (m.fatal) fail(m.message);
          else if (w.kind === "search" && w.index === 0) onMessage(m);
          else if (run && !run.finished) run.failure = run.failure || m.message;
          return;
        case "started":
          w.pendingStarts = Math.max(0, w.pendingStarts - 1);
          if (w.pendingStarts === 0) {
            const e = entryOf(w);
            if (e) e.started = true;
          }
          if (run && !run.startedSent && w.kind === "search" && w.index === 0 && w.pendingStarts === 0) {
            run.startedSent = true;
            onMessage(Object.assign({}, m, { run: run.id, role: undefined, cores: run.n, bound: run.withBound }));
          }
          return;
      }
      // The rest belongs to a run: drop what a worker says of an old one.
      if (w.pendingStarts > 0) return;
      const e = entryOf(w);
      if (!e || run.finished) {
        // A mix with nothing running: worker 0 answers for the engine.
        if (m.type === "mix" && w.kind === "search" && w.index === 0) onMessage(m);
        return;
      }
      switch (m.type) {
        case "plan":
          onPlan(w, m);
          break;
        case "progress":
          if (w.kind === "search") {
            e.progress = m;
            if (m.explaining) onMessage(Object.assign({}, m, { run: run.id }));
            else if (!run.progressTimer) {
              // Coalesced: a burst that queued up while the page was busy
              // becomes one report, sent after the burst.
              const r = run;
              r.progressTimer = setTimeout(function () {
                r.progressTimer = null;
                if (run === r && !r.finished) sendProgress();
              }, Math.max(0, 40 - (performance.now() - (r.lastProgress || 0))));
            }
          } else if (m.explaining && !run.search.some(function (s) { return !s.finished; })) {
            onMessage({ type: "progress", run: run.id, explaining: true, iterations: sumIterations(), elapsed: m.elapsed });
          }
          break;
        case "bound":
          e.verdict = m;
          if (m.proven_optimal) {
            // The best plan is proven: the searches have nothing to find.
            run.complete = true;
            for (const s of run.search) if (!s.finished) post(s.w, { type: "stop" });
          }
          if (run.best) {
            mergeBound(run.best);
            queuePlan(true);
          }
          break;
        case "mix":
          onMixAck(m);
          break;
        case "finished":
          e.finished = m;
          maybeFinish();
          break;
      }
    }

    function onPlan(w, m) {
      const p = m.plan;
      // Large days' plans come without the exports but the last: the page
      // writes the JSON one from the plan itself when it is asked for (the
      // CSV stays with the last full plan).
      if (!better(p, run.best && run.best.plan, run.fewestLate)) return;
      run.best = m;
      run.bestFrom = w.kind === "bound" ? -1 : w.index;
      mergeBound(m);
      // Share it: every other worker adopts it (the searches at their next
      // restart; the bound prunes with its cost).
      if (!p.routes) for (const s of run.search) if (s.w !== w && !s.finished) post(s.w, { type: "adopt", route: p.route });
      if (!p.routes && run.bound && w !== run.bound.w && !run.bound.finished) {
        post(run.bound.w, { type: "adopt", route: p.route });
        if (client.trace) client.trace.push([now(), "page", "adopt"]);
      }
      queuePlan(false);
    }

    // mergeBound writes the bound's figures into a plan message.
    function mergeBound(m) {
      const v = run.bound && run.bound.verdict;
      if (!v) return;
      const p = m.plan;
      let changed = false;
      if (typeof v.lower_bound === "number") {
        const lb = Math.min(v.lower_bound, p.feasible ? p.cost : v.lower_bound);
        p.lower_bound = lb;
        if (p.feasible && lb > 0) p.gap_bound_pct = (100 * (p.cost - lb)) / lb;
        p.proven_optimal = p.feasible && v.lower_bound >= p.cost - 1e-9;
        if (p.proven_optimal) p.gap_bound_pct = 0;
        changed = true;
      }
      if (!p.feasible && v.reason) {
        p.conflict = v.conflict;
        p.reason = v.reason;
        changed = true;
      }
      if (changed) m.json = null; // the worker's export no longer says it all
    }

    // queuePlan posts the best plan to the page, at most one every
    // run.every ms (longer for large days), and at once when now is set.
    // A page that draws in slices (paced) says when it has drawn a plan
    // (planDrawn): none is sent while it draws one, and the next waits
    // twice the drawing's time after it.
    function queuePlan(now) {
      run.pending = run.best;
      if (run.drawing && !now) return; // planDrawn sends it
      if (!now && nearEnd()) return; // the run's end sends it
      const every = paced ? Math.max(50, 2 * (run.drawMs || 0)) : Math.max(50, 4 * (run.drawMs || 0));
      const wait = every - (performance.now() - run.lastPost);
      if (now || wait <= 0) {
        flushPlan();
      } else if (!run.timer) {
        const r = run;
        r.timer = setTimeout(function () {
          r.timer = null;
          if (run === r && !r.finished) flushPlan();
        }, wait);
      }
    }

    // nearEnd: the run's budget ends sooner than the page would draw a
    // plan (one and a half times its last drawing): a plan drawn now would
    // keep the page busy when the run ends, and the last plan comes then.
    function nearEnd() {
      const b = run.msg.budget;
      if (!(b > 0) || !run.drawMs) return false;
      return b * 1000 - (performance.now() - run.t0) < 1.5 * run.drawMs;
    }

    // flushPlan hands the pending plan to the page. A page that is not
    // paced draws it at once, which for a large day takes a while: the next
    // plan waits four times as long as the page took (so drawing takes at
    // most a fifth of the page's time, and clicks get in between).
    function flushPlan() {
      if (!run.pending) return;
      const m = run.pending;
      run.pending = null;
      const t0 = performance.now();
      if (paced && !run.finished) {
        run.drawing = true;
        // Should the page never say (it dropped the plan), go on after 5 s.
        const r = run;
        clearTimeout(r.drawGuard);
        r.drawGuard = setTimeout(function () { if (r.drawing) client.planDrawn(5000); }, 5000);
      }
      onMessage(Object.assign({}, m, { run: run.id }));
      const t1 = performance.now();
      if (!paced) {
        run.drawMs = t1 - t0;
        client.lastDrawMs = run.drawMs;
      }
      run.lastPost = t1;
    }

    // planDrawn: the page has drawn the last plan it was given, in ms from
    // the start of its drawing to the end.
    client.planDrawn = function (ms) {
      if (!run || !run.drawing) return;
      run.drawing = false;
      clearTimeout(run.drawGuard);
      run.drawMs = Math.min(ms, 2000);
      client.lastDrawMs = run.drawMs;
      run.lastPost = performance.now();
      if (run.pending && !run.finished) queuePlan(false);
    };

    function sumIterations() {
      let n = 0;
      for (const s of run.search) {
        const it = s.finished ? s.finished.iterations : s.progress ? s.progress.iterations : 0;
        n += it || 0;
      }
      return n;
    }

    function sendProgress() {
      run.lastProgress = performance.now();
      const list = run.search.map(function (s) {
        const p = s.finished || s.progress || {};
        return { iterations: p.iterations || 0, best_cost: typeof p.best_cost === "number" ? p.best_cost : null, memory_mb: s.w.memory };
      });
      const first = run.search[0].progress || run.search.map(function (s) { return s.progress; }).find(function (x) { return !!x; }) || {};
      const from = run.bestFrom >= 0 && run.search[run.bestFrom] && run.search[run.bestFrom].progress ? run.search[run.bestFrom].progress : first;
      const best = run.best ? run.best.plan : null;
      const out = {
        type: "progress", run: run.id, iterations: sumIterations(), elapsed: first.elapsed || 0,
        best_cost: best ? best.cost : first.best_cost, feasible: best ? best.feasible : first.feasible,
        weights: from.weights || first.weights, workers: list,
      };
      if (typeof first.vehicles_used === "number") {
        // A fleet day's search: its best so far, before any plan comes.
        out.vehicles_used = first.vehicles_used;
        out.unserved_priority = first.unserved_priority || 0;
        out.phase = first.phase;
      }
      if (run.bound) {
        const v = run.bound.verdict;
        out.bound = { lower_bound: v && typeof v.lower_bound === "number" ? v.lower_bound : null, proven_optimal: !!(v && v.proven_optimal),
          done: !!run.bound.finished, memory_mb: run.bound.w.memory };
      }
      onMessage(out);
    }

    function onMixAck(m) {
      const c = run.mixes[0];
      if (!c) return;
      c.acks++;
      if (!c.first || m.running) c.first = m;
      if (c.acks >= run.search.length) {
        run.mixes.shift();
        onMessage(Object.assign({}, c.first, { run: run.id }));
      }
    }

    function maybeFinish() {
      if (run.search.some(function (s) { return !s.finished; })) return;
      if (run.bound && !run.bound.finished) {
        // The searches are over: the bound has nothing left to prune for.
        if (!run.boundStopped && !(run.best && !run.best.plan.feasible)) {
          run.boundStopped = true;
          post(run.bound.w, { type: "stop" });
          if (client.trace) client.trace.push([now(), "page", "stop bound"]);
        }
        return;
      }
      run.finished = true;
      run.drawing = false;
      clearTimeout(run.drawGuard);
      if (run.timer) clearTimeout(run.timer);
      if (run.progressTimer) clearTimeout(run.progressTimer);
      if (run.best) {
        mergeBound(run.best);
        run.pending = run.best;
        flushPlan();
      }
      // One reason, decided from the workers' own (solver.Stop).
      const reasons = run.search.map(function (s) { return s.finished.why; });
      if (run.bound) reasons.push(run.bound.finished.why);
      const errored = run.search.concat(run.bound ? [run.bound] : []).find(function (s) { return s.finished.why === "error"; });
      let why;
      if (errored) why = "error";
      else if (run.userStop || !run.complete && run.search.some(function (s) { return s.finished.why === "stopped"; })) why = "stopped";
      else if (run.complete || reasons.indexOf("complete") >= 0 && run.search.every(function (s) { return s.finished.why !== "budget"; })) why = "complete";
      else if (run.search.every(function (s) { return s.finished.why === "iterations"; })) why = "iterations";
      else why = "budget";
      const first = run.search[0].finished;
      const best = run.best ? run.best.plan : null;
      const out = {
        type: "finished", run: run.id, why: why, iterations: sumIterations(), elapsed: Math.max.apply(null, run.search.map(function (s) { return s.finished.elapsed || 0; })),
        improvements: run.search.reduce(function (a, s) { return a + (s.finished.improvements || 0); }, 0),
        feasible: best ? best.feasible : false,
        workers: run.search.map(function (s) { return { iterations: s.finished.iterations || 0, memory_mb: s.w.memory }; }),
      };
      if (best) out.best_cost = best.cost;
      if (run.bound) out.bound = { memory_mb: run.bound.w.memory };
      if (errored) out.message = errored.finished.message || run.failure || "";
      const note = run.search.map(function (s) { return s.finished.note; }).find(function (x) { return !!x; });
      if (note) out.note = note;
      if (client.trace) client.trace.push([now(), "client", "finished"]);
      onMessage(out);
      if (client.trace) client.trace.push([now(), "page", "drawn"]);
    }

    // The first search worker and the bound worker start at once, so that
    // the engine is ready as soon as one of them is; more come with cores.
    ensureWorkers(1);
    globalThis.VisitlineEngine.last = client; // for tests and measurements
    return client;
  }

  globalThis.VisitlineEngine = { create: create, defaultCores: defaultCores };
})();
