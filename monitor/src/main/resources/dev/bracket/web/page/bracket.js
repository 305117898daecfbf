// Polls the JSON API and draws, per study and window, one small chart per assumption set:
// the identified interval's ends over time, the area between them shaded, and zero.
"use strict";

const charts = new Map();   // "study|window|assumptions" -> uPlot instance

function fmt(v) {
  return v === null || v === undefined ? "–" : (v >= 0 ? "+" : "") + v.toFixed(4);
}

function el(tag, attrs, text) {
  const e = document.createElement(tag);
  Object.entries(attrs || {}).forEach(([k, v]) => e.setAttribute(k, v));
  if (text !== undefined) e.textContent = text;
  return e;
}

function section(container, id) {
  let s = document.getElementById(id);
  if (!s) {
    s = el("section", {id: id});
    container.appendChild(s);
  }
  return s;
}

function bandText(b) {
  return b.status !== "bounded" ? b.status : "[" + fmt(b.lower) + ", " + fmt(b.upper) + "]";
}

function table(report) {
  const t = el("table");
  const head = el("tr");
  const bandKinds = (report.bounds.find(r => r.bands) || {bands: []}).bands;
  ["assumptions", "status", "lower", "upper", "width", "sign of effect"]
      .concat(bandKinds.map(b => Math.round(b.level * 100) + "% " + b.method + " band"))
      .forEach(h => head.appendChild(el("th", {}, h)));
  t.appendChild(head);
  report.bounds.forEach(row => {
    const tr = el("tr", {title: row.meaning});
    tr.appendChild(el("td", {}, row.assumptions.join(" + ")));
    tr.appendChild(el("td", {}, row.status));
    tr.appendChild(el("td", {}, fmt(row.lower)));
    tr.appendChild(el("td", {}, fmt(row.upper)));
    tr.appendChild(el("td", {}, row.width === null ? "–" : row.width.toFixed(4)));
    const sign = row.status !== "bounded" ? "" : row.sign === "undetermined" ? "not identified (contains 0)" : row.sign;
    tr.appendChild(el("td", {class: "sign-" + row.sign}, sign));
    (row.bands || []).forEach(b => tr.appendChild(el("td", {class: "sign-" + b.sign}, bandText(b))));
    t.appendChild(tr);
  });
  return t;
}

// The y axis always shows zero, so whether an interval excludes it can be seen at a glance.
function withZero(u, min, max) {
  const lo = Math.min(min, 0), hi = Math.max(max, 0);
  const pad = (hi - lo) * 0.08 || 0.05;
  return [lo - pad, hi + pad];
}

const BAND_STYLE = {
  "anytime": {stroke: "#b35c00", dash: [6, 3]},
  "fixed": {stroke: "#3d7f3d", dash: [2, 3]},
};

function chartOptions(width, bands) {
  const line = {stroke: "#2b5fa8", width: 1.5, points: {show: false}};
  const series = [
    {},
    Object.assign({label: "lower"}, line),
    Object.assign({label: "upper"}, line),
    {label: "zero", stroke: "#888", dash: [4, 4], width: 1, points: {show: false}},
  ];
  bands.forEach(b => {
    const style = BAND_STYLE[b.method] || {stroke: "#666", dash: [3, 3]};
    ["lower", "upper"].forEach(end => series.push(Object.assign(
        {label: b.method + " " + end, width: 1, points: {show: false}}, style)));
  });
  return {
    width: width, height: 170,
    scales: {x: {time: true}, y: {range: withZero}},
    series: series,
    bands: [{series: [2, 1], fill: "rgba(43, 95, 168, 0.15)"}],
    legend: {show: false},
  };
}

function bandsNote(history) {
  const kinds = new Map();
  history.series.forEach(s => (s.bands || []).forEach(b => kinds.set(b.method, b.level)));
  const parts = ["Solid lines and shading: the identified interval; grey dashes: zero."];
  kinds.forEach((level, method) => parts.push(
      (method === "anytime" ? "Orange dashes" : method === "fixed" ? "Green dots" : method) +
      ": " + Math.round(level * 100) + "% " + method + " confidence band."));
  return parts.join(" ");
}

function drawSeries(holder, study, series) {
  const bands = series.bands || [];
  // the number of bands is part of the key: a chart's series are fixed when it is made
  const key = study + "|" + series.window + "|" + series.assumptions.join(",") + "|" + bands.length;
  const data = [series.time, series.lower, series.upper, series.time.map(() => 0)];
  bands.forEach(b => data.push(b.lower, b.upper));
  let chart = charts.get(key);
  if (chart) {
    chart.setData(data);
    return;
  }
  let fig = holder.querySelector("[data-series='" + CSS.escape(study + "|" + series.window + "|" + series.assumptions.join(",")) + "']");
  if (fig) {
    fig.replaceChildren();
  } else {
    fig = el("figure", {class: "chart", "data-series": study + "|" + series.window + "|" + series.assumptions.join(",")});
    holder.appendChild(fig);
  }
  fig.appendChild(el("figcaption", {title: series.meaning}, series.assumptions.join(" + ")));
  chart = new uPlot(chartOptions(Math.max(300, fig.clientWidth), bands), data, fig);
  charts.set(key, chart);
}

async function getJson(url) {
  const r = await fetch(url, {cache: "no-store"});
  if (!r.ok) throw new Error(url + ": HTTP " + r.status);
  return r.json();
}

async function refresh() {
  const main = document.getElementById("studies");
  let list;
  try {
    list = await getJson("/api/studies");
  } catch (e) {
    return;   // the monitor may be restarting; try again on the next tick
  }
  if (list.studies.length === 0) return;
  const waiting = document.getElementById("waiting");
  if (waiting) waiting.remove();
  for (const s of list.studies) {
    const [detail, history] = await Promise.all([
      getJson("/api/studies/" + encodeURIComponent(s.study)),
      getJson("/api/studies/" + encodeURIComponent(s.study) + "/history").catch(() => ({series: []})),
    ]);
    const box = section(main, "study-" + s.study);
    for (const w of detail.windows) {
      const wid = "study-" + s.study + "-window-" + w.window;
      let ws = document.getElementById(wid);
      if (!ws) {
        ws = el("div", {id: wid});
        if (box.childElementCount === 0) box.appendChild(el("h2", {}, "Study " + s.study));
        ws.appendChild(el("h3"));
        ws.appendChild(el("div", {class: "table"}));
        ws.appendChild(el("p", {class: "quiet note"}));
        ws.appendChild(el("div", {class: "charts"}));
        box.appendChild(ws);
      }
      const c = w.counts;
      ws.querySelector("h3").textContent = "Window " + w.window + ": " + c.total + " units (" + c.treated +
          " treated, " + c.control + " untreated), computed " + new Date(w.computedAt).toLocaleTimeString();
      const tableBox = ws.querySelector(".table");
      tableBox.replaceChildren(table(w.report));
      ws.querySelector(".note").textContent = bandsNote(history);
      const holder = ws.querySelector(".charts");
      history.series.filter(x => x.window === w.window).forEach(x => drawSeries(holder, s.study, x));
    }
  }
}

refresh();
setInterval(refresh, 2000);
