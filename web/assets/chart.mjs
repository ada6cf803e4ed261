// The best cost over the search time, as a small step chart.

import { $ } from "./dom.mjs";
import { clock, longDuration } from "./fmt.mjs";

const SVG_NS = "http://www.w3.org/2000/svg";
function svgEl(tag, attrs) {
  const e = document.createElementNS(SVG_NS, tag);
  for (const k in attrs) e.setAttribute(k, attrs[k]);
  return e;
}

// drawChart: history is [[seconds, cost, feasible]], budget the run's
// seconds, now the last progress time, completion whether costs are clock
// times.
export function drawChart(history, budget, now, model, completion) {
  const box = $("chart");
  const W = 320, H = 110, L = 58, R = 8, T = 8, B = 20;
  const s = svgEl("svg", { viewBox: "0 0 " + W + " " + H, role: "img", class: "chart-svg" });
  const tEnd = Math.max(budget || 1, 0.001);
  const costText = (c) => (completion ? clock(c, model) : longDuration(c, model));
  s.setAttribute("aria-label", history.length
    ? "Best plan over time: " + costText(history[0][1]) + " at first, " + costText(history[history.length - 1][1]) + " now, after " + history.length + " better plans"
    : "Best plan over time: no plan yet");
  s.appendChild(svgEl("rect", { x: L, y: T, width: W - L - R, height: H - T - B, class: "plot" }));
  if (history.length) {
    let lo = Infinity, hi = -Infinity;
    for (const [, c] of history) {
      lo = Math.min(lo, c);
      hi = Math.max(hi, c);
    }
    if (hi === lo) {
      hi += 1;
      lo -= 1;
    }
    const xs = (t) => L + (Math.min(t, tEnd) / tEnd) * (W - L - R);
    const ys = (c) => T + (1 - (c - lo) / (hi - lo)) * (H - T - B);
    let d = "";
    history.forEach(([t, c], i) => {
      d += i === 0 ? "M" + xs(t) + " " + ys(c) : "H" + xs(t) + "V" + ys(c);
    });
    d += "H" + xs(Math.max(now || 0, history[history.length - 1][0]));
    s.appendChild(svgEl("path", { d: d, class: "line" }));
    const last = history[history.length - 1];
    s.appendChild(svgEl("circle", { cx: xs(last[0]), cy: ys(last[1]), r: 3, class: last[2] ? "dot" : "dot late" }));
    for (const [v, y] of [[hi, T + 8], [lo, H - B]]) {
      const t = svgEl("text", { x: L - 4, y: y, class: "ylab" });
      t.textContent = costText(v);
      s.appendChild(t);
    }
  }
  for (const [txt, x, anchor] of [["0 s", L, "start"], [Math.round(tEnd * 10) / 10 + " s", W - R, "end"]]) {
    const t = svgEl("text", { x: x, y: H - 5, class: "xlab", "text-anchor": anchor });
    t.textContent = txt;
    s.appendChild(t);
  }
  box.textContent = "";
  box.appendChild(s);
}
