// Placeholder engine client (one worker), with the interface of the
// multi-worker client that replaces this file: a classic script defining
// globalThis.VisitlineEngine = { create({onMessage, cores}) -> client }.
// The single-file page carries the worker and the engine inline
// (#worker-source, #engine-base64); the served site loads worker.js and
// engine.wasm.
"use strict";
(function () {
  function decodeBase64(text) {
    var clean = text.replace(/\s+/g, "");
    if (typeof Uint8Array.fromBase64 === "function") return Uint8Array.fromBase64(clean);
    var bin = atob(clean);
    var out = new Uint8Array(bin.length);
    for (var i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
    return out;
  }

  function create(opts) {
    var onMessage = opts.onMessage;
    var inline = document.getElementById("worker-source");
    var w;
    if (inline) {
      var url = URL.createObjectURL(new Blob([inline.textContent], { type: "text/javascript" }));
      w = new Worker(url);
      var bytes = decodeBase64(document.getElementById("engine-base64").textContent);
      w.postMessage({ type: "boot", wasm: bytes.buffer }, [bytes.buffer]);
    } else {
      w = new Worker("worker.js");
      w.postMessage({ type: "boot", url: "engine.wasm" });
    }
    w.onmessage = function (ev) { onMessage(ev.data); };
    w.onerror = function (ev) {
      onMessage({ type: "failed", fatal: true, message: "The engine stopped with an error: " + (ev.message || "unknown") });
    };
    var client = {
      cores: Math.max(1, Math.min(8, opts.cores || 1)),
      send: function (msg) { w.postMessage(msg); },
      setCores: function (n) { client.cores = Math.max(1, Math.min(8, Math.floor(n) || 1)); },
      terminate: function () { w.terminate(); },
    };
    return client;
  }

  globalThis.VisitlineEngine = { create: create };
})();
