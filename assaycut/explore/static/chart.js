// assaycut explorer, the TBP chart: each shown crude's curve, one draggable handle per cut point.
// (Plain script; shares the scope of explorer.js.)
"use strict";

const HANDLE_COLOUR = "#3b3b3b";
const HANDLE_MOVED = "#6a3d9a";
const CHART = { w: 660, h: 400, left: 56, right: 172, top: 14, bottom: 40 };
const CHART_FLOOR_C = 50;       // the chart starts this far below the lowest cut point (light ends below it clip)
// A drag snaps to STEP (0.5 °C, or 1 °F); an arrow key moves a focused handle KEY_STEP, with Shift KEY_BIG_STEP,
// in the unit shown (1 and 10 °C or °F).
const STEP = { C: 0.5, F: 1.0 };
const KEY_STEP = 1.0;
const KEY_BIG_STEP = 10.0;

function makeScale() {
  let lo = Infinity, hi = -Infinity;
  for (const c of state.crudes) hi = Math.max(hi, c.curve.temp_c[c.curve.temp_c.length - 1]);
  for (const t of [...Object.values(state.start), ...Object.values(state.ends)]) { lo = Math.min(lo, t); hi = Math.max(hi, t); }
  lo = Math.floor((lo - CHART_FLOOR_C) / 50) * 50;
  hi = Math.ceil((hi + 20) / 50) * 50;
  const x0 = CHART.left, x1 = CHART.w - CHART.right, y0 = CHART.h - CHART.bottom, y1 = CHART.top;
  return {
    lo, hi,
    x: v => x0 + (x1 - x0) * v / 100,
    y: t => y0 + (y1 - y0) * (t - lo) / (hi - lo),
    t: py => lo + (hi - lo) * (py - y0) / (y1 - y0),
    x0, x1, y0, y1,
  };
}

function volAt(curve, t) {
  // vol % where the drawn curve reaches temperature t (linear between the drawn points; for the markers only)
  const T = curve.temp_c, V = curve.vol_pct;
  if (t <= T[0]) return V[0];
  for (let i = 1; i < T.length; i++) {
    if (T[i] >= t) return T[i] === T[i - 1] ? V[i] : V[i - 1] + (V[i] - V[i - 1]) * (t - T[i - 1]) / (T[i] - T[i - 1]);
  }
  return V[V.length - 1];
}

function drawChart() {
  const s = state.scale;
  const root = document.getElementById("tbp-chart");
  root.replaceChildren();
  const g = svg("g", { class: "tick" });
  for (let v = 0; v <= 100; v += 10) {
    g.append(svg("line", { x1: s.x(v), x2: s.x(v), y1: s.y0, y2: s.y1, stroke: "#eee9dd" }));
    const tx = svg("text", { x: s.x(v), y: s.y0 + 15, "text-anchor": "middle" });
    tx.textContent = v;
    g.append(tx);
  }
  // ticks at round numbers of the unit shown
  const lo = tShown(s.lo), hi = tShown(s.hi);
  const step = (hi - lo) > (inF() ? 1000 : 600) ? 100 : 50;
  for (let v = Math.ceil(lo / step) * step; v <= hi + 1e-9; v += step) {
    const y = s.y(tFromShown(v));
    g.append(svg("line", { x1: s.x0, x2: s.x1, y1: y, y2: y, stroke: "#eee9dd" }));
    const tx = svg("text", { x: s.x0 - 6, y: y + 4, "text-anchor": "end" });
    tx.textContent = v;
    g.append(tx);
  }
  const xl = svg("text", { x: (s.x0 + s.x1) / 2, y: CHART.h - 6, "text-anchor": "middle" });
  xl.textContent = "distilled, vol % of crude";
  const yl = svg("text", { x: 14, y: (s.y0 + s.y1) / 2, "text-anchor": "middle",
                           transform: `rotate(-90 14 ${(s.y0 + s.y1) / 2})` });
  yl.textContent = `TBP, ${unitT()}`;
  g.append(xl, yl);
  g.append(svg("rect", { x: s.x0, y: s.y1, width: s.x1 - s.x0, height: s.y0 - s.y1, fill: "none", stroke: "#b9b2a2" }));
  root.append(g);

  const labels = [];
  for (const c of state.crudes) {
    if (!state.shown.has(c.name)) continue;
    const [mlo, mhi] = c.measured_vol_pct;
    const parts = { measured: [], extension: [] };
    c.curve.vol_pct.forEach((v, i) => {
      const p = `${s.x(v).toFixed(1)},${s.y(Math.min(Math.max(c.curve.temp_c[i], s.lo), s.hi)).toFixed(1)}`;
      if (v >= mlo - 1e-9 && v <= mhi + 1e-9) parts.measured.push(p);
      if (v <= mlo + 1e-9 || v >= mhi - 1e-9) parts.extension.push([v, p]);
    });
    const colour = colourOf(c.name);
    // extension drawn thin and faded before and after the measured range; the measured part in the crude's dash
    const before = parts.extension.filter(([v]) => v <= mlo + 1e-9).map(([, p]) => p);
    const after = parts.extension.filter(([v]) => v >= mhi - 1e-9).map(([, p]) => p);
    for (const pts of [before, after]) {
      if (pts.length > 1) root.append(svg("polyline", { points: pts.join(" "), fill: "none", stroke: colour,
                                                         "stroke-width": 1.4, "stroke-dasharray": "2 3",
                                                         opacity: 0.8 }));
    }
    root.append(svg("polyline", { points: parts.measured.join(" "), fill: "none", stroke: colour,
                                  "stroke-width": 2.6, "stroke-dasharray": dashOf(c.name), "data-crude": c.name }));
    // the crude's name at the end of its measured curve (placed below, after the loop, clear of the others)
    const last = parts.measured[parts.measured.length - 1];
    if (last) labels.push({ name: c.name, colour, xy: last.split(",").map(Number) });
  }
  labels.sort((a, b) => a.xy[1] - b.xy[1]);
  const placed = [];
  for (const l of labels) {
    let y = l.xy[1] - 6;
    for (const p of placed) if (Math.abs(p - y) < 13) y = p + 13;
    placed.push(y);
    const lab = svg("text", { x: l.xy[0] - 6, y, "text-anchor": "end", fill: l.colour, "font-size": 12,
                              "font-weight": 600, "data-curve-label": l.name, stroke: "#fff",
                              "stroke-width": 3, "paint-order": "stroke" });
    lab.textContent = l.name;
    root.append(lab);
  }
  const handles = svg("g", { id: "handles" });
  root.append(handles);
  drawHandles();
}

