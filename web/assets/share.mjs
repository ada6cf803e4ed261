// Share links: the data, its settings and the plan found, deflated into
// the URL fragment (never sent to a server). Reading is capped: the
// inflate is streamed and stops at MAX_INFLATED bytes. Pure apart from the
// Compression Streams API, which Node 20 has too; unit-tested under Node.

export const MAX_LINK = 64000; // characters; longer links break in mail and chat programs (common practice)
export const MAX_INFLATED = 8 * 1024 * 1024; // bytes of JSON a link may hold once inflated

export class LinkError extends Error {}

function b64url(bytes) {
  let bin = "";
  for (let i = 0; i < bytes.length; i += 0x8000) bin += String.fromCharCode.apply(null, bytes.subarray(i, i + 0x8000));
  return btoa(bin).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
}

function unb64url(text) {
  if (text.length % 4 === 1) throw new LinkError("cut");
  const bin = atob(text.replace(/-/g, "+").replace(/_/g, "/") + "===".slice((text.length + 3) % 4));
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

// linkPayload finds the packed data in a URL's fragment. Mail and chat
// programs often glue a full stop, a comma or a closing bracket to a link:
// characters outside the link's alphabet at its end are dropped.
export function linkPayload(hash) {
  const m = String(hash || "").match(/^#data=([A-Za-z0-9_-]*)[.,;:!?)\]}>'"\s]*$/);
  if (!m) return null;
  return m[1];
}

export function isShareHash(hash) {
  return /^#data=/.test(String(hash || ""));
}

export async function pack(obj) {
  const stream = new Blob([JSON.stringify(obj)]).stream().pipeThrough(new CompressionStream("deflate-raw"));
  return b64url(new Uint8Array(await new Response(stream).arrayBuffer()));
}

// unpack inflates and parses a payload, reading the inflated stream chunk
// by chunk and giving up past max bytes. Every failure is a LinkError with
// a plain message.
export async function unpack(payload, max) {
  max = max || MAX_INFLATED;
  let bytes;
  try {
    bytes = unb64url(payload);
  } catch (e) {
    throw new LinkError("This link is cut short or damaged, so nothing was loaded from it. Ask for the link again, or for the file.");
  }
  const reader = new Blob([bytes]).stream().pipeThrough(new DecompressionStream("deflate-raw")).getReader();
  const parts = [];
  let size = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.length;
      if (size > max) {
        reader.cancel().catch(() => {});
        throw new LinkError("This link holds more than " + Math.round(max / 1048576) + " MB of data once unpacked, more than this page reads from a link; nothing was loaded from it. Ask for the file instead.");
      }
      parts.push(value);
    }
  } catch (e) {
    if (e instanceof LinkError) throw e;
    throw new LinkError("This link is cut short or damaged, so nothing was loaded from it. Ask for the link again, or for the file.");
  }
  let obj;
  try {
    const all = new Uint8Array(size);
    let at = 0;
    for (const p of parts) {
      all.set(p, at);
      at += p.length;
    }
    obj = JSON.parse(new TextDecoder("utf-8", { fatal: true }).decode(all));
  } catch (e) {
    throw new LinkError("This link's data is damaged, so nothing was loaded from it. Ask for the link again, or for the file.");
  }
  return check(obj);
}

// cleanOptions keeps the route and travel options a link may carry, each
// of the type the engine reads (anything else is dropped, so that a
// tampered link cannot make the engine answer with a decoding error).
export function cleanOptions(o) {
  const out = {};
  if (!o || typeof o !== "object") return out;
  for (const k of ["end", "start", "shift_start", "matrix_unit", "now"]) if (typeof o[k] === "string") out[k] = o[k];
  for (const k of ["speed", "road_factor"]) if (typeof o[k] === "number" && Number.isFinite(o[k])) out[k] = o[k];
  if (Array.isArray(o.done)) out.done = o.done.filter((x) => typeof x === "string");
  return out;
}

// check keeps only the fields a link may carry, each of the right type.
function check(o) {
  const bad = () => new LinkError("This link does not hold Visitline data, so nothing was loaded from it.");
  if (!o || typeof o !== "object" || typeof o.text !== "string") throw bad();
  const str = (v) => (typeof v === "string" ? v : "");
  const out = { v: o.v, name: str(o.name) || "shared data", text: o.text, matrix: str(o.matrix), matrix_name: str(o.matrix_name),
    options: cleanOptions(o.options),
    vehicles: str(o.vehicles), vehicles_name: str(o.vehicles_name), fleet: Number.isInteger(o.fleet) && o.fleet > 0 && o.fleet <= 200 ? o.fleet : 0,
    settings: o.settings && typeof o.settings === "object" ? o.settings : {} };
  // One vehicle's plan (route and schedule) or a team's (routes, each
  // with its schedule); the page checks it against the data read.
  const one = o.plan && typeof o.plan === "object" && Array.isArray(o.plan.route) && Array.isArray(o.plan.schedule);
  const team = o.plan && typeof o.plan === "object" && Array.isArray(o.plan.routes) && o.plan.routes.every((r) => r && Array.isArray(r.visits) && Array.isArray(r.schedule));
  if (one || team) {
    out.plan = o.plan;
    out.csv = str(o.csv);
  }
  return out;
}
