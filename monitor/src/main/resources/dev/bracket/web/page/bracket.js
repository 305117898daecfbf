// Polls the JSON API. Per study (a collapsible section, fetched only while open): alerts firing
// now and recent transitions with their evidence; per window its start and end, the arms' units
// (exposed, with an outcome, pending, lost to follow-up, outcomes beyond exposures), a "zero view"
// with every assumption set on one shared axis, a table with each assumption's meaning, what it
// assumes about pending outcomes and the strata, and one history chart per assumption set.
"use strict";

const charts = new Map();   // "study|window|assumptions|bands" -> uPlot instance
const JOIN = ",";           // how assumption sets are written everywhere: the --assume syntax

// Three significant digits, signed: short enough for a lane's right-hand text.
function short(v) {
  return (v >= 0 ? "+" : "") + (+v.toPrecision(3));
}

function fmt(v) {
  return v === null || v === undefined ? "–" : (v >= 0 ? "+" : "") + v.toFixed(4);
}

function el(tag, attrs, text) {
  const e = document.createElement(tag);
  Object.entries(attrs || {}).forEach(([k, v]) => e.setAttribute(k, v));
  if (text !== undefined) e.textContent = text;
  return e;
}

function svgEl(tag, attrs, text) {
  const e = document.createElementNS("http://www.w3.org/2000/svg", tag);
  Object.entries(attrs || {}).forEach(([k, v]) => e.setAttribute(k, v));
  if (text !== undefined) e.textContent = text;
  return e;
}

function ago(seconds) {
  const s = Math.max(0, Math.round(seconds));
  if (s < 90) return s + " s";
  if (s < 5400) return Math.floor(s / 60) + " min " + (s % 60) + " s";
  return (s / 3600).toFixed(1) + " h";
}

function clock(iso) {
  return iso ? new Date(iso).toLocaleString() : "–";
}

function safeId(s) {
  return s.replace(/[^A-Za-z0-9_-]/g, "_");
}

async function getJson(url) {
  const r = await fetch(url, {cache: "no-store"});
  if (!r.ok) throw new Error(url + ": HTTP " + r.status);
  return r.json();
}

// ---- alerts -------------------------------------------------------------------------------

function evidenceText(doc) {
  const e = doc.evidence || {};
  if (e.band) {
    const arms = e.arms || {};
    const n = a => (a && a.n !== undefined ? a.n : "–");
    return "band " + e.band.method + " " + Math.round(e.band.level * 100) + "% [" + fmt(e.band.lower) + ", " + fmt(e.band.upper) +
        "]; interval [" + fmt(e.interval.lower) + ", " + fmt(e.interval.upper) + "]; units " + n(arms.treated) +
        " treated, " + n(arms.control) + " untreated";
  }
  if (e.silentForSeconds !== undefined) {
    return "last event " + clock(e.lastEventAt) + ", silent " + ago(e.silentForSeconds) + " (limit " + ago(e.limitSeconds) + ")";
  }
  if (e.rejectedShare !== undefined) {
    return "rejected " + e.rejected + " of " + (e.accepted + e.rejected) + " (" + (100 * e.rejectedShare).toFixed(1) +
        "%, limit " + (100 * e.maxRejectedShare).toFixed(1) + "%) over " + ago(e.periodSeconds);
  }
  return "";
}

function alertItem(doc, state) {
  const li = el("li", {class: state, "data-key": doc.key});
  const where = doc.scope === "study" ? "whole study" : (doc.assumptions || []).join(JOIN) + " · " + doc.window;
  li.appendChild(el("div", {class: "what"}, doc.study + " — " + doc.rule + (doc.variant ? " (" + doc.variant + ")" : "") +
      " — " + where));
  li.appendChild(el("div", {}, doc.summary || ""));
  li.appendChild(el("div", {class: "evidence"}, (state === "firing" ? "since " + clock(doc.firingSince || doc.at) : state + " at " + clock(doc.at)) +
      " · " + evidenceText(doc)));
  return li;
}

