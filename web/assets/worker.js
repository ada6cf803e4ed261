// Visitline's web worker: starts the Go engine (engine.wasm) and relays
// messages between it and the page (through engine-client.js, which runs
// several of these). The protocol is documented in wasm/protocol.go. The
// served site loads wasm_exec.js here; the single-file page puts
// wasm_exec.js in front of this script. The engine comes as a compiled
// WebAssembly.Module (compiled once for every worker), as bytes, or as a URL.
"use strict";
if (typeof Go === "undefined") {
  importScripts("wasm_exec.js");
}
(function () {
  let ready = false;
  let memory = null;
  const queue = [];

  function memoryMB() {
    return memory ? Math.round((memory.buffer.byteLength / 1048576) * 10) / 10 : 0;
  }

  // The engine calls this with each reply as JSON text.
  self.visitlineReply = function (text) {
    let msg;
    try {
      msg = JSON.parse(text);
    } catch (e) {
      msg = { type: "failed", message: "the engine sent a broken message" };
    }
    if (msg.type === "ready" && !ready) {
      ready = true;
      // Hand queued messages over after this call returns to Go.
      setTimeout(function () {
        while (queue.length) queue.shift()();
      }, 0);
    }
    if (msg.type === "progress" || msg.type === "finished" || msg.type === "bound" || msg.type === "loaded") msg.memory_mb = memoryMB();
    // When the worker sent it (ms since the epoch, as the page's clock):
    // the page may take it in much later when it is busy drawing.
    msg.sent_at = performance.timeOrigin + performance.now();
    self.postMessage(msg);
  };

  async function boot(m) {
    const go = new Go();
    let instance;
    if (m.module) {
      instance = await WebAssembly.instantiate(m.module, go.importObject);
    } else if (m.wasm) {
      instance = (await WebAssembly.instantiate(m.wasm, go.importObject)).instance;
    } else {
      const resp = await fetch(m.url || "engine.wasm");
      if (!resp.ok) throw new Error("engine.wasm: " + resp.status + " " + resp.statusText);
      instance = (await WebAssembly.instantiate(await resp.arrayBuffer(), go.importObject)).instance;
    }
    memory = instance.exports.mem || null;
    go.run(instance).then(function () {
      self.postMessage({ type: "failed", fatal: true, message: "the engine stopped; reload the page to start it again" });
    });
  }

  self.onmessage = function (ev) {
    const m = ev.data;
    if (m && m.type === "boot") {
      boot(m).catch(function (e) {
        self.postMessage({ type: "failed", fatal: true, message: "the engine could not start: " + e.message });
      });
      return;
    }
    let give;
    if (m && m.type === "cancel_load") {
      // At once, not behind the load it cancels (which gives the event
      // loop turns while it reads, so this runs in one of them).
      give = function () { self.visitlineEngine.cancelLoad(Number(m.load_id) || 0); };
    } else if (m && m.type === "load") {
      // The texts go apart from the JSON: a large paste is not encoded
      // and decoded as JSON on its way in.
      const text = typeof m.text === "string" ? m.text : "";
      const matrix = typeof m.matrix === "string" ? m.matrix : "";
      const json = JSON.stringify(Object.assign({}, m, { text: "", matrix: "" }));
      give = function () { self.visitlineEngine.handle(json, text, matrix); };
    } else {
      const json = JSON.stringify(m);
      give = function () { self.visitlineEngine.handle(json); };
    }
    if (ready) give();
    else queue.push(give);
  };
})();
