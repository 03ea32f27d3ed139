// assaycut explorer, the other views of the results: the crudes side by side (one column per crude, or its
// differences from a chosen crude), a yield bar chart, named scenarios of cut points, and loading a cut set.
// (Plain script; shares the scope of explorer.js.)
"use strict";

const VIEWS = ["crudes", "compare", "bars", "scenarios"];
const COMPARE_START_ROWS = ["vol_pct", "wt_pct", "api", "sulfur_wt_pct"];  // property rows ticked at the start
const BARS = { w: 660, h: 330, left: 48, right: 12, top: 30, bottom: 50 };
const STORE_KEY = "assaycut-scenarios";

const views = {
  active: "crudes",
  reference: "",                      // the crude the side-by-side view subtracts ("" = values)
  rows: new Set(COMPARE_START_ROWS),  // property rows of the side-by-side view
  basis: "vol_pct",                   // the yield chart's basis: vol_pct or wt_pct
  scenarios: [],                      // [{name, ends: {cut: °C}}]
};

function setUpViews() {
  for (const b of document.querySelectorAll("[data-view]")) {
    b.addEventListener("click", () => showView(b.dataset.view));
  }
  const ref = document.getElementById("reference");
  ref.replaceChildren(el("option", { value: "" }, "none: show values"),
                      ...state.crudes.map(c => el("option", { value: c.name }, c.name)));
  ref.addEventListener("change", () => { views.reference = ref.value; drawCompare(); });
  for (const b of document.querySelectorAll("input[name=basis]")) {
    b.addEventListener("change", () => { views.basis = b.value; drawBars(); });
  }
  document.getElementById("save-scenario").addEventListener("click", saveScenario);
  document.getElementById("download-scenarios").addEventListener("click", downloadScenarios);
  document.getElementById("load-cuts").addEventListener("change", loadCutSetFile);
  views.scenarios = storedScenarios();
  drawRowPicker();
}

function showView(name) {
  views.active = name;
  for (const v of VIEWS) {
    document.getElementById("view-" + v).hidden = v !== name;
    const tab = document.querySelector(`[data-view="${v}"]`);
    tab.setAttribute("aria-selected", String(v === name));
  }
  drawViews();
}

// The active view drawn again (the crude panels are drawn by refresh()).
function drawViews() {
  if (views.active === "compare") drawCompare();
  else if (views.active === "bars") drawBars();
  else if (views.active === "scenarios") drawScenarios();
}

// A table's section heading: one row, one cell across the table's columns.
function sectionRow(table, text, span, attrs) {
  const tr = el("tr", { class: "section", ...attrs });
  tr.append(el("th", { class: "text", colspan: span }, text));
  table.append(tr);
}

// ---------- crudes side by side ----------
function drawRowPicker() {
  const box = document.getElementById("compare-rows");
  box.replaceChildren(el("legend", {}, "Rows per cut"));
  for (const [key, h, rule] of CUT_COLUMNS) {
    const lab = el("label");
    const cb = el("input", { type: "checkbox", "data-row-choice": key });
    cb.checked = views.rows.has(key);
    cb.addEventListener("change", () => {
      if (cb.checked) views.rows.add(key); else views.rows.delete(key);
      drawCompare();
    });
    lab.append(cb, document.createTextNode(" " + withUnit(h).replace("*", "").replace(/ (°C|°F)$/, "")));
    lab.title = rule;
    box.append(lab);
  }
}