// The newest firing transition of each firing key carries the evidence shown beside it.
function firingDocs(alerts) {
  const newest = new Map();
  alerts.recent.forEach(d => { if (d.state === "firing" && !newest.has(d.key)) newest.set(d.key, d); });
  return alerts.firing.map(f => newest.get(f.key) ||
      {key: f.key, study: f.study, rule: f.rule, variant: f.variant, at: f.since, scope: "", summary: ""});
}

function drawAlerts(alerts) {
  const now = firingDocs(alerts);
  document.getElementById("alert-count").textContent = now.length === 0 ? "none" : String(now.length);
  document.getElementById("alerts-now").replaceChildren(...now.map(d => alertItem(d, "firing")));
  return now;
}

// ---- the study picker and sections ----------------------------------------------------------

function studySection(main, study, openByDefault) {
  const id = "study-" + safeId(study);
  let box = document.getElementById(id);
  if (box) return box;
  box = el("details", {id: id, class: "study", "data-study": study});
  if (openByDefault) box.open = true;
  const summary = el("summary");
  summary.appendChild(el("span", {class: "name"}, study));
  summary.appendChild(el("span", {class: "badges"}));
  box.appendChild(summary);
  const body = el("div", {class: "body"});
  body.appendChild(el("p", {class: "study-links note"}));
  body.appendChild(el("h3", {}, "Alerts of this study"));
  body.appendChild(el("ul", {class: "alert-list study-alerts"}));
  body.appendChild(el("div", {class: "windows"}));
  box.appendChild(body);
  const links = body.querySelector(".study-links");
  const csv = el("a", {href: "/api/studies/" + encodeURIComponent(study) + "/history.csv", download: "", class: "csv"},
      "Download this study's history (CSV)");
  links.appendChild(csv);
  links.appendChild(document.createTextNode(" · "));
  links.appendChild(el("a", {href: "/api/studies/" + encodeURIComponent(study)}, "JSON"));
  box.addEventListener("toggle", () => { if (box.open) refresh(); });
  main.appendChild(box);

  const chip = el("button", {type: "button", class: "chip", "data-study": study}, study);
  chip.addEventListener("click", () => { box.open = true; box.scrollIntoView(); });
  document.getElementById("chips").appendChild(chip);
  return box;
}

function markStudy(box, counts, silence, firing) {
  const study = box.dataset.study;
  const mine = firing.filter(d => d.study === study);
  const stalled = mine.some(d => d.rule === "stream-stalled");
  const badges = box.querySelector(".badges");
  const parts = [el("span", {class: "badge fresh"}, counts.total + " units")];
  if (mine.length > 0) parts.push(el("span", {class: "badge firing"}, mine.length + " alert" + (mine.length > 1 ? "s" : "") + " firing"));
  if (silence) {
    parts.push(stalled
        ? el("span", {class: "badge stalled", title: "the stream-stalled alert is firing"}, "stalled: no events for " + ago(silence.silentForSeconds))
        : el("span", {class: "badge fresh", title: "last event " + clock(silence.lastEventAt)}, "last event " + ago(silence.silentForSeconds) + " ago"));
  }
  badges.replaceChildren(...parts);
  box.classList.toggle("stalled", stalled);
  const chip = document.querySelector("#chips .chip[data-study='" + CSS.escape(study) + "']");
  chip.classList.toggle("firing", mine.length > 0);
  chip.classList.toggle("stalled", stalled);
  chip.title = (mine.length > 0 ? mine.length + " alerts firing" : "no alert firing") + (stalled ? "; stalled" : "");
}

function applyFilter() {
  const q = document.getElementById("filter").value.trim().toLowerCase();
  document.querySelectorAll("details.study, #chips .chip").forEach(e =>
      e.classList.toggle("hidden", q !== "" && !e.dataset.study.toLowerCase().includes(q)));
}

