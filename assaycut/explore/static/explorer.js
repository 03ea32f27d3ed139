// assaycut cut-point explorer: plain JavaScript, no build step, no third-party code.
// Draws each crude's TBP curve in SVG with the cut points as draggable handles, and asks the local server
// (/api/cut, /api/worth) for the cut table at the handles' positions.
"use strict";

const TOKEN = new URLSearchParams(window.location.search).get("token") || "";
const SVG_NS = "http://www.w3.org/2000/svg";
// Crude colours of our own, chosen to stay apart for red-green colour-blind readers (blue / orange / sky /
// brown / rose / green differ in lightness as well as hue), each with its own dash pattern and a name label
// at the end of its curve; handles use HANDLE_COLOUR, which no crude uses.
const PALETTE = ["#1f4e9c", "#e08a1e", "#6fb7e8", "#7a4f00", "#c94f8a", "#3f8f5f", "#444c9e", "#b0a23a"];
const DASHES = ["none", "9 3", "3 3", "12 3 3 3", "6 6", "2 5", "14 4", "5 2 1 2"];
const HANDLE_COLOUR = "#3b3b3b";
const HANDLE_MOVED = "#6a3d9a";
const LOWEST_CUT_C = -40;       // the first cut point stays above this (propane boils at -42 °C) [°C]
const SHOWN_AT_START = 3;       // crudes shown side by side when the page opens
const STEP_C = 0.5;             // handle positions snap to this [°C]
const MIN_GAP_C = 1.0;          // a cut point stays this far from its neighbours [°C]
const KEY_STEP_C = 1.0;         // an arrow key moves a focused handle this far [°C]; with Shift, KEY_BIG_STEP_C
const KEY_BIG_STEP_C = 10.0;
const CHART = { w: 660, h: 400, left: 56, right: 172, top: 14, bottom: 40 };
const CHART_FLOOR_C = 50;       // the chart starts this far below the lowest cut point (light ends below it clip)

const state = {
  crudes: [],          // from /api/assays
  cuts: [],            // [{name, end_c, swing}]
  start: {},           // starting cut points {cut: °C}
  ends: {},            // current cut points {cut: °C}
  shown: new Set(),    // crude names shown
  prices: false,
  currency: "",
  results: {},         // name -> yields JSON at the current cut points
  baseline: {},        // name -> yields JSON at the starting cut points
  worth: {},           // name -> worth JSON (current)
  worthStart: {},      // name -> worth JSON (start)
  pending: {},         // name -> {busy, again}
  scale: null,
  precision: {},       // column -> [kind, n], the reports' digits rule (from /api/assays)
};

// ---------- server calls ----------
async function api(path, body, asBlob) {
  const opts = { headers: { "Authorization": "Bearer " + TOKEN } };
  if (body !== undefined) {
    opts.method = "POST";
    opts.headers["Content-Type"] = "application/json";
    opts.body = JSON.stringify(body);
  }
  const res = await fetch(path, opts);
  if (!res.ok) {
    let msg = res.status + " " + res.statusText;
    try { msg = (await res.json()).error || msg; } catch (e) { /* not JSON */ }
    throw new Error(msg);
  }
  return asBlob ? res.blob() : res.json();
}

function say(text, isError) {
  const box = document.getElementById("toast");
  box.textContent = text;
  box.className = "toast shown" + (isError ? " error" : "");
  clearTimeout(say.timer);
  say.timer = setTimeout(() => { box.className = "toast"; }, isError ? 6000 : 1500);
}

