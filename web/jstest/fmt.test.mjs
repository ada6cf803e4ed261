// Unit tests of the page's pure modules: node --test web/jstest/
import test from "node:test";
import assert from "node:assert/strict";
import { isOpen, duration, longDuration, clock, boundWords, costWords, timeModel } from "../assets/fmt.mjs";

const min = timeModel({ unit: "min", times: "clock" });
const plain = timeModel({});

test("open window ends: null, absent and the old huge numbers", () => {
  for (const v of [null, undefined, 1e14, 187649984473.77, Infinity]) assert.equal(isOpen(v), true, String(v));
  for (const v of [0, 1110, 1e6]) assert.equal(isOpen(v), false, String(v));
});

test("waits and slack in whole minutes or H:MM", () => {
  const cases = [
    [17.58, "round", "18 min"],
    [17.58, "floor", "17 min"],
    [0.2, "ceil", "1 min"],
    [59.4, "round", "59 min"],
    [60, "round", "1:00 h"],
    [125.9, "floor", "2:05 h"],
    [12.0000001, "floor", "12 min"],
    [null, "round", "open"],
  ];
  for (const [v, how, want] of cases) assert.equal(duration(v, min, how), want, v + " " + how);
  assert.equal(duration(17.58, plain), "17.6 units");
  assert.equal(longDuration(222, min), "3 h 42 min");
});

test("clock times: one format per column, later days marked", () => {
  assert.equal(clock(275, min, { locale: "en-GB" }), "04:35");
  assert.equal(clock(275.5, min, { locale: "en-GB", seconds: true }), "04:35:30");
  assert.equal(clock(1440 + 60, min, { locale: "en-GB" }), "01:00 +1 d");
  assert.equal(clock(1234.5, plain), "1234.5");
});

test("the bound in plain words", () => {
  assert.equal(boundWords({ proven_optimal: true, lower_bound: 10, gap_bound_pct: 0 }), "proven best");
  assert.equal(boundWords({ lower_bound: 10, gap_bound_pct: 2.34 }), "within 2.4 % of the best possible");
  assert.equal(boundWords({ lower_bound: 10, gap_bound_pct: 44.21 }), "no proof of quality yet for a day this size");
  assert.equal(boundWords({}), "no proof of quality worked out");
});

test("the completion objective reads as a finishing time", () => {
  assert.equal(costWords({ objective: "completion", cost: 918.25 }, min).replace(/\u202f/g, " "), "ends at " + clock(918.25, min));
  assert.match(costWords({ objective: "travel", cost: 132 }, min), /^2 h 12 min travel$/);
});