// ---- the zero view ------------------------------------------------------------------------

// The band that decides alerts by default (anytime), else the first one.
function decidingBand(row) {
  const bands = row.bands || [];
  return bands.find(b => b.method === "anytime") || bands[0] || null;
}

// What a lane says at its right: the verdict, then how far the deciding band is from zero.
function verdict(row) {
  if (row.status === "refuted") return {kind: "none", head: "refuted", text: "the data contradict these assumptions"};
  if (row.status !== "bounded") return {kind: "none", head: row.status, text: "no interval yet"};
  const band = decidingBand(row);
  if (band && band.status === "refuted") return {kind: "none", head: "band refuted", text: "contradicted beyond sampling error"};
  const basis = band && band.status === "bounded" ? band : null;
  const lo = basis ? basis.lower : row.lower, hi = basis ? basis.upper : row.upper;
  const what = basis ? basis.method + " band" : "interval";
  if (row.excludesZero && lo > 0 && row.lower > 0) return {kind: "positive", head: "positive sign", text: what + " clears 0 by " + +lo.toPrecision(3)};
  if (row.excludesZero && hi < 0 && row.upper < 0) return {kind: "negative", head: "negative sign", text: what + " clears 0 by " + +(-hi).toPrecision(3)};
  if (lo > 0) return {kind: "none", head: "no sign", text: "interval reaches 0; " + what + " " + +lo.toPrecision(3) + " above"};
  if (hi < 0) return {kind: "none", head: "no sign", text: "interval reaches 0; " + what + " " + +(-hi).toPrecision(3) + " below"};
  return {kind: "none", head: "no sign", text: what + " spans 0: " + short(lo) + " to " + short(hi)};
}

function niceStep(span) {
  const raw = span / 6, mag = Math.pow(10, Math.floor(Math.log10(raw)));
  return [1, 2, 2.5, 5, 10].map(m => m * mag).find(s => s >= raw);
}

function zeroView(report) {
  const rows = report.bounds;
  const values = [0];
  rows.forEach(r => {
    if (r.status === "bounded") values.push(r.lower, r.upper);
    (r.bands || []).forEach(b => { if (b.status === "bounded" && r.status === "bounded") values.push(b.lower, b.upper); });
  });
  let min = Math.min(...values), max = Math.max(...values);
  const pad = (max - min) * 0.04 || 0.05;
  min -= pad; max += pad;
  const W = 1000, labelW = 190, verdictW = 250, plotL = labelW + 10, plotR = W - verdictW - 10;
  const lane = 40, top = 22, H = top + lane * rows.length + 6;
  const x = v => plotL + (v - min) / (max - min) * (plotR - plotL);
  const svg = svgEl("svg", {class: "zero-view", viewBox: "0 0 " + W + " " + H, role: "img",
    "aria-label": "every assumption set's interval and bands on one axis; zero is the dark vertical line"});
  const step = niceStep(max - min);
  for (let t = Math.ceil(min / step) * step; t <= max; t += step) {
    const v = Math.abs(t) < step / 1e6 ? 0 : t;
    svg.appendChild(svgEl("line", {class: "tick", x1: x(v), x2: x(v), y1: top - 4, y2: H}));
    svg.appendChild(svgEl("text", {class: "tick-label", x: x(v), y: top - 8}, v === 0 ? "0" : (v > 0 ? "+" : "") + +v.toFixed(4)));
  }
  rows.forEach((r, i) => {
    const y = top + i * lane, mid = y + lane / 2;
    const v = verdict(r);
    const g = svgEl("g", {class: "lane", "data-assumptions": r.assumptions.join(JOIN), "data-verdict": v.kind});
    g.appendChild(svgEl("rect", {class: "lane-bg " + v.kind, x: 0, y: y + 1, width: W, height: lane - 2}));
    g.appendChild(svgEl("text", {class: "lane-label", x: 4, y: mid - 2}, r.assumptions.join(JOIN)));
    g.appendChild(svgEl("text", {class: "lane-status", x: 4, y: mid + 12}, r.status));
    if (r.status === "bounded") {
      g.appendChild(svgEl("rect", {class: "interval", x: x(r.lower), y: mid - 5, width: Math.max(1.5, x(r.upper) - x(r.lower)), height: 10}));
      (r.bands || []).forEach(b => {
        if (b.status !== "bounded") return;
        const by = b.method === "anytime" ? mid - 11 : mid + 11;
        const cls = "band-" + b.method;
        g.appendChild(svgEl("line", {class: cls, x1: x(b.lower), x2: x(b.upper), y1: by, y2: by}));
        [b.lower, b.upper].forEach(e => g.appendChild(svgEl("line", {class: cls, x1: x(e), x2: x(e), y1: by - 4, y2: by + 4})));
      });
    } else {
      g.appendChild(svgEl("line", {class: "gap", x1: plotL, x2: plotR, y1: mid, y2: mid}));
    }
    g.appendChild(svgEl("text", {class: "verdict" + (v.kind === "none" ? "" : " sign"), x: plotR + 14, y: mid - 2}, v.head));
    g.appendChild(svgEl("text", {class: "lane-status", x: plotR + 14, y: mid + 12}, v.text));
    svg.appendChild(g);
  });
  svg.appendChild(svgEl("line", {class: "zero", x1: x(0), x2: x(0), y1: top - 4, y2: H}));
  return svg;
}

