// The what-if page of ergostock serve: plain JavaScript, no library.
"use strict";

const $ = (id) => document.getElementById(id);
const SVGNS = "http://www.w3.org/2000/svg";
const COLORS = { blue: "#0072B2", vermilion: "#D55E00", orange: "#E69F00", green: "#009E73", grey: "#888888", light: "#dddddd" };
const SYSTEM = ["demand", "lead_time", "holding_cost", "shortage_cost", "order_cost", "unit_cost", "unmet"];
const LEVELS = ["reorder_point", "order_up_to", "order_multiple"];
const FIGURES = [
  ["fill_rate", "fill rate", ""], ["stockout_probability", "stockout probability", "per period"],
  ["mean_on_hand", "mean on hand", "units"], ["mean_backorders", "mean backorders", "units"],
  ["mean_lost_sales", "mean lost sales", "units per period"], ["order_frequency", "order frequency", "orders per period"],
  ["mean_order_quantity", "mean order quantity", "units"], ["holding_cost", "holding cost", "per period"],
  ["shortage_cost", "shortage cost", "per period"], ["ordering_cost", "ordering cost", "per period"],
  ["purchase_cost", "purchase cost", "per period"], ["total_cost", "total cost", "per period"],
];

const state = { items: [], sort: { key: "saving", dir: -1 }, item: null, seq: 0, uncertainty: false, period: "period" };

function fmt(v, digits) {
  if (v === null || v === undefined || Number.isNaN(v)) return "";
  if (typeof v !== "number") return String(v);
  if (v !== 0 && (Math.abs(v) < 1e-3 || Math.abs(v) >= 1e7)) return v.toExponential(3);
  return v.toLocaleString("en", { maximumFractionDigits: digits === undefined ? 4 : digits });
}
function pct(v) { return v === null || v === undefined ? "" : (100 * v).toFixed(2) + " %"; }
function policyText(p) {
  if (!p) return "none";
  if (p.type === "base-stock") return "base-stock S = " + p.order_up_to;
  if (p.type === "s-S") return "s-S s = " + p.reorder_point + ", S = " + p.order_up_to;
  return "s-nQ s = " + p.reorder_point + ", Q = " + p.order_multiple;
}
function el(tag, attrs, text) {
  const e = document.createElement(tag);
  for (const k in attrs || {}) e.setAttribute(k, attrs[k]);
  if (text !== undefined) e.textContent = text;
  return e;
}
function svg(tag, attrs) {
  const e = document.createElementNS(SVGNS, tag);
  for (const k in attrs || {}) e.setAttribute(k, attrs[k]);
  return e;
}

async function api(method, path, body) {
  const opt = { method: method, headers: {} };
  if (body !== undefined) {
    opt.headers["Content-Type"] = "application/json";
    opt.body = JSON.stringify(body);
  }
  const r = await fetch(path, opt);
  let data = null;
  try { data = await r.json(); } catch (e) { data = { error: "the server's answer is not JSON (status " + r.status + ")" }; }
  return { ok: r.ok, status: r.status, data: data };
}

// ---- the list ----

// label names an item: its SKU, with " @ location" in a run by location.
function label(it) { return it.location ? it.sku + " @ " + it.location : it.sku; }

// same says whether a and b are the same item (same SKU and location).
function same(a, b) { return a.sku === b.sku && (a.location || "") === (b.location || ""); }

function sortValue(it, key) {
  switch (key) {
    case "sku": return label(it);
    case "pattern": return it.pattern || "";
    case "decision": return it.decision ? it.decision.decision : "";
    default: return it[key];
  }
}

