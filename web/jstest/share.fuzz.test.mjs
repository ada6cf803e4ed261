// Fuzzing of the share-link decoder (linkPayload, unpack): seeded random
// links, mutations of good ones and inputs kept in testdata/fuzz-share/
// (one payload a file: what earlier runs found). Every input either gives
// data of the right shape or fails with a LinkError in plain words: never
// another exception, never more than the cap inflated. `node --test` runs
// a few hundred inputs; VISITLINE_FUZZ_SECONDS=300 runs for that long.
import test from "node:test";
import assert from "node:assert/strict";
import { readdirSync, readFileSync, writeFileSync, mkdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { pack, unpack, linkPayload, LinkError } from "../assets/share.mjs";

const here = dirname(fileURLToPath(import.meta.url));
const corpusDir = join(here, "testdata", "fuzz-share");

// mulberry32: a small seeded generator, so that a run can be repeated.
function rng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";

function randomValue(r, depth) {
  const k = Math.floor(r() * (depth > 3 ? 5 : 8));
  switch (k) {
    case 0: return null;
    case 1: return r() < 0.5;
    case 2: return [0, -1, 1e308, 3.5, 2 ** 53, NaN][Math.floor(r() * 6)];
    case 3: return ["", "x", "id,name\nA,B\n", "\u0000", "=HYPERLINK(1)", "é", "𝄞"][Math.floor(r() * 7)];
    case 4: return "a".repeat(Math.floor(r() * 2000));
    case 5: return Array.from({ length: Math.floor(r() * 4) }, () => randomValue(r, depth + 1));
    default: {
      const keys = ["v", "name", "text", "matrix", "matrix_name", "options", "settings", "plan", "csv", "vehicles", "vehicles_name", "fleet",
        "route", "schedule", "routes", "visits", "speed", "done", "end", "__proto__", "constructor"];
      // No prototype: "__proto__" is then a key like any other, as
      // JSON.parse makes it from a link.
      const o = Object.create(null);
      for (let i = Math.floor(r() * 6); i > 0; i--) o[keys[Math.floor(r() * keys.length)]] = randomValue(r, depth + 1);
      return o;
    }
  }
}

// linkLike is an object shaped like a link's data, its fields of any type.
function linkLike(r) {
  const t = randomValue(r, 3);
  const o = { text: r() < 0.8 ? (typeof t === "string" ? t : JSON.stringify(t) || "") : randomValue(r, 1) };
  const opts = {};
  for (const k of ["end", "start", "shift_start", "matrix_unit", "now", "speed", "road_factor", "done", "other"]) if (r() < 0.4) opts[k] = randomValue(r, 2);
  for (const [k, v] of [["options", opts], ["name", randomValue(r, 2)], ["fleet", randomValue(r, 2)], ["settings", randomValue(r, 1)],
    ["plan", r() < 0.5 ? { route: randomValue(r, 2), schedule: randomValue(r, 2), routes: randomValue(r, 2) } : randomValue(r, 1)],
    ["vehicles", randomValue(r, 2)], ["matrix", randomValue(r, 2)], ["csv", randomValue(r, 2)]]) if (r() < 0.6) o[k] = v;
  return o;
}

function mutate(r, s) {
  const a = s.split("");
  for (let i = 1 + Math.floor(r() * 4); i > 0; i--) {
    const at = Math.floor(r() * (a.length + 1));
    switch (Math.floor(r() * 5)) {
      case 0: a.splice(at, 1); break;
      case 1: a.splice(at, 0, alphabet[Math.floor(r() * alphabet.length)]); break;
      case 2: if (at < a.length) a[at] = alphabet[Math.floor(r() * alphabet.length)]; break;
      case 3: a.length = at; break; // cut short
      default: a.splice(at, 0, String.fromCharCode(Math.floor(r() * 0x3000))); break;
    }
  }
  return a.join("");
}

// check says what is wrong with the outcome of one payload ("" when fine).
async function check(payload) {
  const hash = "#data=" + payload;
  const p = linkPayload(hash);
  if (p !== null && (typeof p !== "string" || !/^[A-Za-z0-9_-]*$/.test(p))) return "linkPayload gave " + JSON.stringify(p);
  let out;
  try {
    out = await unpack(payload, 1 << 20);
  } catch (e) {
    if (!(e instanceof LinkError)) return "not a LinkError: " + (e && e.stack);
    if (/struct|unmarshal|SyntaxError|TypeError|undefined|\bat\b.*\.mjs/.test(e.message)) return "internals in the message: " + e.message;
    return "";
  }
  if (!out || typeof out !== "object" || typeof out.text !== "string") return "no text";
  for (const k of ["name", "matrix", "matrix_name", "vehicles", "vehicles_name"]) if (typeof out[k] !== "string") return k + " is not text";
  if (!Number.isInteger(out.fleet) || out.fleet < 0 || out.fleet > 200) return "fleet " + out.fleet;
  for (const [k, v] of Object.entries(out.options)) {
    const want = { end: "string", start: "string", shift_start: "string", matrix_unit: "string", now: "string", speed: "number", road_factor: "number", done: "object" }[k];
    if (!want || typeof v !== want) return "option " + k + " kept as " + typeof v;
  }
  if (out.options.done && !out.options.done.every((x) => typeof x === "string")) return "done holds more than ids";
  if (typeof out.settings !== "object" || out.settings === null) return "settings";
  if (out.plan && !(Array.isArray(out.plan.route) && Array.isArray(out.plan.schedule)) && !Array.isArray(out.plan.routes)) return "plan shape";
  return "";
}

function corpus() {
  try {
    return readdirSync(corpusDir).filter((f) => f.endsWith(".txt")).map((f) => [f, readFileSync(join(corpusDir, f), "utf8").trim()]);
  } catch (e) {
    return [];
  }
}

test("kept fuzz inputs of the share-link decoder", async () => {
  for (const [name, payload] of corpus()) assert.equal(await check(payload), "", name);
});

test("fuzz the share-link decoder", async () => {
  const seconds = Number(process.env.VISITLINE_FUZZ_SECONDS || 0);
  const seed = Number(process.env.VISITLINE_FUZZ_SEED || 1);
  const r = rng(seed);
  const good = [
    await pack({ v: 2, name: "sites.csv", text: "id,name\nA,B\n", options: { end: "free" }, settings: { seed: "7" }, plan: { route: [0, 1], schedule: [{}, {}] } }),
    await pack({ text: " ".repeat(3 << 20) }), // over the test's 1 MB cap once inflated
    await pack({ text: "id\nA\n", vehicles: "id\nT1\n", fleet: 2, plan: { routes: [{ visits: [1], schedule: [{}] }] } }),
  ];
  const end = Date.now() + seconds * 1000;
  let n = 0;
  for (; seconds > 0 ? Date.now() < end : n < 300; n++) {
    let payload;
    const k = r();
    if (k < 0.4) payload = mutate(r, good[Math.floor(r() * good.length)]);
    else if (k < 0.6) payload = await pack(randomValue(r, 0));
    else if (k < 0.9) payload = await pack(linkLike(r));
    else payload = Array.from({ length: Math.floor(r() * 40) }, () => alphabet[Math.floor(r() * alphabet.length)]).join("");
    const why = await check(payload);
    if (why) {
      mkdirSync(corpusDir, { recursive: true });
      const f = join(corpusDir, "found-" + seed + "-" + n + ".txt");
      writeFileSync(f, payload + "\n");
      assert.fail(why + " (input kept in " + f + ")");
    }
  }
  if (seconds > 0) console.log("share-link fuzz: " + n + " inputs in " + seconds + " s, seed " + seed);
});