function legend() {
  const p = el("p", {class: "legend"});
  p.innerHTML = "Shared axis, dark vertical line at 0." +
      "<i style='background:var(--interval);opacity:.55'></i>interval the assumptions allow" +
      "<i style='border-top:3px solid var(--anytime)'></i>anytime band (above; alerts use it)" +
      "<i style='border-top:3px solid var(--fixed)'></i>fixed band (below). " +
      "A tinted lane identifies a sign: interval and band both on one side of 0.";
  return p;
}

// ---- the arms: who has entered, whose outcome has arrived -------------------------------------

// An arm's units: its exposures, or its outcomes where more outcomes than exposures arrived.
function units(arm) {
  return Math.max(arm.n, arm.exposed);
}

function percent(share) {
  return share === null || share === undefined ? "–" : (100 * share).toFixed(1) + "%";
}

// An ISO-8601 duration as the configuration writes it: PT720H -> 30d, PT1H30M -> 1h30m.
function horizonText(iso) {
  const hours = /^PT(\d+)H$/.exec(iso);
  if (hours && hours[1] % 24 === 0) return hours[1] / 24 + "d";
  return iso.replace(/^PT/, "").toLowerCase();
}

// A count with its share of the arm's units; the share in data-share, as the JSON gives it.
function shareCell(count, share) {
  const td = el("td", {"data-share": share === null ? "" : String(share)});
  td.appendChild(el("span", {class: "share"}, percent(share)));
  td.appendChild(el("span", {class: "count"}, " (" + count + ")"));
  return td;
}

