// assaycut cut-point explorer: plain JavaScript, no build step, no third-party code.
// Four plain scripts share one scope, loaded in order: explorer.js (state, server calls, units and digits,
// cut-point fields, start), chart.js (the TBP chart and its handles), panels.js (one panel per crude),
// views.js (crudes side by side, the yield chart, named scenarios, loading a cut set).
"use strict";

const TOKEN = new URLSearchParams(window.location.search).get("token") || "";
const SVG_NS = "http://www.w3.org/2000/svg";
// Crude colours of our own, chosen to stay apart for red-green colour-blind readers (blue / orange / sky /
// brown / rose / green differ in lightness as well as hue), each with its own dash pattern and a name label
// at the end of its curve; handles use HANDLE_COLOUR, which no crude uses.
const PALETTE = ["#1f4e9c", "#e08a1e", "#6fb7e8", "#7a4f00", "#c94f8a", "#3f8f5f", "#444c9e", "#b0a23a"];
const DASHES = ["none", "9 3", "3 3", "12 3 3 3", "6 6", "2 5", "14 4", "5 2 1 2"];
const LOWEST_CUT_C = -40;       // the first cut point stays above this (propane boils at -42 °C) [°C]
const SHOWN_AT_START = 3;       // crudes shown side by side when the page opens
const MIN_GAP_C = 1.0;          // a cut point stays this far from its neighbours [°C]

