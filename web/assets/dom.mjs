// Small DOM helpers shared by the page's modules.

export const $ = (id) => document.getElementById(id);

export function el(tag, cls, text) {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

export function setStatus(text, kind) {
  const s = $("status");
  s.textContent = text;
  s.dataset.kind = kind || "info";
}

// markup parses the rows built as HTML text into a fragment and sets the
// inline left and width of each element marked data-p from spots (two per
// mark, in document order): set through the style object, which the page's
// Content-Security-Policy (style-src without 'unsafe-inline') allows where
// style attributes written in the text would be refused.
export function markup(html, spots) {
  const body = document.createElement("template");
  body.innerHTML = html.join("");
  const marks = body.content.querySelectorAll("[data-p]");
  for (let i = 0; i < marks.length; i++) {
    const st = marks[i].style;
    st.left = spots[2 * i];
    st.width = spots[2 * i + 1];
  }
  return body.content;
}
