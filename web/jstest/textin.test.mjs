import test from "node:test";
import assert from "node:assert/strict";
import { decodeBytes, fieldRange } from "../assets/textin.mjs";

test("UTF-8 is read as it is; Windows-1252 is converted with a note", () => {
  const utf8 = new TextEncoder().encode("id,name\nB1,Bäckerei\n");
  assert.deepEqual(decodeBytes(utf8).encoding, "utf-8");
  assert.equal(decodeBytes(utf8).text, "id,name\nB1,Bäckerei\n");
  // "Bäckerei" with ä as the single byte 0xE4 (Windows-1252 and Latin-1).
  const cp = Uint8Array.from([...Buffer.from("B1,B"), 0xe4, ...Buffer.from("ckerei"), 0x80]);
  const r = decodeBytes(cp);
  assert.equal(r.encoding, "windows-1252");
  assert.equal(r.text, "B1,Bäckerei€");
  assert.match(r.note, /Windows-1252/);
});

test("an error's place selects the field it names", () => {
  const csv = 'id,name,open\nA,"Alpha, Ltd",08:00\nB,Beta,9x\n';
  const sel = (line, col) => { const [a, b] = fieldRange(csv, line, col); return csv.slice(a, b); };
  assert.equal(sel(3, 3), "9x");
  assert.equal(sel(2, 2), "Alpha, Ltd");
  assert.equal(sel(2, 3), "08:00");
  assert.equal(sel(3, 0), "B,Beta,9x");
  const plain = "3\n0 1 2\n1 0 x\n";
  const [a, b] = fieldRange(plain, 3, 3);
  assert.equal(plain.slice(a, b), "x");
  const semi = "id;name\nA;Ä B\n";
  const [c, d] = fieldRange(semi, 2, 2);
  assert.equal(semi.slice(c, d), "Ä B");
});