function drawCompare() {
  const table = document.getElementById("compare-table");
  const names = shownCrudes().filter(n => state.results[n]);
  const ref = views.reference && state.results[views.reference] ? views.reference : "";
  table.replaceChildren();
  const top = el("tr");
  top.append(el("th", { class: "text" }, ref ? `difference from ${ref}` : ""));
  for (const n of names) {
    const th = el("th", { "data-crude": n }, n === ref ? `${n} (values)` : n);
    th.style.setProperty("--crude", colourOf(n));
    th.className = "crude-head";
    top.append(th);
  }
  table.append(top);
  const row = (label, key, values, attrs) => {
    // values: per crude {v, mark}; with a reference, the others show their difference from it
    const tr = el("tr", attrs);
    tr.append(el("td", { class: "text" }, label));
    const r = ref ? values[names.indexOf(ref)] : null;
    values.forEach((cell, i) => {
      let text;
      const plain = key === "count" ? v => (v === null || v === undefined ? "–" : String(v)) : v => showIn(key, v);
      if (!ref || names[i] === ref) text = plain(cell.v) + (cell.v !== null && cell.v !== undefined ? cell.mark || "" : "");
      else text = cell.v === null || cell.v === undefined || r.v === null || r.v === undefined ? "–"
        : (key === "count" ? (cell.v - r.v > 0 ? "+" : "") + String(cell.v - r.v) : signed(key, cell.v - r.v) || "0");
      tr.append(el("td", { "data-crude": names[i] }, text));
    });
    table.append(tr);
  };
  const section = (text, attrs) => sectionRow(table, text, names.length + 1, attrs);
  section("Whole crude", { "data-section": "crude" });
  const crude = n => state.crudes.find(c => c.name === n);
  row("API", "api", names.map(n => ({ v: crude(n).api })), { "data-row": "crude_api" });
  row("SG", "sg", names.map(n => ({ v: crude(n).sg })), { "data-row": "crude_sg" });
  row("Sulfur wt %", "sulfur_wt_pct", names.map(n => ({ v: crude(n).sulfur_wt_pct })), { "data-row": "crude_sulfur" });
  if (state.prices) {
    const w = (n, k) => ({ v: state.worth[n] ? state.worth[n][k] : null });
    const cur = state.currency;
    row(`Worth ${cur}/bbl`, "worth_per_bbl", names.map(n => w(n, "worth_per_bbl")), { "data-row": "worth_per_bbl" });
    row(`Margin ${cur}/bbl`, "margin_per_bbl", names.map(n => w(n, "margin_per_bbl")), { "data-row": "margin_per_bbl" });
    if (state.rate) {
      row(`Worth ${cur}/d`, "worth_per_day", names.map(n => w(n, "worth_per_day")), { "data-row": "worth_per_day" });
      row(`Margin ${cur}/d`, "margin_per_day", names.map(n => w(n, "margin_per_day")), { "data-row": "margin_per_day" });
    }
  }
  row("Limits failing", "count", names.map(n => ({ v: state.results[n].limits.filter(l => l.status === "fail").length })),
      { "data-row": "limits_failing" });
  if (!names.length) return;
  const cols = cutColumns().filter(([key]) => views.rows.has(key));
  state.results[names[0]].cuts.forEach((first, i) => {
    section(`${first.name} · ${tbpRange(first)} ${unitT()}`, { "data-section": first.name });
    for (const [key, h, rule] of cols) {
      const cells = names.map(n => {
        const cut = state.results[n].cuts[i];
        const mark = ((cut.estimated || []).includes(key) ? "~" : "") + ((cut.out_of_scope || []).includes(key) ? "?" : "")
          + (cut.extrapolated ? " ext" : "");
        return { v: cellValue(cut, key), mark };
      });
      row(withUnit(h), rule, cells, { "data-cut": first.name, "data-row": key });
    }
  });
}

