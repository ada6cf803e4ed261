import test from "node:test";
import assert from "node:assert/strict";
import { pack, unpack, linkPayload, LinkError } from "../assets/share.mjs";

test("a link round-trips the data and the plan", async () => {
  const obj = { v: 2, name: "sites.csv", text: "id,name\nA,Ä\n", options: { end: "free" }, settings: { seed: "7" },
    plan: { route: [0, 1], schedule: [{}, {}], cost: 3 }, csv: "x" };
  const back = await unpack(await pack(obj));
  assert.equal(back.text, obj.text);
  assert.deepEqual(back.plan, obj.plan);
  assert.equal(back.settings.seed, "7");
});

test("trailing punctuation from mail programs is dropped", () => {
  assert.equal(linkPayload("#data=abc_-9."), "abc_-9");
  assert.equal(linkPayload("#data=abc)"), "abc");
  assert.equal(linkPayload("#data=abc)."), "abc");
  assert.equal(linkPayload("#data=ab%c"), null);
});

test("the inflate stops at the cap with a plain message", async () => {
  // 20 MB of spaces inside a JSON string deflate to a few kB.
  const huge = await pack({ text: " ".repeat(20 * 1024 * 1024) });
  await assert.rejects(unpack(huge), (e) => e instanceof LinkError && /more than 8 MB/.test(e.message));
  await assert.rejects(unpack(huge, 1024), (e) => e instanceof LinkError && /more than/.test(e.message));
});

test("damaged or foreign links fail with a plain message, no internals", async () => {
  for (const p of ["AAAAx", "A", "zzzz", await pack({ name: { nested: 1 } }), await pack([1, 2])]) {
    await assert.rejects(unpack(p), (e) => e instanceof LinkError && !/struct|unmarshal|SyntaxError/.test(e.message), p);
  }
});

test("options of the wrong type are dropped, the rest kept", async () => {
  const back = await unpack(await pack({ text: "x", options: { speed: "fast", road_factor: 1.2, done: ["A", 3], end: 7, start: "D" } }));
  assert.deepEqual(back.options, { start: "D", road_factor: 1.2, done: ["A"] });
});

test("a team's day rides in the link: vehicles text, name and fleet size", async () => {
  const back = await unpack(await pack({ text: "id\nA\n", vehicles: "id,start\nT1,A\n", vehicles_name: "team.csv", fleet: 3 }));
  assert.equal(back.vehicles, "id,start\nT1,A\n");
  assert.equal(back.vehicles_name, "team.csv");
  assert.equal(back.fleet, 3);
  const odd = await unpack(await pack({ text: "x", vehicles: 5, fleet: -2 }));
  assert.equal(odd.vehicles, "");
  assert.equal(odd.fleet, 0);
});