function renderList() {
  const q = $("filter").value.trim().toLowerCase();
  const pat = $("pattern").value;
  const open = $("only-open").checked;
  const { key, dir } = state.sort;
  const rows = state.items.filter((it) =>
    (!q || label(it).toLowerCase().includes(q)) && (!pat || it.pattern === pat) && (!open || !it.decision));
  rows.sort((a, b) => {
    const x = sortValue(a, key), y = sortValue(b, key);
    const xn = x === null || x === undefined || x === "", yn = y === null || y === undefined || y === "";
    if (xn || yn) return xn === yn ? label(a).localeCompare(label(b)) : (xn ? 1 : -1);
    if (typeof x === "number") return dir * (x - y) || label(a).localeCompare(label(b));
    return dir * String(x).localeCompare(String(y)) || label(a).localeCompare(label(b));
  });
  const tb = $("items").tBodies[0];
  tb.replaceChildren();
  for (const it of rows) {
    const tr = el("tr");
    if (state.item && same(state.item, it)) tr.className = "chosen";
    const td = el("td");
    const attrs = { type: "button", "data-sku": it.sku };
    if (it.location) attrs["data-location"] = it.location;
    const b = el("button", attrs, label(it));
    b.addEventListener("click", () => openItem(it.sku, it.location));
    td.appendChild(b);
    tr.appendChild(td);
    tr.appendChild(el("td", {}, it.pattern || ""));
    const sv = el("td", { class: "num" }, it.saving === null ? "" : fmt(it.saving, 2));
    tr.appendChild(sv);
    const gap = el("td", { class: "num" + (it.fill_rate_gap > 0 ? " neg" : "") }, it.fill_rate_gap === null ? "" : (100 * it.fill_rate_gap).toFixed(2) + " pt");
    tr.appendChild(gap);
    const rg = el("td", { class: "num regret" }, it.regret === null ? "" : fmt(it.regret, 2));
    rg.hidden = !state.uncertainty;
    tr.appendChild(rg);
    tr.appendChild(el("td", {}, it.decision ? it.decision.decision : (it.error ? "failed" : "")));
    tb.appendChild(tr);
  }
  $("list-count").textContent = rows.length + " of " + state.items.length + " items";
  for (const th of $("items").tHead.rows[0].cells) {
    const k = th.querySelector("button").dataset.sort;
    th.setAttribute("aria-sort", k === key ? (dir > 0 ? "ascending" : "descending") : "none");
  }
}

async function loadItems() {
  const r = await api("GET", "/api/items");
  if (!r.ok) { $("list-count").textContent = r.data.error; return; }
  state.items = r.data.items;
  state.uncertainty = r.data.uncertainty;
  state.period = r.data.period || "period";
  for (const th of document.querySelectorAll("th.regret")) th.hidden = !state.uncertainty;
  if (r.data.by_location) document.querySelector('#items th button[data-sort="sku"]').textContent = "SKU @ location";
  const pats = [...new Set(state.items.map((it) => it.pattern).filter((p) => p))].sort();
  const sel = $("pattern");
  for (const p of pats) sel.appendChild(el("option", { value: p }, p));
  renderList();
}

// ---- one item ----

async function openItem(sku, location) {
  const r = await api("GET", "/api/items/" + encodeURIComponent(sku) + (location ? "?location=" + encodeURIComponent(location) : ""));
  if (!r.ok) { $("status").textContent = r.data.error; $("status").className = "error"; return; }
  const it = r.data;
  state.item = it;
  $("item").hidden = false;
  $("item-title").textContent = label(it);
  $("period-name").textContent = state.period;
  $("item-note").textContent = [it.pattern ? "pattern " + it.pattern : "", it.unmet ? "unmet demand " + it.unmet : "",
    it.error ? "batch error: " + it.error : "", it.current_error ? "levels in use: " + it.current_error : "",
    ...(it.warnings || [])].filter((s) => s).join("; ");
  drawHistory(it.history);
  const fit = it.fit;
  $("fit-law").textContent = it.demand ? "used: " + it.demand + (fit && fit.chosen ? " (chosen by AICc: " + fit.chosen + ")" : "") : "no demand law";
  const ft = $("fit-table").tBodies[0];
  ft.replaceChildren();
  for (const c of (fit ? fit.candidates : [])) {
    const tr = el("tr");
    tr.appendChild(el("td", {}, c.model + (fit.chosen === c.model ? " (chosen)" : "")));
    tr.appendChild(el("td", { class: "num" }, fmt(c.log_likelihood, 2)));
    tr.appendChild(el("td", { class: "num" }, c.aicc === null ? "" : fmt(c.aicc, 2)));
    ft.appendChild(tr);
  }
  $("cur-policy").textContent = policyText(it.current);
  $("cur-fill").textContent = it.current_figures ? pct(it.current_figures.fill_rate) : "";
  $("cur-cost").textContent = it.current_figures ? fmt(it.current_figures.total_cost, 2) : "";
  $("rec-policy").textContent = policyText(it.recommended);
  $("rec-fill").textContent = it.recommended_figures ? pct(it.recommended_figures.fill_rate) : "";
  $("rec-cost").textContent = it.recommended_figures ? fmt(it.recommended_figures.total_cost, 2) : "";
  $("accept").disabled = !it.recommended;
  $("keep").disabled = !it.current;
  showDecision(it.decision, it.version);
  resetInputs();
  renderList();
  $("item-title").scrollIntoView({ block: "nearest" });
}