// ---------- the yield chart ----------
function drawBars() {
  const root = document.getElementById("yield-bars");
  root.replaceChildren();
  const names = shownCrudes().filter(n => state.results[n]);
  if (!names.length) return;
  const key = views.basis;
  const cuts = state.results[names[0]].cuts.map(c => c.name);
  const value = (n, i) => state.results[n].cuts[i][key];
  const startValue = (n, i) => (state.baseline[n] ? state.baseline[n].cuts[i][key] : null);
  let top = 0;
  names.forEach(n => cuts.forEach((_, i) => { top = Math.max(top, value(n, i) || 0, startValue(n, i) || 0); }));
  const step = top > 40 ? 10 : 5;
  top = Math.max(step, Math.ceil(top / step) * step);
  const x0 = BARS.left, x1 = BARS.w - BARS.right, y0 = BARS.h - BARS.bottom, y1 = BARS.top;
  const y = v => y0 - (y0 - y1) * v / top;
  const g = svg("g", { class: "tick" });
  for (let v = 0; v <= top + 1e-9; v += step) {
    g.append(svg("line", { x1: x0, x2: x1, y1: y(v), y2: y(v), stroke: "#eee9dd" }));
    const t = svg("text", { x: x0 - 5, y: y(v) + 4, "text-anchor": "end" });
    t.textContent = v;
    g.append(t);
  }
  const yl = svg("text", { x: 12, y: (y0 + y1) / 2, "text-anchor": "middle", transform: `rotate(-90 12 ${(y0 + y1) / 2})` });
  yl.textContent = key === "vol_pct" ? "yield, vol % of crude" : "yield, wt % of crude";
  g.append(yl);
  root.append(g);
  const gw = (x1 - x0) / cuts.length;
  const bw = Math.min(22, (gw * 0.8) / names.length);
  cuts.forEach((cut, i) => {
    const left = x0 + gw * i + (gw - bw * names.length) / 2;
    names.forEach((n, j) => {
      const v = value(n, i);
      if (v === null || v === undefined) return;
      const bar = svg("rect", { x: left + j * bw, y: y(v), width: bw - 1, height: y0 - y(v), fill: colourOf(n),
                                "data-crude": n, "data-cut": cut, "data-value": v });
      const tip = svg("title");
      tip.textContent = `${n}, ${cut}: ${show(key, v)} ${key === "vol_pct" ? "vol" : "wt"} %`;
      bar.append(tip);
      root.append(bar);
      const s = startValue(n, i);
      if (s !== null && s !== undefined && show(key, s) !== show(key, v)) {  // where the bar stood at the start
        root.append(svg("line", { x1: left + j * bw - 1, x2: left + (j + 1) * bw, y1: y(s), y2: y(s),
                                  stroke: HANDLE_MOVED, "stroke-width": 2, "data-start": `${n}|${cut}` }));
      }
    });
    const words = cut.split(" ");
    const lines = words.length > 1 ? [words.slice(0, Math.ceil(words.length / 2)).join(" "),
                                      words.slice(Math.ceil(words.length / 2)).join(" ")] : [cut];
    lines.forEach((line, k) => {
      const t = svg("text", { x: x0 + gw * (i + 0.5), y: y0 + 14 + 12 * k, "text-anchor": "middle",
                              "font-size": 10.5, fill: "#1e2a2f" });
      t.textContent = line;
      root.append(t);
    });
  });
  root.append(svg("line", { x1: x0, x2: x1, y1: y0, y2: y0, stroke: "#b9b2a2" }));
  // legend: each crude's colour and name; the moved-from mark
  let lx = x0;
  names.forEach(n => {
    root.append(svg("rect", { x: lx, y: 8, width: 12, height: 10, fill: colourOf(n) }));
    const t = svg("text", { x: lx + 16, y: 17, "font-size": 11, fill: "#1e2a2f" });
    t.textContent = n;
    root.append(t);
    lx += 26 + 6.5 * n.length;
  });
  root.append(svg("line", { x1: lx, x2: lx + 14, y1: 13, y2: 13, stroke: HANDLE_MOVED, "stroke-width": 2 }));
  const t = svg("text", { x: lx + 18, y: 17, "font-size": 11, fill: "#1e2a2f" });
  t.textContent = "at the starting cut points";
  root.append(t);
}

// ---------- named scenarios ----------
function storeKey() { return `${STORE_KEY}:${cutPoints().join("|")}`; }
function storedScenarios() {
  try {
    const saved = JSON.parse(window.localStorage.getItem(storeKey()) || "[]");
    return Array.isArray(saved) ? saved.filter(s => s && typeof s.name === "string" && s.ends) : [];
  } catch (e) {
    return [];  // no storage (a private window): scenarios live as long as the page
  }
}
function keepScenarios() {
  try { window.localStorage.setItem(storeKey(), JSON.stringify(views.scenarios)); } catch (e) { /* page only */ }
}

function addScenario(name, ends) {
  const at = views.scenarios.findIndex(s => s.name === name);
  const sc = { name, ends: { ...ends } };
  if (at >= 0) views.scenarios[at] = sc; else views.scenarios.push(sc);
  keepScenarios();
}

function saveScenario() {
  const box = document.getElementById("scenario-name");
  const name = box.value.trim() || `scenario ${views.scenarios.length + 1}`;
  addScenario(name, state.ends);
  box.value = "";
  showView("scenarios");
  say(`saved scenario “${name}”`);
}

function downloadScenarios() {
  const doc = { cut_set: state.cutSetLabel, unit: "°C TBP",
                scenarios: views.scenarios.map(s => ({ name: s.name, ends_c: s.ends })) };
  saveBlob(new Blob([JSON.stringify(doc, null, 2) + "\n"], { type: "application/json" }), "scenarios.json");
}

