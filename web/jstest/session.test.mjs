import test from "node:test";
import assert from "node:assert/strict";
import { save, startup, setKeep, forget, keepWanted, SESSION_KEY, LINK_KEY } from "../assets/session.mjs";
import { ticks, axisSpan, density, MAX_TICKS } from "../assets/axis.mjs";

function memory() {
  const m = new Map();
  return { getItem: (k) => (m.has(k) ? m.get(k) : null), setItem: (k, v) => m.set(k, String(v)), removeItem: (k) => m.delete(k), m };
}
const snap = (text) => ({ data: { name: "a", text: text, options: {} }, draft: { text: text + "typed" } });

test("nothing is kept until asked", () => {
  const s = memory();
  save(s, snap("x"), null);
  assert.equal(s.m.size, 0);
  assert.equal(startup(s, { payload: null }).what, "nothing");
  setKeep(s, true);
  save(s, snap("x"), null);
  const st = startup(s, { payload: null });
  assert.equal(st.what, "kept");
  assert.equal(st.snap.draft.text, "xtyped", "text as typed is kept");
});

test("a link opens beside the kept session, and its edits survive a reload", () => {
  const s = memory();
  setKeep(s, true);
  save(s, snap("mine"), null);
  let st = startup(s, { payload: "P1" });
  assert.deepEqual([st.what, st.keptAside], ["link", true]);
  save(s, snap("edited"), "P1");
  assert.equal(JSON.parse(s.getItem(SESSION_KEY)).data.text, "mine", "the kept session is not overwritten");
  st = startup(s, { payload: "P1" });
  assert.equal(st.what, "link-copy");
  assert.equal(st.snap.data.text, "edited");
  assert.equal(startup(s, { payload: "P2" }).what, "link", "another link is read afresh");
  forget(s);
  assert.equal(keepWanted(s), false);
  assert.equal(s.getItem(LINK_KEY), null);
  assert.equal(s.m.size, 0);
});

test("the axis stays bounded whatever the windows", () => {
  const rows = [{ v: { arrival: 450, start: 450, departure: 460, latest: 1110 } }, { v: { arrival: 600, start: 600, departure: 660, latest: 187649984473.77 } }];
  const [t0, t1] = axisSpan(rows);
  assert.equal(t0, 450);
  assert.ok(t1 <= 1110, String(t1));
  for (const [a, b, c] of [[0, 1e12, true], [0, 1e12, false], [450, 1110, true], [0, 0.001, false]]) assert.ok(ticks(a, b, c).length <= MAX_TICKS, a + ".." + b);
  assert.deepEqual(ticks(480, 600, true), [480, 495, 510, 525, 540, 555, 570, 585, 600]);
  assert.deepEqual([density(60), density(61), density(200)], ["full", "thin", "dense"]);
});