// Without exposure events only the note is shown: nothing is known about units still waiting.
// Lost to follow-up is counted only in the cumulative window of a study with a follow-up horizon.
function armsBlock(report, lost) {
  const box = el("div", {class: "arms-box"});
  const arms = report.arms;
  if (arms.exposuresReported) {
    const excess = arms.treated.excessOutcomes > 0 || arms.control.excessOutcomes > 0;
    const t = el("table", {class: "arms"});
    const head = el("tr");
    ["arm", "exposed", "with outcome", "pending"].concat(lost ? ["lost to follow-up"] : [], excess ? ["outcomes beyond exposures"] : [])
        .forEach((h, i) => head.appendChild(el("th", {class: i === 0 ? "text" : ""}, h)));
    t.appendChild(head);
    [["treated", "treated"], ["control", "untreated"]].forEach(([key, name]) => {
      const a = arms[key];
      const tr = el("tr", {"data-arm": key});
      tr.appendChild(el("td", {class: "text"}, name));
      tr.appendChild(el("td", {class: "exposed"}, String(a.exposed)));
      tr.appendChild(el("td", {class: "observed"}, String(a.n)));
      tr.appendChild(shareCell(a.pending, a.pendingShare)).classList.add("pending");
      if (lost) tr.appendChild(shareCell(lost[key], lost[key + "Share"])).classList.add("lost");
      if (excess) tr.appendChild(el("td", {class: "excess" + (a.excessOutcomes > 0 ? " found" : "")}, String(a.excessOutcomes)));
      t.appendChild(tr);
    });
    box.appendChild(t);
    if (excess) {
      box.appendChild(el("p", {class: "note excess-note"}, "More outcomes arrived than units were reported exposed: " +
          "a data-quality finding. Such an arm counts its outcomes as its units; check that every unit's exposure is sent."));
    }
    if (lost) {
      box.appendChild(el("p", {class: "note"}, "Lost to follow-up: still pending " + horizonText(lost.horizon) +
          " after exposure; their outcomes stay anywhere in the outcome range."));
    }
  }
  box.appendChild(el("p", {class: "note pending-note" + (arms.exposuresReported ? "" : " none")}, arms.pendingNote));
  return box;
}

// ---- the table ----------------------------------------------------------------------------

// A refuted row carries no bands (no interval to put them around): its cells say so.
function bandCell(row, kind) {
  const b = (row.bands || []).find(x => x.method === kind.method && x.level === kind.level);
  if (!b) return el("td", {}, row.status === "refuted" ? "none: refuted" : "–");
  return el("td", {class: "sign-" + b.sign}, b.status !== "bounded" ? b.status : "[" + fmt(b.lower) + ", " + fmt(b.upper) + "]");
}

// What a row assumes about outcomes not yet reported, in words.
function pendingLine(row, outcome) {
  return row.pendingOutcomes === "missing-at-random"
      ? el("div", {class: "pending-row mar"}, "pending outcomes: like the reported ones in the same arm (missing-at-random)")
      : el("div", {class: "pending-row"}, "pending outcomes: anywhere in [" + outcome.min + ", " + outcome.max + "]");
}

function signText(row) {
  return row.status !== "bounded" ? "" : row.sign === "undetermined" ? "not identified (contains 0)" : row.sign;
}

function table(report) {
  const t = el("table");
  const bandKinds = (report.bounds.find(r => r.bands) || {bands: []}).bands;
  const cols = el("colgroup");
  ["c-set", "c-status", "c-interval", "c-width", "c-sign"].concat(bandKinds.map(() => "c-band"))
      .forEach(c => cols.appendChild(el("col", {class: c})));
  t.appendChild(cols);
  const head = el("tr");
  [["assumptions: what you assume", "text"], ["status", "text"], ["interval", ""], ["width", ""], ["sign of effect", "text"]]
      .concat(bandKinds.map(b => [Math.round(b.level * 100) + "% " + b.method + " band", ""]))
      .forEach(([h, c]) => head.appendChild(el("th", {class: c}, h)));
  t.appendChild(head);
  report.bounds.forEach(row => {
    const tr = el("tr", {"data-assumptions": row.assumptions.join(JOIN), "data-pending": row.pendingOutcomes});
    const set = el("td", {class: "text"});
    set.appendChild(el("div", {class: "set"}, row.assumptions.join(JOIN)));
    set.appendChild(el("div", {class: "meaning"}, row.meaning));
    if (report.arms.exposuresReported) set.appendChild(pendingLine(row, report.outcome));
    tr.appendChild(set);
    tr.appendChild(el("td", {class: "text"}, row.status));
    tr.appendChild(el("td", {}, row.status === "bounded" ? "[" + fmt(row.lower) + ", " + fmt(row.upper) + "]" : "–"));
    tr.appendChild(el("td", {}, row.width === null ? "–" : row.width.toFixed(4)));
    tr.appendChild(el("td", {class: "text sign-" + row.sign}, signText(row)));
    bandKinds.forEach(k => tr.appendChild(bandCell(row, k)));
    t.appendChild(tr);
    (row.strata || []).forEach(s => {
      const sr = el("tr", {class: "stratum"});
      sr.appendChild(el("td", {class: "text"}, (s.stratum === "" ? "events without a stratum" : "stratum " + s.stratum) + " alone"));
      sr.appendChild(el("td", {class: "text"}, s.status));
      sr.appendChild(el("td", {}, s.status === "bounded" ? "[" + fmt(s.lower) + ", " + fmt(s.upper) + "]" : "–"));
      sr.appendChild(el("td", {}, s.width === null ? "–" : s.width.toFixed(4)));
      sr.appendChild(el("td", {colspan: 1 + bandKinds.length}));
      t.appendChild(sr);
    });
  });
  return t;
}

