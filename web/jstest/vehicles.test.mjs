// Unit tests of the vehicles table the editor reads and writes:
// node --test web/jstest/
import test from "node:test";
import assert from "node:assert/strict";
import { parseTable, rows, writeTable, setValue, newTable, resize, removeAt, check, checkCount, nextID, parseTime, fieldOf } from "../assets/vehicles.mjs";

// The invented boiler firm's vehicles (testdata/fleet/boiler-team-vehicles.csv).
const boiler = "# Invented: the three technicians of the boiler firm in boiler-team-sites.csv.\n" +
  "id,name,start,end,shift start,shift end,capacity,max duration\n" +
  "T1,Ines,DEPOT,,07:30,16:00,5,\nT2,Marek,DEPOT,,08:00,17:30,5,7:30\nT3,Sol,DEPOT,,09:30,18:30,4,\n";

test("a table read and written untouched is the same text", () => {
  const t = parseTable(boiler);
  assert.equal(writeTable(t), boiler);
  assert.deepEqual(rows(t).map((r) => [r.values.id, r.values.name, r.values["shift end"], r.values["max duration"], r.line]),
    [["T1", "Ines", "16:00", "", 3], ["T2", "Marek", "17:30", "7:30", 4], ["T3", "Sol", "18:30", "", 5]]);
  assert.equal(parseTable("  \n"), null);
  assert.ok(parseTable("# only a comment\n").problem);
});

test("an edit changes its cell only; comments and other rows stay as written", () => {
  const t = parseTable(boiler);
  setValue(t, 1, "capacity", "6");
  assert.equal(writeTable(t), boiler.replace("T2,Marek,DEPOT,,08:00,17:30,5,7:30", "T2,Marek,DEPOT,,08:00,17:30,6,7:30"));
});

test("a field the table has no column for gets one", () => {
  const t = parseTable("vehicle;driver\nA;Ana\nB;Bo\n");
  assert.equal(t.comma, ";");
  setValue(t, 0, "capacity", "1,5");
  assert.equal(writeTable(t), "vehicle;driver;capacity\nA;Ana;1,5\nB;Bo;\n");
  // Names as ids: naming a vehicle gives the ids a column of their own.
  const n = parseTable("name,capacity\nVan A,3\n");
  assert.equal(rows(n)[0].values.id, "Van A");
  setValue(n, 0, "name", "Ada");
  assert.equal(writeTable(n), "name,capacity,id\nAda,3,Van A\n");
});

test("cells with the delimiter or quotes are quoted; quoted cells are read", () => {
  const t = parseTable('id,name\nT1,"Smith, Jo"\n');
  assert.equal(rows(t)[0].values.name, "Smith, Jo");
  setValue(t, 0, "name", 'Jo "the van" Smith');
  assert.equal(writeTable(t), 'id,name\nT1,"Jo ""the van"" Smith"\n');
  assert.equal(rows(parseTable("sep=;\nid;capacity\nX;2,5\n"))[0].values.capacity, "2,5");
  assert.equal(rows(parseTable("id\tshift start\nX\t08:00\n"))[0].values["shift start"], "08:00");
});

test("column names as the reader matches them", () => {
  assert.equal(fieldOf("Shift_Start"), "shift start");
  assert.equal(fieldOf("Max load (kg)"), "capacity");
  assert.equal(fieldOf("Off duty"), "shift end");
  assert.equal(fieldOf("colour"), "");
});

test("a count makes a table as --fleet does, and resizes it", () => {
  const t = newTable(2, { end: "free", shiftStart: "08:00" });
  assert.equal(writeTable(t), "id,name,start,end,shift start,shift end,capacity\n1,,,free,08:00,,\n2,,,free,08:00,,\n");
  const b = parseTable(boiler);
  const stash = [];
  resize(b, 5, stash);
  assert.deepEqual(rows(b).map((r) => r.values.id + ":" + r.values.name + ":" + r.values["shift start"]), ["T1:Ines:07:30", "T2:Marek:08:00", "T3:Sol:09:30", "T4::09:30", "T5::09:30"]);
  resize(b, 2, stash);
  assert.deepEqual(rows(b).map((r) => r.values.id), ["T1", "T2"]);
  // Raised again: the vehicles taken off come back as they were.
  resize(b, 3, stash);
  assert.equal(writeTable(b), boiler);
  removeAt(b, 0, stash);
  assert.deepEqual(rows(b).map((r) => r.values.id), ["T2", "T3"]);
});

test("next ids", () => {
  assert.equal(nextID("T3", new Set()), "T4");
  assert.equal(nextID("V09", new Set()), "V10");
  assert.equal(nextID("7", new Set(["8"])), "9");
  assert.equal(nextID("van", new Set()), "van-2");
});

test("times as the sites file writes them", () => {
  assert.deepEqual(parseTime("08:30", "clock"), { v: 510 });
  assert.deepEqual(parseTime("24:00", "clock"), { v: 1440 });
  assert.ok(parseTime("24:30", "clock").msg);
  assert.ok(parseTime("8h30", "clock").msg.includes("HH:MM"));
  assert.deepEqual(parseTime("480", "minutes"), { v: 480 });
  assert.ok(parseTime("08:00", "minutes").msg.includes("minutes"));
  assert.ok(parseTime("2026-12-01 08:00", "clock").msg.includes("date"));
  assert.equal(parseTime("2026-12-01 08:00", "dated").v - parseTime("2026-12-01 07:00", "dated").v, 60);
  assert.deepEqual(parseTime("7,5", "minutes", true), { v: 7.5 });
  assert.deepEqual(parseTime("480", ""), { v: 480 });
});

test("problems name the vehicle and the field", () => {
  const t = parseTable("id,shift start,shift end,capacity,max duration\nA,09:00,08:00,-1,7:75\nA,x,,y,\n,,,,\n");
  assert.deepEqual(check(t, "clock").map((p) => p.row + " " + p.field + " | " + p.message), [
    "0 shift end | Vehicle 1 (A), shift end: “08:00” is before the shift start “09:00”; want an end at or after the start.",
    "0 capacity | Vehicle 1 (A), capacity: “-1” is negative; want 0 or more, or empty for no limit.",
    "0 max duration | Vehicle 1 (A), longest day: “7:75” is not a duration; want minutes (450) or hours and minutes (7:30), or empty for no limit.",
    "1 id | Vehicle 2 (A), id: “A” is used by vehicle 1 too; ids must differ.",
    "1 shift start | Vehicle 2 (A), shift start: “x” is not a time; want HH:MM on the 24-hour clock, such as 08:00.",
    "1 capacity | Vehicle 2 (A), capacity: “y” is not a number; want the most it carries, in the unit of the sites' demand (12, 1.5), or empty for no limit.",
    "2 id | Vehicle 3, id: empty; every vehicle needs an id of its own.",
  ]);
  assert.deepEqual(check(parseTable(boiler), "clock"), []);
  assert.equal(checkCount("3"), "");
  assert.ok(checkCount("0").startsWith("Count: “0” is not a number of vehicles"));
  assert.ok(checkCount("2.5"));
  assert.ok(checkCount("201"));
});

test("Solomon's format is told by its second line, as the Go reader does", async () => {
  const { isSolomon } = await import("../assets/vehicles.mjs");
  assert.equal(isSolomon("c1_2_1\n\nVEHICLE\nNUMBER     CAPACITY\n  50 200\n"), true);
  assert.equal(isSolomon("id,name\nVEHICLE,x\n"), false);
  assert.equal(isSolomon(""), false);
});