// ---------- small helpers ----------
function el(tag, attrs, text) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (k === "class") e.className = v; else e.setAttribute(k, v);
  }
  if (text !== undefined && text !== null) e.textContent = text;
  return e;
}
function svg(tag, attrs) {
  const e = document.createElementNS(SVG_NS, tag);
  for (const [k, v] of Object.entries(attrs || {})) e.setAttribute(k, v);
  return e;
}
function num(v, nd) {
  if (v === null || v === undefined || Number.isNaN(v)) return "–";
  const s = Number(v).toFixed(nd);
  return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
}
// The digits of a column by the reports' rule (server: assaycut.report.precision, sent as state.precision):
// ["dp", n] decimals, or ["sig", n] significant digits (never an exponent).
function decimalsFor(key, v) {
  const [kind, n] = state.precision[key] || ["sig", 3];
  if (kind === "dp") return n;
  const x = Math.abs(Number(v));
  if (!(x > 0) || !Number.isFinite(x)) return Math.max(n - 1, 0);
  return Math.max(n - 1 - Math.floor(Math.log10(x)), 0);
}
function show(key, v) {
  if (v === null || v === undefined || Number.isNaN(v)) return "–";
  const [kind, n] = state.precision[key] || ["sig", 3];
  let x = Number(v);
  if (kind === "sig" && x !== 0) { const f = Math.pow(10, n - 1 - Math.floor(Math.log10(Math.abs(x)))); x = Math.round(x * f) / f; }
  return num(x, decimalsFor(key, x));
}
// A change: empty when it shows as zero (no "±0.00" before anything moved).
function signed(key, v) {
  if (v === null || v === undefined || Number.isNaN(v)) return "";
  const s = show(key, v);
  if (Number(s) === 0) return "";
  return (v > 0 ? "+" : "") + s;
}
// A value beside its limit: one decimal more than the limit's own numbers.
function limitShown(v, limitText) {
  const nds = (String(limitText).match(/\d+(?:\.(\d+))?/g) || []).map(m => (m.split(".")[1] || "").length);
  return num(v, (nds.length ? Math.max(...nds) : 1) + 1);
}
function colourOf(name) {
  const i = state.crudes.findIndex(c => c.name === name);
  return PALETTE[i % PALETTE.length];
}
function dashOf(name) {
  const i = state.crudes.findIndex(c => c.name === name);
  return DASHES[i % DASHES.length];
}
function cutPoints() { return state.cuts.slice(0, -1).map(c => c.name); }