// ---- history charts -----------------------------------------------------------------------

// The y axis always shows zero, so whether an interval excludes it can be seen at a glance.
function withZero(u, min, max) {
  const lo = Math.min(min, 0), hi = Math.max(max, 0);
  const pad = (hi - lo) * 0.08 || 0.05;
  return [lo - pad, hi + pad];
}

const BAND_COLOUR = {anytime: "#6b2f8f", fixed: "#1f7a6c"};

function chartOptions(width, bands) {
  const series = [
    {},
    {label: "lower", stroke: "#8796ab", width: 1, points: {show: false}},
    {label: "upper", stroke: "#8796ab", width: 1, points: {show: false}},
    {label: "zero", stroke: "#1f2328", width: 2, points: {show: false}},
  ];
  bands.forEach(b => ["lower", "upper"].forEach(end => series.push({
    label: b.method + " " + end, stroke: BAND_COLOUR[b.method] || "#666", width: 1.5,
    dash: b.method === "anytime" ? [7, 3] : [2, 2], points: {show: false}})));
  return {
    width: width, height: 170,
    scales: {x: {time: true}, y: {range: withZero}},
    series: series,
    bands: [{series: [2, 1], fill: "rgba(135, 150, 171, 0.35)"}],
    legend: {show: false},
  };
}

function drawSeries(holder, study, series) {
  const bands = series.bands || [];
  const name = study + "|" + series.window + "|" + series.assumptions.join(JOIN);
  const key = name + "|" + bands.length;   // a chart's series are fixed when it is made
  const data = [series.time, series.lower, series.upper, series.time.map(() => 0)];
  bands.forEach(b => data.push(b.lower, b.upper));
  let chart = charts.get(key);
  if (chart) {
    chart.setData(data);
    return;
  }
  let fig = holder.querySelector("[data-series='" + CSS.escape(name) + "']");
  if (fig) {
    fig.replaceChildren();
  } else {
    fig = el("figure", {class: "chart", "data-series": name});
    holder.appendChild(fig);
  }
  fig.appendChild(el("figcaption", {}, series.assumptions.join(JOIN) + " over time"));
  if (series.time.length < 2) {
    // one report has no span of time to draw; the chart appears with the second
    fig.appendChild(el("p", {class: "quiet note"}, "One report so far; the chart starts with the next."));
    return;
  }
  chart = new uPlot(chartOptions(Math.max(300, fig.clientWidth), bands), data, fig);
  charts.set(key, chart);
}

// ---- one open study -----------------------------------------------------------------------

function windowTimes(w) {
  if (!w.windowStart) {
    return "Every event since the study's first one; computed " + clock(w.computedAt) + ".";
  }
  return "Pane from " + clock(w.windowStart) + " to " + clock(w.windowEnd) + "; computed " + clock(w.computedAt) + ".";
}

