// The page's side of the engine: a thin adapter over engine-client.js
// (the global VisitlineEngine), which hides how many workers search.

export const MAX_CORES = 8;

export function defaultCores(hw) {
  const n = Math.floor(Number(hw) || 2) - 1;
  return Math.max(1, Math.min(MAX_CORES, n));
}

export function connectEngine(onMessage, cores, onFail) {
  const api = globalThis.VisitlineEngine;
  if (!api || typeof api.create !== "function") {
    onFail("the engine's client script is missing from this page");
    return null;
  }
  try {
    return api.create({ onMessage: onMessage, cores: cores, paced: true });
  } catch (e) {
    onFail(e && e.message ? e.message : String(e));
    return null;
  }
}
