// Visitline's web worker: starts the Go engine (engine.wasm) and relays
// messages between it and the page. The protocol is documented in
// wasm/protocol.go. The served site loads wasm_exec.js here; the single-file
// page puts wasm_exec.js in front of this script and sends the engine bytes.
"use strict";
if (typeof Go === "undefined") {
  importScripts("wasm_exec.js");
}
(function () {
  let ready = false;
  const queue = [];

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
        while (queue.length) self.visitlineEngine.handle(queue.shift());
      }, 0);
    }
    self.postMessage(msg);
  };

  async function boot(m) {
    const go = new Go();
    let result;
    if (m.wasm) {
      result = await WebAssembly.instantiate(m.wasm, go.importObject);
    } else {
      const resp = await fetch(m.url || "engine.wasm");
      if (!resp.ok) throw new Error("engine.wasm: " + resp.status + " " + resp.statusText);
      if (WebAssembly.instantiateStreaming && (resp.headers.get("Content-Type") || "").indexOf("application/wasm") === 0) {
        result = await WebAssembly.instantiateStreaming(resp, go.importObject);
      } else {
        result = await WebAssembly.instantiate(await resp.arrayBuffer(), go.importObject);
      }
    }
    go.run(result.instance).then(function () {
      self.postMessage({ type: "failed", message: "the engine stopped; reload the page to start it again" });
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
    const text = JSON.stringify(m);
    if (ready) self.visitlineEngine.handle(text);
    else queue.push(text);
  };
})();
