// Keeping a session, per tab and only when asked. What is kept: the data
// read last, the text boxes as typed (read or not), the settings and the
// best plan, in this tab's sessionStorage, which other tabs and other
// local files opened in other tabs cannot read, and which the browser
// drops when the tab is closed. A share link's data, with the edits made
// after opening it, is kept beside it under its own key, so that opening a
// link never overwrites the kept session and a reload keeps the edits.
// Storage is passed in, so this module is unit-tested under Node.

export const SESSION_KEY = "visitline.session.v2";
export const LINK_KEY = "visitline.link.v2";
export const KEEP_KEY = "visitline.keep.v2";

export const KEEP_SENTENCE = "When ticked, this tab keeps the data, the text as typed, the settings and the best plan in its own session storage, " +
  "so that a reload brings them back; other tabs and files cannot read it, and closing the tab or pressing Forget removes it.";

function get(storage, key) {
  try {
    return JSON.parse(storage.getItem(key) || "null");
  } catch (e) {
    return null;
  }
}

function put(storage, key, value) {
  try {
    storage.setItem(key, JSON.stringify(value));
    return true;
  } catch (e) {
    return false;
  }
}

export function keepWanted(storage) {
  try {
    return storage.getItem(KEEP_KEY) === "yes";
  } catch (e) {
    return false;
  }
}

export function setKeep(storage, on) {
  try {
    if (on) storage.setItem(KEEP_KEY, "yes");
    else {
      storage.removeItem(KEEP_KEY);
      storage.removeItem(SESSION_KEY);
    }
  } catch (e) { /* storage off: nothing is kept */ }
}

// save writes the snapshot where it belongs: beside the link it came from
// (link: the link's payload), or as the kept session if keeping is on.
// It returns false when nothing could be written (too large, storage off).
export function save(storage, snap, link) {
  if (link) return put(storage, LINK_KEY, Object.assign({ link: link }, snap)) || put(storage, LINK_KEY, Object.assign({ link: link }, snap, { plan: null }));
  if (!keepWanted(storage)) return true;
  return put(storage, SESSION_KEY, snap) || put(storage, SESSION_KEY, Object.assign({}, snap, { plan: null }));
}

export function forget(storage) {
  setKeep(storage, false);
  try {
    storage.removeItem(LINK_KEY);
  } catch (e) { /* nothing kept */ }
}

// startup decides what the page opens with: the edited copy of the link
// in the address (a reload after edits), the link itself, an example asked
// for in the address, or the kept session.
export function startup(storage, { payload, example }) {
  const kept = keepWanted(storage) ? get(storage, SESSION_KEY) : null;
  const hasKept = !!(kept && kept.data && typeof kept.data.text === "string");
  if (payload !== null && payload !== undefined) {
    const copy = get(storage, LINK_KEY);
    if (copy && copy.link === payload && copy.data && typeof copy.data.text === "string") return { what: "link-copy", snap: copy, keptAside: hasKept };
    return { what: "link", keptAside: hasKept };
  }
  if (example) return { what: "example", example: example };
  if (hasKept) return { what: "kept", snap: kept };
  return { what: "nothing" };
}

export function readKept(storage) {
  return keepWanted(storage) ? get(storage, SESSION_KEY) : null;
}
