// Reading what the user gives: file bytes to text, and error places back
// to the field in the text. Pure functions, unit-tested under Node.

// decodeBytes reads a file's bytes as UTF-8 (a byte-order mark is dropped);
// bytes that are not UTF-8 are read as Windows-1252, which is a superset
// of Latin-1's printable characters, and the result says so, for the page
// to show a note. (Windows-1252 and ISO-8859-1 files from spreadsheet
// programs are the common non-UTF-8 case: common practice.)
export function decodeBytes(bytes) {
  const u8 = bytes instanceof Uint8Array ? bytes : new Uint8Array(bytes);
  try {
    return { text: new TextDecoder("utf-8", { fatal: true }).decode(u8), encoding: "utf-8" };
  } catch (e) {
    return { text: decode1252(u8), encoding: "windows-1252", note: encodingNote(u8) };
  }
}

// HIGH1252 maps bytes 0x80-0x9F of Windows-1252 (WHATWG Encoding Standard,
// index-windows-1252); every other byte is the Latin-1 code point. Decoded
// here, not with TextDecoder, because some runtimes (Node.js) read
// "windows-1252" as plain Latin-1.
const HIGH1252 = [0x20ac, 0x81, 0x201a, 0x192, 0x201e, 0x2026, 0x2020, 0x2021, 0x2c6, 0x2030, 0x160, 0x2039, 0x152, 0x8d, 0x17d, 0x8f,
  0x90, 0x2018, 0x2019, 0x201c, 0x201d, 0x2022, 0x2013, 0x2014, 0x2dc, 0x2122, 0x161, 0x203a, 0x153, 0x9d, 0x17e, 0x178];

function decode1252(u8) {
  let out = "";
  for (let i = 0; i < u8.length; i += 0x4000) {
    const part = u8.subarray(i, i + 0x4000);
    const codes = new Array(part.length);
    for (let k = 0; k < part.length; k++) {
      const b = part[k];
      codes[k] = b >= 0x80 && b <= 0x9f ? HIGH1252[b - 0x80] : b;
    }
    out += String.fromCharCode.apply(null, codes);
  }
  return out;
}

function encodingNote(u8) {
  let n = 0;
  for (let i = 0; i < u8.length; i++) if (u8[i] >= 0x80) n++;
  return "This file is not UTF-8; it was read as Windows-1252 (Latin-1), where " + n +
    (n === 1 ? " byte stands" : " bytes stand") + " for letters such as ä, é or ß. Check the names below; save the file as UTF-8 to be sure.";
}

// delimiterOf guesses how a line's fields are separated: the first of tab,
// semicolon or comma found outside quotes, else runs of spaces.
export function delimiterOf(line) {
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === "\t" || ch === ";" || ch === ",")) return ch;
  }
  return " ";
}

// fieldRange gives [start, end) of field `column` (1-based) of line `line`
// (1-based) of text, or the whole line when column is 0 or past the end.
// CSV fields keep their quotes out of the selection.
export function fieldRange(text, line, column) {
  const lines = text.split("\n");
  let pos = 0;
  for (let i = 0; i < line - 1 && i < lines.length; i++) pos += lines[i].length + 1;
  const row = (lines[line - 1] || "").replace(/\r$/, "");
  const whole = [pos, pos + row.length];
  if (!(column > 0)) return whole;
  const d = delimiterOf(row);
  if (d === " ") {
    const re = /\S+/g;
    let m, k = 0;
    while ((m = re.exec(row))) if (++k === column) return [pos + m.index, pos + m.index + m[0].length];
    return whole;
  }
  let k = 1, start = 0, quoted = false;
  for (let i = 0; i <= row.length; i++) {
    const ch = row[i];
    if (ch === '"') quoted = !quoted;
    if (i === row.length || (!quoted && ch === d)) {
      if (k === column) {
        let a = start, b = i;
        while (a < b && row[a] === " ") a++;
        while (b > a && row[b - 1] === " ") b--;
        if (b - a >= 2 && row[a] === '"' && row[b - 1] === '"') {
          a++;
          b--;
        }
        return [pos + a, pos + b];
      }
      k++;
      start = i + 1;
    }
  }
  return whole;
}
