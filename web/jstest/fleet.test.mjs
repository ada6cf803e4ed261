// Unit tests of the fleet plan's pure parts: node --test web/jstest/
import test from "node:test";
import assert from "node:assert/strict";
import { fleetSpan, laneFigures, fleetWords, isFleetPlan, vehicleLabel } from "../assets/fleet.mjs";
import { timeModel } from "../assets/fmt.mjs";

const min = timeModel({ unit: "min", times: "clock" });

// Two routes worked by hand: the span runs from the earliest begin (480)
// to the latest end (700), and a window end within half that length
// again (700 + 110 = 810) is shown whole; one past it (900) is not.
const plan = {
  objective: "travel", cost: 95, vehicles: 3, vehicles_used: 2, served: 3, unserved: [4],
  routes: [
    { vehicle: "T1", vehicle_name: "Ines", visits: [1, 2], begin: 480, arrival: 640, travel: 65, duration: 160, load: 3, capacity: 5,
      schedule: [{ arrival: 500, departure: 530, latest: 800 }, { arrival: 560, departure: 600, latest: 900 }] },
    { vehicle: "T2", visits: [3], begin: 520, arrival: 700, travel: 30, duration: 180, load: 0,
      schedule: [{ arrival: 540, departure: 600, latest: 810 }] },
  ],
};

test("the shared axis spans every route", () => {
  assert.deepEqual(fleetSpan(plan), [480, 810]);
  assert.deepEqual(fleetSpan({ routes: [] }), [0, 1]);
});

test("a lane's figures and the run bar's line", () => {
  assert.equal(laneFigures(plan.routes[0], min), "2 visits · 1 h 05 min driving · 2 h 40 min working day · load 3 of 5");
  assert.equal(laneFigures(plan.routes[1], min), "1 visit · 30 min driving · 3 h 00 min working day");
  assert.equal(fleetWords(plan, min), "2 vehicles of 3, 3 visits served, 1 unserved · 1 h 35 min driving in all");
  assert.equal(vehicleLabel(plan.routes[0]), "T1 · Ines");
  assert.equal(vehicleLabel(plan.routes[1]), "T2");
});

test("fleet plans are told from one-vehicle plans", () => {
  assert.equal(isFleetPlan(plan), true);
  assert.equal(isFleetPlan({ route: [0, 1], schedule: [] }), false);
  assert.equal(isFleetPlan(null), false);
});
