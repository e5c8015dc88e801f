import { createHash } from "node:crypto";

/**
 * The inline script of report.html (plain ES2017, no library) and its styles.
 * It reads the JSON in #plexus-data and adds, to a page that is complete
 * without it: a tooltip over the edges of the matrix and network figures
 * (regions, statistic, estimate, p, q); a control that highlights one
 * significant subnetwork in its figures and edge table (also chosen by a click
 * on a row of the subnetworks table); and sorting of every table by a click on
 * a column header (headers become buttons). Text from the data is only ever
 * set as textContent, never parsed as markup.
 */
export const REPORT_SCRIPT = String.raw`
(function () {
  "use strict";
  var holder = document.getElementById("plexus-data");
  if (!holder) return;
  var data = JSON.parse(holder.textContent);
  var R = data.regions.length;
  var position = new Array(R);
  data.order.forEach(function (region, p) { position[region] = p; });
  var pairs = new Map();
  for (var e = 0; e < data.a.length; e++) pairs.set(Math.min(data.a[e], data.b[e]) * R + Math.max(data.a[e], data.b[e]), e);
  var SVG = "http://www.w3.org/2000/svg";
  document.documentElement.classList.add("plx-js");

  function fixed(v, d) { if (v === null) return "\u2014"; var s = v.toFixed(d); return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s; }
  function pText(v) { return v === null ? "\u2014" : v < 0.001 ? "< 0.001" : v.toFixed(3); }
  function pIs(name, v) { return name + (v !== null && v < 0.001 ? " " : " = ") + pText(v); }
  function sig(v) { return v === null ? "\u2014" : String(Number(v.toPrecision(3))); }

  // Tooltip over edges.
  var tip = document.createElement("div");
  tip.id = "plexus-tooltip";
  tip.className = "plx-tip";
  tip.setAttribute("role", "tooltip");
  tip.hidden = true;
  document.body.appendChild(tip);
  function line(text, strong) {
    var div = document.createElement("div");
    if (strong) div.className = "plx-tip-title";
    div.textContent = text;
    return div;
  }
  function showEdge(event, k, edge) {
    var c = data.contrasts[k];
    while (tip.firstChild) tip.removeChild(tip.firstChild);
    tip.appendChild(line(data.regions[data.a[edge]] + " \u2013 " + data.regions[data.b[edge]], true));
    tip.appendChild(line(c.statistic + " = " + fixed(c.t[edge], 2) + (c.statistic === "t" ? ", estimate = " + sig(c.estimate[edge]) : "")));
    tip.appendChild(line(pIs("p (unc.)", c.p[edge]) + ", " + pIs("q_FDR", c.q[edge])));
    tip.hidden = false;
    var x = event.pageX + 14, y = event.pageY + 14;
    var room = document.documentElement.clientWidth + window.scrollX - tip.offsetWidth - 8;
    tip.style.left = Math.max(0, Math.min(x, room)) + "px";
    tip.style.top = y + "px";
  }
  function hide() { tip.hidden = true; }

  var figures = Array.prototype.slice.call(document.querySelectorAll("figure[data-figure]"));
  figures.forEach(function (figure) {
    var svg = figure.querySelector("svg");
    var k = Number(figure.getAttribute("data-contrast"));
    if (!svg || !data.contrasts[k]) return;
    var kind = figure.getAttribute("data-figure");
    if (kind === "matrix") {
      var grid = svg.querySelector("g[data-cells]");
      if (!grid) return;
      svg.addEventListener("mousemove", function (event) {
        var m = grid.getScreenCTM();
        if (!m) return hide();
        var point = svg.createSVGPoint();
        point.x = event.clientX;
        point.y = event.clientY;
        var local = point.matrixTransform(m.inverse());
        var column = Math.floor(local.x), row = Math.floor(local.y);
        if (column < 0 || row < 0 || column >= R || row >= R || column === row) return hide();
        var a = data.order[row], b = data.order[column];
        var edge = pairs.get(Math.min(a, b) * R + Math.max(a, b));
        if (edge === undefined) return hide();
        showEdge(event, k, edge);
      });
      svg.addEventListener("mouseleave", hide);
    } else if (kind === "network") {
      svg.addEventListener("mousemove", function (event) {
        var target = event.target;
        var edge = target && target.getAttribute ? target.getAttribute("data-edge") : null;
        if (edge === null) return hide();
        showEdge(event, k, Number(edge));
      });
      svg.addEventListener("mouseleave", hide);
    }
  });

  // Highlighting one subnetwork.
  var choices = [];
  data.contrasts.forEach(function (c, k) {
    c.subnetworks.forEach(function (s) { choices.push({ k: k, s: s }); });
  });
  var select = null;
  function highlight(value) {
    var chosen = value === "" ? null : choices[Number(value)];
    var set = new Set(chosen ? chosen.s.edges : []);
    Array.prototype.forEach.call(document.querySelectorAll(".plx-marks"), function (g) { g.parentNode.removeChild(g); });
    Array.prototype.forEach.call(document.querySelectorAll(".plx-on"), function (el) { el.classList.remove("plx-on"); });
    Array.prototype.forEach.call(document.querySelectorAll(".plx-focus"), function (el) { el.classList.remove("plx-focus"); });
    if (select && select.value !== value) select.value = value;
    if (!chosen) return;
    Array.prototype.forEach.call(document.querySelectorAll("tr[data-component]"), function (row) {
      if (Number(row.getAttribute("data-contrast")) === chosen.k && Number(row.getAttribute("data-component")) === chosen.s.id) row.classList.add("plx-on");
    });
    figures.forEach(function (figure) {
      if (Number(figure.getAttribute("data-contrast")) !== chosen.k) return;
      var svg = figure.querySelector("svg");
      var kind = figure.getAttribute("data-figure");
      if (kind === "network") {
        svg.classList.add("plx-focus");
        Array.prototype.forEach.call(svg.querySelectorAll("[data-edge]"), function (path) {
          if (set.has(Number(path.getAttribute("data-edge")))) path.classList.add("plx-on");
        });
      } else if (kind === "matrix") {
        var grid = svg.querySelector("g[data-cells]");
        if (!grid) return;
        var marks = document.createElementNS(SVG, "g");
        marks.setAttribute("class", "plx-marks");
        marks.setAttribute("transform", grid.getAttribute("transform"));
        chosen.s.edges.forEach(function (edge) {
          var p = position[data.a[edge]], q = position[data.b[edge]];
          [[q, p], [p, q]].forEach(function (cell) {
            var rect = document.createElementNS(SVG, "rect");
            rect.setAttribute("class", "plx-mark");
            rect.setAttribute("data-edge", String(edge));
            rect.setAttribute("x", String(cell[0]));
            rect.setAttribute("y", String(cell[1]));
            rect.setAttribute("width", "1");
            rect.setAttribute("height", "1");
            marks.appendChild(rect);
          });
        });
        svg.appendChild(marks);
      }
    });
    Array.prototype.forEach.call(document.querySelectorAll("section[data-contrast] tr[data-edge]"), function (row) {
      var section = row.closest("section[data-contrast]");
      if (Number(section.getAttribute("data-contrast")) === chosen.k && set.has(Number(row.getAttribute("data-edge")))) row.classList.add("plx-on");
    });
  }
  if (choices.length > 0) {
    var bar = document.createElement("div");
    bar.className = "plx-bar";
    var label = document.createElement("label");
    label.setAttribute("for", "plexus-subnetwork");
    label.textContent = "Highlight a subnetwork: ";
    select = document.createElement("select");
    select.id = "plexus-subnetwork";
    var none = document.createElement("option");
    none.value = "";
    none.textContent = "none";
    select.appendChild(none);
    choices.forEach(function (choice, i) {
      var option = document.createElement("option");
      option.value = String(i);
      option.textContent = data.contrasts[choice.k].name + ", subnetwork " + choice.s.id + " (" + choice.s.extent + " edges, " + choice.s.nodes + " regions, " + pIs("p_FWE", choice.s.p) + ")";
      select.appendChild(option);
    });
    select.addEventListener("change", function () { highlight(select.value); });
    bar.appendChild(label);
    bar.appendChild(select);
    var main = document.querySelector("main");
    main.parentNode.insertBefore(bar, main);
    Array.prototype.forEach.call(document.querySelectorAll("tr[data-component]"), function (row) {
      var k = Number(row.getAttribute("data-contrast")), id = Number(row.getAttribute("data-component"));
      var i = choices.findIndex(function (choice) { return choice.k === k && choice.s.id === id; });
      if (i < 0) return;
      row.classList.add("plx-pick");
      row.tabIndex = 0;
      row.title = "Highlight this subnetwork";
      var pick = function () { highlight(select.value === String(i) ? "" : String(i)); };
      row.addEventListener("click", pick);
      row.addEventListener("keydown", function (event) {
        if (event.key === "Enter" || event.key === " ") { event.preventDefault(); pick(); }
      });
    });
  }

  // Sorting tables by a click on a column header.
  function number(text) {
    var m = /^[<>\u2264\u2265=~\s]*([-\u2212]?(?:\d+\.?\d*|\.\d+)(?:e[-+\u2212]?\d+)?)/i.exec(text);
    return m ? Number(m[1].replace(/\u2212/g, "-")) : NaN;
  }
  function missing(text) { return text === "" || text === "\u2014" || text === "\u2013" || text === "NA"; }
  Array.prototype.forEach.call(document.querySelectorAll(".table-wrap table"), function (table) {
    var body = table.tBodies[0];
    if (!body || !table.tHead) return;
    var original = Array.prototype.slice.call(body.rows);
    var state = { column: -1, direction: 0 };
    var heads = Array.prototype.slice.call(table.tHead.rows[0].cells);
    heads.forEach(function (th, column) {
      var button = document.createElement("button");
      button.type = "button";
      button.className = "plx-sort";
      while (th.firstChild) button.appendChild(th.firstChild);
      var mark = document.createElement("span");
      mark.className = "plx-mark-sort";
      mark.setAttribute("aria-hidden", "true");
      mark.textContent = "\u2195";
      button.appendChild(mark);
      th.appendChild(button);
      button.addEventListener("click", function () {
        state.direction = state.column === column ? (state.direction === 1 ? -1 : state.direction === -1 ? 0 : 1) : 1;
        state.column = column;
        var texts = original.map(function (row) { return row.cells[column] ? row.cells[column].textContent.trim() : ""; });
        var numeric = texts.every(function (t) { return missing(t) || !isNaN(number(t)); });
        var order = original.map(function (_, i) { return i; });
        if (state.direction !== 0) {
          order.sort(function (i, j) {
            var x = texts[i], y = texts[j];
            if (missing(x) || missing(y)) return missing(x) === missing(y) ? i - j : missing(x) ? 1 : -1;
            var c = numeric ? number(x) - number(y) : x.localeCompare(y, undefined, { numeric: true });
            return state.direction * c || i - j;
          });
        }
        order.forEach(function (i) { body.appendChild(original[i]); });
        heads.forEach(function (other, c) {
          var sorted = c === column && state.direction !== 0;
          if (sorted) other.setAttribute("aria-sort", state.direction === 1 ? "ascending" : "descending");
          else other.removeAttribute("aria-sort");
          other.querySelector(".plx-mark-sort").textContent = sorted ? (state.direction === 1 ? "\u25B2" : "\u25BC") : "\u2195";
        });
      });
    });
  });
})();
`;