async function drawStudy(box, study, alerts) {
  const [detail, history] = await Promise.all([
    getJson("/api/studies/" + encodeURIComponent(study)),
    getJson("/api/studies/" + encodeURIComponent(study) + "/history"),
  ]);
  const mine = firingDocs(alerts).filter(d => d.study === study).map(d => alertItem(d, "firing"));
  const firingKeys = new Set(alerts.firing.map(f => f.key));
  alerts.recent.filter(d => d.study === study && !(d.state === "firing" && firingKeys.has(d.key))).slice(0, 8)
      .forEach(d => mine.push(alertItem(d, d.state === "firing" ? "firing" : "resolved")));
  const list = box.querySelector(".study-alerts");
  list.replaceChildren(...(mine.length ? mine : [el("li", {class: "resolved"}, "No alert has fired or resolved recently.")]));

  const windows = box.querySelector(".windows");
  for (const w of detail.windows) {
    const wid = box.id + "-window-" + safeId(w.window);
    let ws = document.getElementById(wid);
    if (!ws) {
      ws = el("section", {id: wid, class: "window"});
      ws.appendChild(el("h3"));
      ws.appendChild(el("p", {class: "window-times"}));
      ws.appendChild(el("div", {class: "arms-holder"}));
      ws.appendChild(el("div", {class: "zero-box"}));
      ws.appendChild(legend());
      ws.appendChild(el("div", {class: "table-box"}));
      ws.appendChild(el("div", {class: "charts"}));
      windows.appendChild(ws);
    }
    const c = w.counts, arms = w.report.arms;
    ws.querySelector("h3").textContent = "Window " + w.window + ": " + c.total + " units (" + units(arms.treated) + " treated, " +
        units(arms.control) + " untreated" + (c.strata > 1 ? ", " + c.strata + " strata" : "") + ")" +
        (c.pending > 0 ? ", " + c.pending + " awaiting their outcome" : "");
    ws.querySelector(".window-times").textContent = windowTimes(w);
    ws.querySelector(".arms-holder").replaceChildren(armsBlock(w.report, w.lostToFollowUp));
    ws.querySelector(".zero-box").replaceChildren(zeroView(w.report));
    ws.querySelector(".table-box").replaceChildren(table(w.report));
    const holder = ws.querySelector(".charts");
    history.series.filter(x => x.window === w.window).forEach(x => drawSeries(holder, study, x));
  }
}

// ---- the loop -----------------------------------------------------------------------------

let busy = false;

async function refresh() {
  if (busy) return;
  busy = true;
  try {
    const [list, alerts] = await Promise.all([
      getJson("/api/studies"),
      getJson("/api/alerts").catch(() => ({firing: [], recent: [], studies: []})),
    ]);
    const firing = drawAlerts(alerts);
    if (list.studies.length === 0) return;
    const waiting = document.getElementById("waiting");
    if (waiting) waiting.remove();
    document.getElementById("study-count").textContent = list.studies.length + " with reports";
    const main = document.getElementById("studies");
    const silence = new Map((alerts.studies || []).map(s => [s.study, s]));
    for (const [i, s] of list.studies.entries()) {
      const box = studySection(main, s.study, i === 0);
      const cumulative = s.windows.find(w => w.window === "cumulative") || s.windows[0];
      markStudy(box, cumulative.counts, silence.get(s.study), firing);
      if (box.open) await drawStudy(box, s.study, alerts);
    }
    applyFilter();
  } catch (e) {
    // the monitor may be restarting; try again on the next tick
  } finally {
    busy = false;
  }
}

document.getElementById("filter").addEventListener("input", applyFilter);
document.getElementById("close-all").addEventListener("click", () =>
    document.querySelectorAll("details.study").forEach(d => { d.open = false; }));
refresh();
setInterval(refresh, 2000);