function setLevels(p) {
  for (const k of LEVELS) $("in-" + k).value = "";
  if (!p) return;
  $("in-policy").value = p.type;
  for (const k of LEVELS) if (p[k] !== undefined) $("in-" + k).value = String(p[k]);
}

function resetInputs() {
  const it = state.item;
  for (const k of SYSTEM.concat(["min_fill_rate"])) $("in-" + k).value = it.inputs[k] || "";
  if (!it.inputs.unmet) $("in-unmet").value = "backorder";
  $("in-policy").value = it.inputs.policy || "s-S";
  setLevels(it.recommended || it.current);
  syncLevelInputs();
  evaluate();
}

// syncLevelInputs enables the level inputs the policy type uses.
function syncLevelInputs() {
  const t = $("in-policy").value;
  $("in-reorder_point").disabled = t === "base-stock";
  $("in-order_up_to").disabled = t === "s-nQ";
  $("in-order_multiple").disabled = t !== "s-nQ";
}

function systemRequest() {
  const req = {};
  for (const k of SYSTEM) {
    const v = $("in-" + k).value.trim();
    if (v !== "") req[k] = v;
  }
  const model = state.item && state.item.inputs.lead_time_model;
  if (model) req.lead_time_model = model;
  const rp = state.item && state.item.inputs.review_period;
  if (rp) req.review_period = rp;
  return req;
}

function evaluateRequest() {
  const req = systemRequest();
  const t = $("in-policy").value;
  const use = t === "base-stock" ? ["order_up_to"] : t === "s-S" ? ["reorder_point", "order_up_to"] : ["reorder_point", "order_multiple"];
  for (const k of use) req[k] = $("in-" + k).value.trim();
  return req;
}

function markInvalid(msg) {
  for (const k of SYSTEM.concat(LEVELS, ["min_fill_rate"])) {
    const inp = $("in-" + k);
    const bad = msg && new RegExp("(^|[^a-z_])" + k + "([^a-z_]|$)").test(msg);
    inp.setAttribute("aria-invalid", bad ? "true" : "false");
  }
}

function setStatus(msg, isError) {
  $("status").textContent = msg;
  $("status").className = isError ? "error" : "";
}

// evaluate asks the server for the figures and the stock-level law of the
// inputs on screen; an answer to an older request is dropped.
async function evaluate() {
  if (!state.item) return;
  const seq = ++state.seq;
  const req = evaluateRequest();
  const fig = $("figures");
  fig.dataset.state = "pending";
  const t0 = performance.now();
  const q = new URLSearchParams(req).toString();
  // One request: the stock-level law comes with evaluate's answer.
  const r = await api("GET", "/api/levels?" + q);
  if (seq !== state.seq) return;
  if (!r.ok) {
    fig.dataset.state = "error";
    setStatus(r.data.error, true);
    markInvalid(r.data.error);
    return;
  }
  markInvalid("");
  const e = r.data.evaluation;
  drawFigures(e, req);
  drawLevels(r.data, e);
  setStatus("evaluated exactly: " + e.states + " states, solver " + e.diagnostics.method + ", in " + Math.round(performance.now() - t0) + " ms", false);
}