function drawHandles() {
  const s = state.scale;
  const g = document.getElementById("handles");
  const focused = document.activeElement ? document.activeElement.getAttribute("data-handle") : null;
  g.replaceChildren();
  for (const name of cutPoints()) {
    const t = state.ends[name];
    const y = s.y(t);
    const h = svg("g", { class: "handle", "data-handle": name, cursor: "ns-resize", tabindex: 0, role: "slider",
                         "aria-label": `${name} end, ${unitT()} (arrow keys: 1 ${unitT()}, with Shift: 10 ${unitT()})`,
                         "aria-valuenow": num(tShown(t), 1), "aria-valuemin": num(tShown(bounds(name)[0]), 1),
                         "aria-valuemax": num(tShown(bounds(name)[1]), 1), "aria-valuetext": `${num(tShown(t), 1)} ${unitT()}` });
    h.append(svg("line", { x1: s.x0, x2: s.x1, y1: y, y2: y, stroke: HANDLE_COLOUR, "stroke-width": 1,
                           "stroke-dasharray": t === state.start[name] ? "none" : "3 2", opacity: 0.7 }));
    for (const c of state.crudes) {
      if (!state.shown.has(c.name)) continue;
      h.append(svg("circle", { cx: s.x(volAt(c.curve, t)), cy: y, r: 3.2, fill: colourOf(c.name), stroke: "#fff",
                               "stroke-width": 1 }));
    }
    const knob = svg("rect", { x: s.x1 + 4, y: y - 9, width: CHART.right - 8, height: 18, rx: 4,
                               fill: t === state.start[name] ? HANDLE_COLOUR : HANDLE_MOVED, class: "knob" });
    const label = svg("text", { x: s.x1 + 9, y: y + 4, fill: "#fff", "font-size": 10.5, "pointer-events": "none" });
    label.textContent = `${num(tShown(t), 1)} ${name}`;
    const grab = svg("rect", { x: s.x0, y: y - 5, width: s.x1 - s.x0, height: 10, fill: "transparent" });
    h.append(grab, knob, label);
    g.append(h);
    h.addEventListener("pointerdown", ev => startDrag(ev, name, h));
    h.addEventListener("keydown", ev => {
      const step = { ArrowUp: 1, ArrowRight: 1, ArrowDown: -1, ArrowLeft: -1 }[ev.key];
      if (!step) return;
      ev.preventDefault();
      setEnd(name, tFromShown(tShown(state.ends[name]) + step * (ev.shiftKey ? KEY_BIG_STEP : KEY_STEP)));
    });
    if (focused === name) h.focus();
  }
}

function startDrag(ev, name, handle) {
  ev.preventDefault();
  const root = document.getElementById("tbp-chart");
  handle.setPointerCapture(ev.pointerId);
  const move = e => {
    const pt = root.createSVGPoint();
    pt.x = e.clientX; pt.y = e.clientY;
    const local = pt.matrixTransform(root.getScreenCTM().inverse());
    const step = STEP[state.unit];
    setEnd(name, tFromShown(Math.round(tShown(state.scale.t(local.y)) / step) * step));
  };
  const stop = () => {
    handle.removeEventListener("pointermove", move);
    handle.removeEventListener("pointerup", stop);
    handle.removeEventListener("pointercancel", stop);
  };
  handle.addEventListener("pointermove", move);
  handle.addEventListener("pointerup", stop);
  handle.addEventListener("pointercancel", stop);
}