/** The styles the script's additions use (inert without it). */
export const REPORT_SCRIPT_STYLE = `
html.plx-js { scroll-padding-top: 3.2rem; }
figure[data-figure] svg text { pointer-events: none; }
.plx-bar { position: sticky; top: 0; z-index: 5; background: #ffffff; border-bottom: 1px solid #d9d9d9; padding: 6px 0; font-size: 0.9rem; }
.plx-bar select { font: inherit; max-width: 100%; }
.plx-tip { position: absolute; z-index: 10; pointer-events: none; background: #1a1a1a; color: #ffffff; font-size: 0.82rem; padding: 6px 9px; border-radius: 4px; max-width: 24rem; line-height: 1.35; }
.plx-tip-title { font-weight: 600; }
button.plx-sort { font: inherit; font-weight: inherit; color: inherit; background: none; border: none; padding: 0; cursor: pointer; text-align: inherit; }
button.plx-sort:focus-visible { outline: 2px solid #005a9c; outline-offset: 2px; }
.plx-mark-sort { margin-left: 4px; font-size: 0.75em; color: #777777; }
th[aria-sort] .plx-mark-sort { color: #1a1a1a; }
tr.plx-pick { cursor: pointer; }
tr.plx-pick:hover, tr.plx-pick:focus { background: #f0f0f0; }
tr.plx-on { background: #ffe8cc; }
svg.plx-focus path[data-edge]:not(.plx-on) { opacity: 0.12; }
svg.plx-focus path[data-casing].plx-on { stroke: #d55e00; }
.plx-mark { fill: none; stroke: #d55e00; stroke-width: 2.5px; vector-effect: non-scaling-stroke; }
@media print { .plx-bar, .plx-tip, .plx-mark-sort { display: none; } }
`;

/** The Content-Security-Policy source that lets exactly this script run (its SHA-256, base64). */
export function reportScriptSource(): string {
  return `'sha256-${createHash("sha256").update(REPORT_SCRIPT, "utf8").digest("base64")}'`;
}