async function drawScenarios() {
  const table = document.getElementById("scenario-table");
  const columns = [{ name: "now", ends: { ...state.ends }, current: true }, ...views.scenarios];
  const names = shownCrudes();
  const drawnFor = JSON.stringify([columns, names, state.rate, state.unit]);
  drawScenarios.wanted = drawnFor;
  let docs;
  try {
    docs = await Promise.all(columns.map(sc => Promise.all(names.map(n => Promise.all([
      ask("/api/cut", cutBody(n, sc.ends)), state.prices ? ask("/api/worth", cutBody(n, sc.ends)) : null])))));
  } catch (err) {
    say(err.message, true);
    return;
  }
  if (drawScenarios.wanted !== drawnFor) return;  // a newer drawing is on its way
  table.replaceChildren();
  const top = el("tr");
  top.append(el("th", { class: "text" }, ""));
  columns.forEach(sc => top.append(el("th", { "data-scenario": sc.name }, sc.current ? "now" : sc.name)));
  table.append(top);
  const section = text => sectionRow(table, text, columns.length + 1);
  const row = (label, cells, attrs) => {
    const tr = el("tr", attrs);
    tr.append(el("td", { class: "text" }, label));
    cells.forEach((text, k) => tr.append(el("td", { "data-scenario": columns[k].name }, text)));
    table.append(tr);
  };
  section(`Cut points [${unitT()} TBP]`);
  for (const cp of cutPoints()) {
    row(cp, columns.map(sc => num(tShown(sc.ends[cp] ?? state.start[cp]), 1)), { "data-cut-point": cp });
  }
  names.forEach((n, j) => {
    section(`${n}: yields, vol %`);
    docs[0][j][0].cuts.forEach((cut, i) => {
      row(cut.name, columns.map((_, k) => show("vol_pct", docs[k][j][0].cuts[i].vol_pct)),
          { "data-crude": n, "data-cut": cut.name });
    });
    if (state.prices) {
      row(`worth ${state.currency}/bbl`, columns.map((_, k) => show("worth_per_bbl", docs[k][j][1].worth_per_bbl)),
          { "data-crude": n, "data-row": "worth_per_bbl" });
    }
    row("limits failing", columns.map((_, k) => String(docs[k][j][0].limits.filter(l => l.status === "fail").length)),
        { "data-crude": n, "data-row": "limits_failing" });
  });
  const actions = el("tr", { class: "scenario-actions" });
  actions.append(el("td"));
  columns.forEach(sc => {
    const td = el("td");
    if (!sc.current) {
      const use = el("button", { type: "button", "data-use-scenario": sc.name }, "Use");
      use.addEventListener("click", () => { setAllEnds(sc.ends); say(`cut points of “${sc.name}”`); });
      const dl = el("button", { type: "button", "data-download-scenario": sc.name }, "TOML");
      dl.title = "Download as a cut-set file (--cuts reads it)";
      dl.addEventListener("click", () => download("/api/cutset", { ends: { ...sc.ends } },
                                                  `${sc.name.replace(/[^A-Za-z0-9._-]+/g, "_")}.toml`));
      const rm = el("button", { type: "button", "data-remove-scenario": sc.name }, "Remove");
      rm.addEventListener("click", () => {
        views.scenarios = views.scenarios.filter(s => s !== sc);
        keepScenarios();
        drawScenarios();
      });
      td.append(use, dl, rm);
    }
    actions.append(td);
  });
  table.append(actions);
}

// ---------- loading a cut set ----------
async function loadCutSetFile(ev) {
  const input = ev.target;
  const file = input.files && input.files[0];
  const err = document.getElementById("load-error");
  const note = document.getElementById("load-note");
  err.textContent = "";
  note.textContent = "";
  if (!file) return;
  try {
    const doc = await api("/api/cutset/read", { file: file.name, toml: await file.text() });
    addScenario(file.name, { ...state.start, ...doc.ends });
    setAllEnds(doc.ends);
    note.textContent = [`Loaded ${file.name}; kept as a scenario.`, ...doc.notes].join(" ");
  } catch (e) {
    err.textContent = e.message;
  } finally {
    input.value = "";
  }
}
