// assaycut explorer, one panel per crude: its cut table with the changes from the starting cut points, its
// limits, worth and notes.  (Plain script; shares the scope of explorer.js.)
"use strict";

// ---------- panels ----------
// [key, header ({T}: the temperature unit shown), precision and unit column, change column?]
const CUT_COLUMNS = [
  ["vol_pct", "vol %", "vol_pct", true],
  ["wt_pct", "wt %", "wt_pct", true],
  ["bbl_per_day", "bbl/d", "bbl_per_day", true],
  ["api", "API", "api", false],
  ["sg", "SG", "sg", false],
  ["sulfur_wt_pct", "S wt %", "sulfur_wt_pct", false],
  ["watson_k", "Kw", "watson_k", false],
  ["d86_10", "D86 10 {T}", "d86_10_c", false],
  ["d86_90", "D86 90 {T}", "d86_90_c", false],
  ["flash_c_est", "Flash {T}*", "flash_c_est", false],
  ["cetane_index_d4737", "CCI", "cetane_index_d4737", false],
  ["freeze_point_c", "Freeze {T}", "freeze_point_c", false],
  ["smoke_point_mm", "Smoke mm", "smoke_point_mm", false],
  ["cloud_point_c", "Cloud {T}", "cloud_point_c", false],
  ["viscosity_40c_cst", "ν40 cSt", "viscosity_40c_cst", false],
  ["hydrogen_wt_pct", "H wt %", "hydrogen_wt_pct", false],
  ["bmci", "BMCI", "bmci", false],
];
// The columns in use: bbl/d with a crude run only.
function cutColumns() { return CUT_COLUMNS.filter(c => c[0] !== "bbl_per_day" || state.rate); }

// A cut's TBP range in the unit shown ("IBP" and "EP" at the ends).
function tbpRange(cut) {
  return `${cut.start_c === null ? "IBP" : num(tShown(cut.start_c), 1)} – ${cut.end_c === null ? "EP" : num(tShown(cut.end_c), 1)}`;
}

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
  head.append(el("th", {}, "Cut"), el("th", {}, `TBP ${unitT()}`));
  for (const [, h, , d] of cutColumns()) {
    head.append(el("th", {}, withUnit(h)));
    if (d) head.append(el("th", {}, "Δ"));
  }
  head.append(el("th", {}, ""));
  table.append(head);
  doc.cuts.forEach((cut, i) => {
    const tr = el("tr", { "data-cut": cut.name });
    if (cut.extrapolated) tr.classList.add("on-extension");
    const range = tbpRange(cut);
    tr.append(el("td", {}, cut.name), el("td", {}, range));
    const est = new Set(cut.estimated || []);
    const scope = new Set(cut.out_of_scope || []);
    const was = base ? base.cuts[i] : null;
    for (const [key, , rule, d] of cutColumns()) {
      let text = showIn(rule, cellValue(cut, key));
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
  dl.addEventListener("click", () => download("/api/report", cutBody(name, state.ends),
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
  if (w.worth_per_day !== undefined && w.worth_per_day !== null) {
    p.append(document.createTextNode(` · per day: worth ${show("worth_per_day", w.worth_per_day)} ${cur}`
      + (w.margin_per_day !== null ? `, margin ${show("margin_per_day", w.margin_per_day)} ${cur}` : "")));
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
      const text = limitText(l);
      const shownUnit = l.unit === "°C" ? unitT() : (l.unit === "-" ? "" : l.unit);
      tr.append(el("td", {}, l.cut), el("td", { class: "text" }, l.label),
                el("td", { class: "text" }, `${text} ${shownUnit}`.trim()),
                el("td", {}, typeof l.value === "number" ? limitShown(l.unit === "°C" ? tShown(l.value) : l.value, text) : "–"),
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