const state = {
  crudes: [],          // from /api/assays
  cuts: [],            // [{name, end_c, swing}]
  start: {},           // starting cut points {cut: °C}
  ends: {},            // current cut points {cut: °C}
  shown: new Set(),    // crude names shown
  prices: false,
  currency: "",
  unit: "C",           // temperatures shown in "C" or "F" (the server always speaks °C)
  rate: null,          // crude run [bbl/d] or null
  maxRate: 0,          // the largest crude run the server accepts [bbl/d] (from /api/assays)
  results: {},         // name -> yields JSON at the current cut points
  baseline: {},        // name -> yields JSON at the starting cut points
  worth: {},           // name -> worth JSON (current)
  worthStart: {},      // name -> worth JSON (start)
  pending: {},         // name -> {busy, again}
  scale: null,
  precision: {},       // column -> [kind, n], the reports' digits rule (from /api/assays)
  units: {},           // column -> unit ("°C" marks a temperature), from /api/assays
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

// The body of a cut request: the crude, the cut points [°C] and, when one is given, the crude run [bbl/d].
function cutBody(name, ends) {
  const body = { assay: name, ends: { ...ends } };
  if (state.rate) body.rate_bbl_per_day = state.rate;
  return body;
}

// Answers kept by request, so that a scenario or a view drawn again does not ask twice.
const answers = new Map();
function ask(path, body) {
  const key = path + JSON.stringify(body);
  if (!answers.has(key)) {
    answers.set(key, api(path, body).catch(err => { answers.delete(key); throw err; }));
    if (answers.size > 400) answers.delete(answers.keys().next().value);
  }
  return answers.get(key);
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

// ---------- units: the server speaks °C; the page shows °C or °F ----------
function inF() { return state.unit === "F"; }
function unitT() { return inF() ? "°F" : "°C"; }
function isTemp(key) { return state.units[key] === "°C"; }
function tShown(c) { return c === null || c === undefined ? c : (inF() ? c * 1.8 + 32 : c); }  // a temperature
function tFromShown(v) { return inF() ? (v - 32) / 1.8 : v; }                                 // back to °C
// A column's value (or change) in the unit shown: temperatures in °F on request (a change by 1.8 alone).
function inUnit(key, v, isChange) {
  if (v === null || v === undefined || !isTemp(key) || !inF()) return v;
  return isChange ? v * 1.8 : v * 1.8 + 32;
}
// A header with the temperature unit shown: "{T}" becomes °C or °F.
function withUnit(text) { return text.replace("{T}", unitT()); }
// A limit's wording in the unit shown: its numbers in °F when its unit is °C (each keeps its decimals).
function limitText(l) {
  if (l.unit !== "°C" || !inF()) return l.limit;
  return l.limit.replace(/-?\d+(?:\.(\d+))?/g, (m, d) => num(tShown(Number(m)), (d || "").length));
}

// ---------- digits ----------
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
// A value of column key, in the unit shown, with its digits.
function showIn(key, v) { return show(key, inUnit(key, v)); }
// A change: empty when it shows as zero (no "±0.00" before anything moved).
function signed(key, v) {
  if (v === null || v === undefined || Number.isNaN(v)) return "";
  const s = show(key, inUnit(key, v, true));
  if (Number(s) === 0) return "";
  return (v > 0 ? "+" : "") + s;
}
// A value beside its limit: one decimal more than the limit's own numbers.
function limitShown(v, text) {
  const nds = (String(text).match(/\d+(?:\.(\d+))?/g) || []).map(m => (m.split(".")[1] || "").length);
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
function shownCrudes() { return state.crudes.filter(c => state.shown.has(c.name)).map(c => c.name); }

// ---------- cut points ----------
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
  if (input) { input.value = num(tShown(t), 1); input.classList.toggle("moved", t !== state.start[name]); input.classList.remove("bad"); }
  drawHandles();
  refreshAll();
}

// Every cut point at once (a scenario, a loaded cut set, the start): the chart widens to hold them.
function setAllEnds(ends) {
  Object.assign(state.ends, ends);
  state.scale = makeScale();
  drawChart();
  drawFields();
  refreshAll();
}

function drawFields() {
  const box = document.getElementById("cut-fields");
  box.replaceChildren();
  document.getElementById("fields-title").textContent = `Cut points, end of each cut [${unitT()} TBP]`;
  for (const name of cutPoints()) {
    const lab = el("label", {}, name);
    const inp = el("input", { type: "number", step: "any", "data-cut-point": name,
                              "aria-label": `${name} end, ${unitT()}` });
    inp.value = num(tShown(state.ends[name]), 1);
    inp.classList.toggle("moved", state.ends[name] !== state.start[name]);
    const wrap = el("span");
    const err = el("span", { class: "field-error", role: "alert", "data-field-error": name });
    wrap.append(inp, el("span", { class: "quiet" }, unitT()));
    lab.append(wrap);
    inp.addEventListener("change", () => {
      const t = tFromShown(Number(inp.value));
      const [lo, hi] = bounds(name);
      if (inp.value.trim() === "" || !Number.isFinite(t) || t < lo - 1e-9 || t > hi + 1e-9) {
        // said beside the field; the field goes back to the cut point the page still uses
        err.textContent = `${inp.value.trim() || "(empty)"} refused: give ${num(tShown(lo), 1)} to `
          + `${num(tShown(hi), 1)} ${unitT()}`;
        inp.value = num(tShown(state.ends[name]), 1);
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

// ---------- the crude run and the unit ----------
function setUpRunAndUnit() {
  const unit = document.getElementById("unit");
  unit.value = state.unit;
  unit.addEventListener("change", () => {
    state.unit = unit.value;
    drawChart();
    drawFields();
    redrawAll();
  });
  const rate = document.getElementById("rate");
  const err = document.getElementById("rate-error");
  rate.addEventListener("change", () => {
    const text = rate.value.trim();
    const v = Number(text);
    if (text !== "" && !(Number.isFinite(v) && v > 0 && v <= state.maxRate)) {
      err.textContent = `${text} refused: give a crude run above 0 and at most ${state.maxRate.toLocaleString("en")} `
        + "bbl/d, or leave it empty";
      rate.value = state.rate === null ? "" : String(state.rate);
      rate.classList.add("bad");
      return;
    }
    err.textContent = "";
    rate.classList.remove("bad");
    state.rate = text === "" ? null : v;
    state.baseline = {};
    state.worthStart = {};
    for (const name of state.shown) loadCrude(name);
  });
}

// ---------- asking the server ----------
function refreshAll() {
  for (const name of state.shown) refresh(name);
}

function refresh(name) {
  const p = state.pending[name] || (state.pending[name] = { busy: false, again: false });
  if (p.busy) { p.again = true; return; }
  p.busy = true;
  const body = cutBody(name, state.ends);
  const asks = [ask("/api/cut", body)];
  if (state.prices) asks.push(ask("/api/worth", body));
  Promise.all(asks).then(([cut, worth]) => {
    state.results[name] = cut;
    if (worth) state.worth[name] = worth;
    drawPanel(name);
    drawViews();
  }).catch(err => say(`${name}: ${err.message}`, true)).finally(() => {
    p.busy = false;
    if (p.again) { p.again = false; refresh(name); }
  });
}

async function loadCrude(name) {
  if (!state.shown.has(name)) return;
  if (!state.baseline[name]) {
    const body = cutBody(name, state.start);
    state.baseline[name] = await ask("/api/cut", body);
    if (state.prices) state.worthStart[name] = await ask("/api/worth", body);
  }
  refresh(name);
}

// Everything that shows numbers, drawn again (after a change of unit, of the crudes shown, of the run).
function redrawAll() {
  drawPanels();
  drawViews();
}

async function download(path, body, filename) {
  try {
    const blob = await api(path, body, true);
    saveBlob(blob, filename);
  } catch (err) {
    say(err.message, true);
  }
}
function saveBlob(blob, filename) {
  const a = el("a", { href: URL.createObjectURL(blob), download: filename });
  document.body.append(a);
  a.click();
  setTimeout(() => { URL.revokeObjectURL(a.href); a.remove(); }, 1000);
  say(`saved ${filename}`);
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
      redrawAll();
      loadCrude(c.name);
    });
    lab.append(box2, el("span", { class: "swatch" }), document.createTextNode(c.name));
    box.append(lab);
  }
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
    state.cutSetLabel = doc.cut_set.label;
    state.prices = doc.prices;
    state.currency = doc.currency || "";
    state.precision = doc.precision || {};
    state.units = doc.units || {};
    state.unit = doc.unit === "F" ? "F" : "C";
    state.maxRate = doc.max_rate_bbl_per_day;
    for (const c of cutPoints()) {
      const end = state.cuts.find(k => k.name === c).end_c;
      state.start[c] = end;
      state.ends[c] = end;
    }
    state.crudes.slice(0, SHOWN_AT_START).forEach(c => state.shown.add(c.name));
    state.scale = makeScale();
    document.getElementById("cut-source").textContent = `Starting cut points: ${doc.cut_set.label}; `
      + `${doc.limits} product limits${doc.prices ? "; prices loaded" : ""}.`;
    setUpRunAndUnit();
    drawPicker();
    drawChart();
    drawFields();
    drawPanels();
    setUpViews();
    drawFooter(doc.notes);
    document.getElementById("reset").addEventListener("click", () => setAllEnds(state.start));
    document.getElementById("save-cuts").addEventListener("click",
      () => download("/api/cutset", { ends: { ...state.ends } }, "cuts_explored.toml"));
    await Promise.all([...state.shown].map(loadCrude));
    document.body.dataset.ready = "yes";
  } catch (err) {
    say(err.message, true);
  }
}

document.addEventListener("DOMContentLoaded", main);