function drawFigures(e, req) {
  const fig = $("figures");
  const tb = fig.tBodies[0];
  tb.replaceChildren();
  const rec = state.item.recommended_figures;
  const head = el("tr");
  head.appendChild(el("th", { scope: "col" }, ""));
  head.appendChild(el("th", { scope: "col", class: "num" }, policyText(e.policy)));
  head.appendChild(el("th", { scope: "col", class: "num" }, "recommended"));
  head.appendChild(el("th", { scope: "col" }, ""));
  tb.appendChild(head);
  for (const [k, label, unit] of FIGURES) {
    const tr = el("tr");
    tr.appendChild(el("th", { scope: "row" }, label));
    const td = el("td", { class: "num", id: "fig-" + k, "data-value": JSON.stringify(e[k]) }, k === "fill_rate" ? pct(e[k]) : fmt(e[k]));
    tr.appendChild(td);
    tr.appendChild(el("td", { class: "num" }, rec ? (k === "fill_rate" ? pct(rec[k]) : fmt(rec[k])) : ""));
    tr.appendChild(el("td", {}, unit));
    tb.appendChild(tr);
  }
  fig.dataset.request = JSON.stringify(req);
  fig.dataset.state = "ready";
}

// ---- charts (inline SVG) ----

function axisText(g, x, y, text, anchor) {
  const t = svg("text", { x: x, y: y, "font-size": 11, "text-anchor": anchor || "middle", fill: "#000" });
  t.textContent = text;
  g.appendChild(t);
}

function drawHistory(h) {
  const box = $("history-chart");
  box.replaceChildren();
  if (!h || !h.demand.length) { box.textContent = "no history"; return; }
  const W = 480, H = 180, L = 40, B = 24, T = 8, R = 8;
  const s = svg("svg", { viewBox: "0 0 " + W + " " + H, role: "img", "aria-label": "demand per " + h.period + " over " + h.demand.length + " periods" });
  const max = Math.max(1, ...h.demand);
  const n = h.demand.length, bw = (W - L - R) / n;
  s.appendChild(svg("line", { x1: L, y1: H - B, x2: W - R, y2: H - B, stroke: COLORS.grey }));
  for (let i = 0; i < n; i++) {
    const v = h.demand[i];
    if (v <= 0) continue;
    const bh = (H - B - T) * v / max;
    const r = svg("rect", { x: L + i * bw, y: H - B - bh, width: Math.max(bw - (bw > 3 ? 1 : 0), 0.5), height: bh, fill: COLORS.blue });
    const tt = svg("title");
    tt.textContent = h.labels[i] + ": " + v;
    r.appendChild(tt);
    s.appendChild(r);
  }
  axisText(s, L - 4, T + 10, String(max), "end");
  axisText(s, L - 4, H - B, "0", "end");
  axisText(s, L, H - 6, h.labels[0], "start");
  axisText(s, W - R, H - 6, h.labels[n - 1], "end");
  box.appendChild(s);
}

function drawLevels(l, e) {
  const box = $("levels-chart");
  box.replaceChildren();
  $("levels-caption").textContent = "Stationary " + l.of + " at the end of a period";
  const W = 480, H = 200, L = 44, B = 26, T = 8, R = 8;
  const n = l.p.length;
  const s = svg("svg", { viewBox: "0 0 " + W + " " + H, role: "img",
    "aria-label": "probability of each " + l.of + " level from " + l.min + " to " + (l.min + n - 1) + "; stockout probability " + pct(e.stockout_probability) });
  const max = Math.max(...l.p, 1e-300);
  const bw = (W - L - R) / Math.max(n, 1);
  s.appendChild(svg("line", { x1: L, y1: H - B, x2: W - R, y2: H - B, stroke: COLORS.grey }));
  for (let i = 0; i < n; i++) {
    const k = l.min + i, v = l.p[i];
    const bh = (H - B - T) * v / max;
    const r = svg("rect", { x: L + i * bw, y: H - B - bh, width: Math.max(bw - (bw > 3 ? 1 : 0), 0.5), height: bh,
      fill: k < 0 ? COLORS.vermilion : (k === 0 ? COLORS.orange : COLORS.blue) });
    const tt = svg("title");
    tt.textContent = l.of + " " + k + ": " + v.toPrecision(4);
    r.appendChild(tt);
    s.appendChild(r);
  }
  if (l.min <= 0 && l.min + n - 1 >= 0) {
    const x = L + (-l.min) * bw;
    s.appendChild(svg("line", { x1: x, y1: T, x2: x, y2: H - B, stroke: "#000", "stroke-dasharray": "3 3" }));
  }
  axisText(s, L - 4, T + 10, max.toPrecision(2), "end");
  axisText(s, L - 4, H - B, "0", "end");
  axisText(s, L, H - 8, String(l.min), "start");
  axisText(s, W - R, H - 8, String(l.min + n - 1), "end");
  axisText(s, (L + W - R) / 2, H - 8, l.of + (l.of === "net inventory" ? " (below 0: backorders)" : ""), "middle");
  box.appendChild(s);
}