// ---------- chart ----------
function makeScale() {
  let lo = Infinity, hi = -Infinity;
  for (const c of state.crudes) hi = Math.max(hi, c.curve.temp_c[c.curve.temp_c.length - 1]);
  for (const t of Object.values(state.start)) { lo = Math.min(lo, t); hi = Math.max(hi, t); }
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
  const step = (s.hi - s.lo) > 600 ? 100 : 50;
  for (let t = s.lo; t <= s.hi + 1e-9; t += step) {
    g.append(svg("line", { x1: s.x0, x2: s.x1, y1: s.y(t), y2: s.y(t), stroke: "#eee9dd" }));
    const tx = svg("text", { x: s.x0 - 6, y: s.y(t) + 4, "text-anchor": "end" });
    tx.textContent = t;
    g.append(tx);
  }
  const xl = svg("text", { x: (s.x0 + s.x1) / 2, y: CHART.h - 6, "text-anchor": "middle" });
  xl.textContent = "distilled, vol % of crude";
  const yl = svg("text", { x: 14, y: (s.y0 + s.y1) / 2, "text-anchor": "middle",
                           transform: `rotate(-90 14 ${(s.y0 + s.y1) / 2})` });
  yl.textContent = "TBP, °C";
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
                         "aria-label": `${name} end, °C (arrow keys: 1 °C, with Shift: 10 °C)`,
                         "aria-valuenow": num(t, 1), "aria-valuemin": num(bounds(name)[0], 1),
                         "aria-valuemax": num(bounds(name)[1], 1), "aria-valuetext": `${num(t, 1)} °C` });
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
    label.textContent = `${num(t, 1)} ${name}`;
    const grab = svg("rect", { x: s.x0, y: y - 5, width: s.x1 - s.x0, height: 10, fill: "transparent" });
    h.append(grab, knob, label);
    g.append(h);
    h.addEventListener("pointerdown", ev => startDrag(ev, name, h));
    h.addEventListener("keydown", ev => {
      const step = { ArrowUp: 1, ArrowRight: 1, ArrowDown: -1, ArrowLeft: -1 }[ev.key];
      if (!step) return;
      ev.preventDefault();
      setEnd(name, state.ends[name] + step * (ev.shiftKey ? KEY_BIG_STEP_C : KEY_STEP_C));
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
    setEnd(name, Math.round(state.scale.t(local.y) / STEP_C) * STEP_C);
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

function bounds(name) {
  const names = cutPoints();
  const i = names.indexOf(name);
  const lo = i > 0 ? state.ends[names[i - 1]] + MIN_GAP_C : Math.max(state.scale.lo, LOWEST_CUT_C);
  const hi = i < names.length - 1 ? state.ends[names[i + 1]] - MIN_GAP_C : state.scale.hi;
  return [lo, hi];
}

function setEnd(name, t) {
  const [lo, hi] = bounds(name);
  t = Math.min(Math.max(t, lo), hi);
  if (t === state.ends[name]) return;
  state.ends[name] = t;
  const input = document.querySelector(`input[data-cut-point="${CSS.escape(name)}"]`);
  if (input) { input.value = num(t, 1); input.classList.toggle("moved", t !== state.start[name]); input.classList.remove("bad"); }
  drawHandles();
  refreshAll();
}

// ---------- cut-point fields ----------
function drawFields() {
  const box = document.getElementById("cut-fields");
  box.replaceChildren();
  for (const name of cutPoints()) {
    const lab = el("label", {}, name);
    const inp = el("input", { type: "number", step: "any", "data-cut-point": name, "aria-label": `${name} end, °C` });
    inp.value = num(state.ends[name], 1);
    const unit = el("span", { class: "quiet" }, "°C");
    const wrap = el("span");
    const err = el("span", { class: "field-error", role: "alert", "data-field-error": name });
    wrap.append(inp, unit);
    lab.append(wrap);
    inp.addEventListener("change", () => {
      const t = Number(inp.value);
      const [lo, hi] = bounds(name);
      if (inp.value.trim() === "" || !Number.isFinite(t) || t < lo || t > hi) {
        // said beside the field; the field goes back to the cut point the page still uses
        err.textContent = `${inp.value.trim() || "(empty)"} refused: give ${num(lo, 1)} to ${num(hi, 1)} °C`;
        inp.value = num(state.ends[name], 1);
        inp.classList.add("bad");
        return;
      }
      err.textContent = "";
      inp.classList.remove("bad");
      setEnd(name, t);
    });
    box.append(lab, err);
  }
}

// ---------- asking the server ----------
function refreshAll() {
  for (const name of state.shown) refresh(name);
}

function refresh(name) {
  const p = state.pending[name] || (state.pending[name] = { busy: false, again: false });
  if (p.busy) { p.again = true; return; }
  p.busy = true;
  const body = { assay: name, ends: { ...state.ends } };
  const asks = [api("/api/cut", body)];
  if (state.prices) asks.push(api("/api/worth", body));
  Promise.all(asks).then(([cut, worth]) => {
    state.results[name] = cut;
    if (worth) state.worth[name] = worth;
    drawPanel(name);
  }).catch(err => say(`${name}: ${err.message}`, true)).finally(() => {
    p.busy = false;
    if (p.again) { p.again = false; refresh(name); }
  });
}

// ---------- panels ----------
const CUT_COLUMNS = [
  // [key, header, decimals, delta?]
  ["vol_pct", "vol %", "vol_pct", true],
  ["wt_pct", "wt %", "wt_pct", true],
  ["api", "API", "api", false],
  ["sg", "SG", "sg", false],
  ["sulfur_wt_pct", "S wt %", "sulfur_wt_pct", false],
  ["watson_k", "Kw", "watson_k", false],
  ["d86_10", "D86 10 °C", "d86_10_c", false],
  ["d86_90", "D86 90 °C", "d86_90_c", false],
  ["flash_c_est", "Flash °C*", "flash_c_est", false],
  ["cetane_index_d4737", "CCI", "cetane_index_d4737", false],
  ["freeze_point_c", "Freeze °C", "freeze_point_c", false],
  ["smoke_point_mm", "Smoke mm", "smoke_point_mm", false],
  ["cloud_point_c", "Cloud °C", "cloud_point_c", false],
  ["viscosity_40c_cst", "ν40 cSt", "viscosity_40c_cst", false],
];

function cellValue(cut, key) {
  if (key === "d86_10") return cut.d86_c ? cut.d86_c["10"] : null;
  if (key === "d86_90") return cut.d86_c ? cut.d86_c["90"] : null;
  return cut[key];
}

function drawPanels() {
  const box = document.getElementById("crude-panels");
  box.replaceChildren();
  for (const c of state.crudes) {
    if (!state.shown.has(c.name)) continue;
    const panel = el("article", { class: "panel", "data-crude": c.name });
    panel.style.setProperty("--crude", colourOf(c.name));
    box.append(panel);
    drawPanel(c.name);
  }
}

function drawPanel(name) {
  const panel = document.querySelector(`article.panel[data-crude="${CSS.escape(name)}"]`);
  const doc = state.results[name];
  if (!panel || !doc) return;
  const base = state.baseline[name];
  const crude = state.crudes.find(c => c.name === name);
  panel.replaceChildren();
  panel.append(el("h2", {}, name));
  panel.append(el("p", { class: "meta" }, `${crude.origin ? crude.origin + " · " : ""}${show("api", crude.api)} °API, `
    + `SG ${show("sg", crude.sg)}, sulfur ${show("sulfur_wt_pct", crude.sulfur_wt_pct)} wt % · ${crude.source}`));
  if (state.prices && state.worth[name]) panel.append(worthLine(name));

  const table = el("table", { class: "cuts" });
  const head = el("tr");
  head.append(el("th", {}, "Cut"), el("th", {}, "TBP °C"));
  for (const [, h, , d] of CUT_COLUMNS) {
    head.append(el("th", {}, h));
    if (d) head.append(el("th", {}, "Δ"));
  }
  head.append(el("th", {}, ""));
  table.append(head);
  doc.cuts.forEach((cut, i) => {
    const tr = el("tr", { "data-cut": cut.name });
    if (cut.extrapolated) tr.classList.add("on-extension");
    const range = `${cut.start_c === null ? "IBP" : num(cut.start_c, 1)} – ${cut.end_c === null ? "EP" : num(cut.end_c, 1)}`;
    tr.append(el("td", {}, cut.name), el("td", {}, range));
    const est = new Set(cut.estimated || []);
    const scope = new Set(cut.out_of_scope || []);
    const was = base ? base.cuts[i] : null;
    for (const [key, , rule, d] of CUT_COLUMNS) {
      let text = show(rule, cellValue(cut, key));
      if (est.has(key) && text !== "–") text += "~";
      if (scope.has(key) && text !== "–") text += "?";
      tr.append(el("td", { "data-col": key }, text));
      if (d) tr.append(el("td", { class: "delta", "data-col": key + "_delta" },
                          was ? signed(rule, cut[key] - was[key]) : ""));
    }
    const flags = el("td");
    if (cut.extrapolated) flags.append(el("span", { class: "badge", title: "depends on the curve's fitted extension" }, "ext"));
    tr.append(flags);
    table.append(tr);
  });
  const scroll = el("div", { class: "scroll" });
  scroll.append(table);
  panel.append(scroll);
  panel.append(limitsTable(doc, base));
  const det = el("details");
  det.append(el("summary", {}, `${doc.warnings.length} warning(s), methods and notes`));
  const ul = el("ul");
  for (const w of doc.warnings) ul.append(el("li", {}, "warning: " + w));
  for (const n of doc.notes.slice(4)) ul.append(el("li", {}, n));
  det.append(ul);
  panel.append(det);
  const actions = el("div", { class: "actions" });
  const dl = el("button", { type: "button", "data-download-report": name }, "Download report workbook (.xlsx)");
  dl.addEventListener("click", () => download("/api/report", { assay: name, ends: { ...state.ends } },
                                              `${name.replace(/[^A-Za-z0-9._-]+/g, "_")}_yields.xlsx`));
  actions.append(dl);
  panel.append(actions);
}

function worthLine(name) {
  const w = state.worth[name], w0 = state.worthStart[name];
  const p = el("p", { class: "worth", "data-worth": name });
  const cur = state.currency;
  const dw = w0 ? w.worth_per_bbl - w0.worth_per_bbl : null;
  p.append(document.createTextNode("Worth "), el("b", {}, `${num(w.worth_per_bbl, 2)} ${cur}/bbl`));
  if (dw !== null && signed("worth_per_bbl", dw)) {
    p.append(el("span", { class: dw > 0 ? "up" : "down" }, ` (${signed("worth_per_bbl", dw)} vs start)`));
  }
  if (w.margin_per_bbl !== null) {
    p.append(document.createTextNode(" · margin "), el("b", {}, `${num(w.margin_per_bbl, 2)} ${cur}/bbl`));
  } else {
    p.append(document.createTextNode(" · no crude price, no margin"));
  }
  p.title = w.notes.join(" ");
  return p;
}

function limitsTable(doc, base) {
  // The limits that fail, cannot be evaluated, or changed status since the starting cut points are listed;
  // every limit is in the "all limits" list below them.
  const wrap = el("div", { class: "limits" });
  const was = i => (base && base.limits[i] ? base.limits[i].status : "");
  const fails = doc.limits.filter(l => l.status === "fail").length;
  const flipped = doc.limits.filter((l, i) => was(i) && was(i) !== l.status).length;
  wrap.append(el("h3", { "data-limits-summary": doc.assay.name },
                 `Limits: ${fails} fail of ${doc.limits.length}` + (flipped ? ` · ${flipped} changed since start` : "")));
  const rows = (keep) => {
    const t = el("table");
    const head = el("tr");
    for (const h of ["Cut", "Limit", "Required", "Value", "Status", "At start"]) head.append(el("th", { class: "text" }, h));
    t.append(head);
    doc.limits.forEach((l, i) => {
      if (!keep(l, i)) return;
      const tr = el("tr", { "data-limit": `${l.cut}|${l.property}` });
      if (was(i) && was(i) !== l.status) tr.classList.add("flipped");
      const cls = "verdict status-" + (l.status === "n/a" ? "na" : l.status);
      tr.append(el("td", {}, l.cut), el("td", { class: "text" }, l.label), el("td", { class: "text" }, l.limit),
                el("td", {}, typeof l.value === "number" ? limitShown(l.value, l.limit) : "–"),
                el("td", { class: cls, title: l.note || l.source }, l.status), el("td", { class: "text" }, was(i)));
      t.append(tr);
    });
    return t;
  };
  const notable = (l, i) => l.status !== "pass" || (was(i) && was(i) !== l.status);
  if (doc.limits.some(notable)) wrap.append(rows(notable));
  const all = el("details");
  all.append(el("summary", {}, `all ${doc.limits.length} limits`), rows(() => true));
  wrap.append(all);
  return wrap;
}

async function download(path, body, filename) {
  try {
    const blob = await api(path, body, true);
    const a = el("a", { href: URL.createObjectURL(blob), download: filename });
    document.body.append(a);
    a.click();
    setTimeout(() => { URL.revokeObjectURL(a.href); a.remove(); }, 1000);
    say(`saved ${filename}`);
  } catch (err) {
    say(err.message, true);
  }
}

// ---------- crude picker, legend ----------
function drawPicker() {
  const box = document.getElementById("crude-picker");
  box.replaceChildren();
  for (const c of state.crudes) {
    const lab = el("label");
    lab.style.setProperty("--crude", colourOf(c.name));
    const box2 = el("input", { type: "checkbox", "data-show": c.name });
    box2.checked = state.shown.has(c.name);
    box2.addEventListener("change", () => {
      if (box2.checked) state.shown.add(c.name); else state.shown.delete(c.name);
      drawChart();
      drawPanels();
      loadCrude(c.name);
    });
    lab.append(box2, el("span", { class: "swatch" }), document.createTextNode(c.name));
    box.append(lab);
  }
}

async function loadCrude(name) {
  if (!state.shown.has(name)) return;
  if (!state.baseline[name]) {
    const body = { assay: name, ends: { ...state.start } };
    state.baseline[name] = await api("/api/cut", body);
    if (state.prices) state.worthStart[name] = await api("/api/worth", body);
  }
  refresh(name);
}

function drawFooter(notes) {
  const marks = document.getElementById("legend-marks");
  marks.replaceChildren(
    el("span", {}, "~ estimated in whole or part (a correlation, or the nearest measured cut, where no narrow cut measured it)"),
    el("span", {}, "? outside the correlation's published scope: indicative only"),
    el("span", {}, "ext: the cut depends on the curve's fitted extension"),
    el("span", {}, "* flash points are correlation estimates: measure them (ASTM D93)"),
    el("span", {}, "Δ: change from the starting cut points"));
  const ul = document.getElementById("cautions");
  ul.replaceChildren(...notes.map(n => el("li", {}, n)));
}

async function main() {
  try {
    const doc = await api("/api/assays");
    state.crudes = doc.assays;
    state.cuts = doc.cut_set.cuts;
    state.prices = doc.prices;
    state.currency = doc.currency || "";
    state.precision = doc.precision || {};
    for (const c of cutPoints()) {
      const end = state.cuts.find(k => k.name === c).end_c;
      state.start[c] = end;
      state.ends[c] = end;
    }
    state.crudes.slice(0, SHOWN_AT_START).forEach(c => state.shown.add(c.name));
    state.scale = makeScale();
    document.getElementById("cut-source").textContent = `Starting cut points: ${doc.cut_set.label}; `
      + `${doc.limits} product limits${doc.prices ? "; prices loaded" : ""}.`;
    drawPicker();
    drawChart();
    drawFields();
    drawPanels();
    drawFooter(doc.notes);
    document.getElementById("reset").addEventListener("click", () => {
      Object.assign(state.ends, state.start);
      drawFields();
      drawHandles();
      refreshAll();
    });
    document.getElementById("save-cuts").addEventListener("click",
      () => download("/api/cutset", { ends: { ...state.ends } }, "cuts_explored.toml"));
    await Promise.all([...state.shown].map(loadCrude));
    document.body.dataset.ready = "yes";
  } catch (err) {
    say(err.message, true);
  }
}

document.addEventListener("DOMContentLoaded", main);