// ---- the cheapest levels ----

async function cheapest() {
  if (!state.item) return;
  const req = systemRequest();
  req.policy = $("in-policy").value;
  const f = $("in-min_fill_rate").value.trim();
  if (f !== "") req.min_fill_rate = f;
  setStatus("searching...", false);
  const seq = ++state.seq;
  const r = await api("POST", "/api/optimize", req);
  if (seq !== state.seq) return;
  if (!r.ok) { setStatus(r.data.error, true); markInvalid(r.data.error); return; }
  setLevels(r.data.policy);
  syncLevelInputs();
  await evaluate();
  setStatus("cheapest " + policyText(r.data.policy) + " (" + r.data.search.guarantee + ")", false);
}

// ---- decisions ----

function showDecision(d, version) {
  state.item.version = version || 0;
  $("decision-now").textContent = d
    ? "Recorded (version " + d.version + ", " + d.decided_at + "): " + d.decision + ", " + policyText(d.policy) + (d.note ? "; note: " + d.note : "")
    : "No decision recorded yet.";
}

async function decide(kind) {
  const it = state.item;
  if (!it) return;
  const body = { sku: it.sku, decision: kind, version: it.version, note: $("note").value };
  if (it.location) body.location = it.location;
  if (kind === "override") {
    const t = $("in-policy").value;
    body.policy = t;
    const use = t === "base-stock" ? ["order_up_to"] : t === "s-S" ? ["reorder_point", "order_up_to"] : ["reorder_point", "order_multiple"];
    for (const k of use) {
      const v = $("in-" + k).value.trim();
      if (!/^-?\d+$/.test(v)) { $("decision-status").textContent = k + " " + JSON.stringify(v) + ": want a whole number"; $("decision-status").className = "error"; return; }
      body[k] = parseInt(v, 10);
    }
  }
  const r = await api("POST", "/api/decisions", body);
  const st = $("decision-status");
  if (!r.ok) { st.textContent = r.data.error; st.className = "error"; return; }
  st.textContent = "saved: " + r.data.decision + " as version " + r.data.version;
  st.className = "";
  showDecision(r.data, r.data.version);
  const li = state.items.find((x) => same(x, it));
  if (li) { li.decision = r.data; li.version = r.data.version; }
  renderList();
}

// ---- wiring ----

function init() {
  for (const b of document.querySelectorAll("#items th button")) {
    b.addEventListener("click", () => {
      const k = b.dataset.sort;
      state.sort = { key: k, dir: state.sort.key === k ? -state.sort.dir : (k === "sku" || k === "pattern" || k === "decision" ? 1 : -1) };
      renderList();
    });
  }
  $("filter").addEventListener("input", renderList);
  $("pattern").addEventListener("change", renderList);
  $("only-open").addEventListener("change", renderList);
  for (const k of SYSTEM.concat(LEVELS)) $("in-" + k).addEventListener("input", evaluate);
  $("in-policy").addEventListener("change", () => { syncLevelInputs(); evaluate(); });
  $("in-unmet").addEventListener("change", evaluate);
  $("inputs").addEventListener("submit", (ev) => { ev.preventDefault(); evaluate(); });
  $("cheapest").addEventListener("click", cheapest);
  $("reset").addEventListener("click", resetInputs);
  $("accept").addEventListener("click", () => decide("accept"));
  $("keep").addEventListener("click", () => decide("keep"));
  $("override").addEventListener("click", () => decide("override"));
  loadItems();
}

init();
