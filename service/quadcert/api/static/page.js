// The page at /: a form, the certificate, the picture, and the same integral in other tools' hands.
// Plain script, no build step. Numbers the user types are sent as the digits typed (JSON numbers), never
// through a float.
"use strict";

const $ = (id) => document.getElementById(id);
const DECIMAL = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d{1,9})?$/;
const TAIL_SHARE = 0.06; // an infinite end is drawn this share of the finite span beyond it
let charts = [];
let lastBoxes = [];
let lastRange = null;

// -- the request ------------------------------------------------------------------------------------
function jsonNumberOrText(text) {
  const t = text.trim();
  return DECIMAL.test(t) ? t : JSON.stringify(t); // a number goes out with exactly its digits
}

function parameters() {
  const found = [];
  for (const line of $("parameters").value.split(/\n|;/)) {
    if (!line.trim()) continue;
    const at = line.indexOf("=");
    found.push(at < 0 ? [line.trim(), ""] : [line.slice(0, at).trim(), line.slice(at + 1).trim()]);
  }
  return found;
}

function requestBody() {
  const fields = [
    `"integrand":${JSON.stringify($("integrand").value)}`,
    `"variable":${JSON.stringify($("variable").value.trim() || "x")}`,
    `"lower_limit":${JSON.stringify($("lower").value.trim())}`,
    `"upper_limit":${JSON.stringify($("upper").value.trim())}`,
    `"tolerance":${jsonNumberOrText($("tolerance").value || "1e-8")}`,
  ];
  if ($("relative").value.trim()) fields.push(`"relative_tolerance":${jsonNumberOrText($("relative").value)}`);
  const params = parameters();
  if (params.length) {
    fields.push(`"parameters":{${params.map(([k, v]) => `${JSON.stringify(k)}:${jsonNumberOrText(v)}`).join(",")}}`);
  }
  return `{${fields.join(",")}}`;
}

function query() {
  const q = new URLSearchParams();
  q.set("integrand", $("integrand").value);
  q.set("lower_limit", $("lower").value.trim());
  q.set("upper_limit", $("upper").value.trim());
  q.set("tolerance", $("tolerance").value.trim() || "1e-8");
  if (($("variable").value.trim() || "x") !== "x") q.set("variable", $("variable").value.trim());
  if ($("relative").value.trim()) q.set("relative_tolerance", $("relative").value.trim());
  for (const [k, v] of parameters()) q.append("parameter", `${k}:${v}`);
  return q;
}

// -- errors as you type: the whole request, checked by the service with the API's own codes -------------
const FIELDS = { integrand: "integrand", variable: "variable", lower_limit: "lower", upper_limit: "upper",
  tolerance: "tolerance", relative_tolerance: "relative", parameters: "parameters" };
let checkTimer = null;
let checkSeq = 0;
function scheduleCheck() {
  clearTimeout(checkTimer);
  checkTimer = setTimeout(checkRequest, 150);
}

async function checkRequest() {
  const seq = ++checkSeq;
  const response = await fetch("/v1/integrals/validate", {
    method: "POST", headers: { "content-type": "application/json" }, body: requestBody(),
  });
  if (seq !== checkSeq) return; // a later keystroke has its own answer coming
  showProblem(response.ok ? null : await response.json());
}

function fieldOf(problem) {
  // the input a problem belongs to: its field ("lower_limit", "parameters.k", "body.tolerance"), else the formula
  const name = String(problem.field || "integrand").replace(/^body\./, "").split(".")[0];
  return FIELDS[name] || "integrand";
}

function showProblem(problem) {
  for (const id of Object.values(FIELDS)) $(id).removeAttribute("aria-invalid");
  $("integrand-error").textContent = "";
  $("integrand-marker").textContent = "";
  delete $("integrand-error").dataset.code;
  $("request-error").textContent = "";
  if (!problem) return;
  const id = fieldOf(problem);
  $(id).setAttribute("aria-invalid", "true");
  const message = `${problem.code}: ${problem.detail}`;
  if (id === "integrand") {
    $("integrand-error").textContent = message;
    $("integrand-error").dataset.code = problem.code;
    $("integrand-marker").textContent = problem.column ? " ".repeat(problem.column - 1) + "^" : "";
    $("integrand-marker").dataset.column = problem.column || "";
  } else {
    $("request-error").textContent = message;
    $("request-error").dataset.code = problem.code;
    $("request-error").dataset.field = id;
  }
}

// -- the answer ---------------------------------------------------------------------------------------
async function certify(event) {
  if (event) event.preventDefault();
  $("status").textContent = "Computing…";
  $("go").disabled = true;
  const started = performance.now();
  try {
    const response = await fetch("/v1/pictures", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: requestBody(),
    });
    const answer = await response.json();
    if (!response.ok) {
      $("status").textContent = `${answer.code}: ${answer.detail}`;
      if (response.status === 422) showProblem(answer);
      return;
    }
    showResult(answer, performance.now() - started);
    $("status").textContent = "";
  } catch (error) {
    $("status").textContent = `The service did not answer: ${error}`;
  } finally {
    $("go").disabled = false;
  }
}

function showResult(answer, elapsed) {
  const r = answer.integral;
  $("result").hidden = false;
  $("value").textContent = answer.digits ?? String(r.value);
  $("digits-note").textContent = answer.digits ? "(every digit shown is certified)" : "(no digit is certain yet)";
  $("enclosure").textContent = `[${r.enclosure[0]}, ${r.enclosure[1]}]`;
  $("error-bound").textContent = String(r.error_bound);
  $("counts").textContent = `${r.nodes} nodes, ${r.panels} panels`;
  $("time").textContent = `${(r.compute_seconds * 1000).toFixed(1)} ms in the engine, ${elapsed.toFixed(0)} ms in all`;
  const verdict = $("verdict");
  verdict.textContent = r.tolerance_met
    ? `certified within the tolerance (${r.stop_reason})`
    : `not within the tolerance: ${r.stop_reason}`;
  verdict.className = r.tolerance_met ? "certified" : "not-certified";
  const q = query();
  const link = `${location.origin}/?${q}`;
  $("reproduce").href = link;
  history.replaceState(null, "", `/?${q}`);
  $("engine").textContent = r.engine_version;
  drawPicture(answer.boxes, answer.y_range);
  $("picture-summary").textContent = answer.summary;
  showSnippets(q);
}

// -- the picture --------------------------------------------------------------------------------------
function finiteEnds(boxes) {
  let low = Infinity, high = -Infinity;
  for (const b of boxes) {
    for (const v of [b[0], b[1]]) if (typeof v === "number") { low = Math.min(low, v); high = Math.max(high, v); }
  }
  const span = high > low ? high - low : 1;
  const end = (v) => (v === "-inf" ? low - TAIL_SHARE * span : v === "inf" ? high + TAIL_SHARE * span : v);
  return { end, low, high };
}

function hatch(color) {
  // the envelope pieces' fill: diagonal lines, as in the SVG picture
  const tile = document.createElement("canvas");
  tile.width = tile.height = 8;
  const g = tile.getContext("2d");
  g.strokeStyle = color;
  g.lineWidth = 2;
  g.beginPath();
  g.moveTo(0, 8);
  g.lineTo(8, 0);
  g.stroke();
  return g.createPattern(tile, "repeat");
}

function cssColor(name) {
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim();
}

function drawPicture(boxes, yRange) {
  const started = performance.now();
  for (const chart of charts) chart.destroy();
  charts = [];
  lastBoxes = boxes;
  lastRange = yRange;
  const { end } = finiteEnds(boxes);
  const lefts = boxes.map((b) => end(b[0]));
  const rights = boxes.map((b) => end(b[1]));
  const mids = lefts.map((l, i) => (l + rights[i]) / 2);
  let fLow = Infinity, fHigh = -Infinity, eLow = Infinity, eHigh = -Infinity;
  for (const b of boxes) {
    if (b[2] !== null) { fLow = Math.min(fLow, b[2]); fHigh = Math.max(fHigh, b[3]); }
    if (typeof b[4] === "number" && b[4] > 0) { eLow = Math.min(eLow, b[4]); eHigh = Math.max(eHigh, b[4]); }
  }
  if (yRange) [fLow, fHigh] = yRange; // the server's axis: the tallest boxes next to a singular point are cut
  if (!(fHigh > fLow)) { fLow -= 1; fHigh += 1; }
  if (!(eHigh > eLow)) { eLow = eLow === Infinity ? 1e-16 : eLow / 10; eHigh = eLow * 100; }
  const width = Math.max(320, $("band").clientWidth || 900);
  const colors = {
    box: cssColor("--box"), edge: cssColor("--box-edge"), coarse: cssColor("--coarse"),
    envelope: cssColor("--envelope"), ink: cssColor("--ink"), line: cssColor("--line"),
  };
  const axes = [{ stroke: colors.ink, grid: { stroke: colors.line } }, { stroke: colors.ink, grid: { stroke: colors.line } }];
  const sync = uPlot.sync("quadcert");
  const common = (height, yRange, log) => ({
    width, height,
    cursor: { sync: { key: sync.key, setSeries: false }, drag: { x: true, y: false } },
    legend: { show: false },
    scales: { x: { time: false }, y: log ? { range: () => yRange, distr: 3, log: 10 } : { range: () => yRange } },
    axes: log
      ? [axes[0], { ...axes[1], values: (u, ticks) => ticks.map((t) => (t == null ? "" : t.toExponential(0))) }]
      : axes,
    series: [{}, { show: false }],
  });
  let drawn = 0;
  const hatched = hatch(colors.envelope);
  const band = new uPlot({
    ...common(320, [fLow, fHigh], false),
    hooks: {
      draw: [(u) => {
        const ctx = u.ctx;
        ctx.save();
        ctx.beginPath();
        ctx.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
        ctx.clip();
        drawn = 0;
        for (let i = 0; i < boxes.length; i++) {
          const b = boxes[i];
          const x0 = u.valToPos(lefts[i], "x", true);
          const x1 = u.valToPos(rights[i], "x", true);
          const top = b[2] === null ? u.bbox.top : u.valToPos(b[3], "y", true);
          const bottom = b[2] === null ? u.bbox.top + u.bbox.height : u.valToPos(b[2], "y", true);
          const kind = b[5];
          ctx.globalAlpha = 1;
          ctx.fillStyle = kind.endsWith("envelope") ? hatched : /f[123]$|^range$/.test(kind) ? colors.coarse : colors.box;
          ctx.fillRect(x0, top, Math.max(x1 - x0, 1), Math.max(bottom - top, 1));
          if (x1 - x0 >= 3) { // panel ends, where they are far enough apart to read
            ctx.globalAlpha = 0.35;
            ctx.fillStyle = colors.edge;
            ctx.fillRect(x0, u.bbox.top, 1, u.bbox.height);
          }
          drawn++;
        }
        ctx.restore();
        u.root.dataset.boxes = String(drawn);
        $("band").dataset.boxes = String(drawn);
      }],
    },
  }, [mids, mids.map(() => null)], $("band"));
  const errors = new uPlot({
    ...common(170, [10 ** Math.floor(Math.log10(eLow)), 10 ** Math.ceil(Math.log10(eHigh))], true),
    hooks: {
      draw: [(u) => {
        const ctx = u.ctx;
        ctx.save();
        ctx.fillStyle = colors.envelope;
        ctx.globalAlpha = 0.75;
        const bottom = u.bbox.top + u.bbox.height;
        for (let i = 0; i < boxes.length; i++) {
          const e = boxes[i][4];
          if (!(typeof e === "number" && e > 0)) continue;
          const x0 = u.valToPos(lefts[i], "x", true), x1 = u.valToPos(rights[i], "x", true);
          const top = u.valToPos(e, "y", true);
          ctx.fillRect(x0, top, Math.max(x1 - x0, 1), bottom - top);
        }
        ctx.restore();
      }],
    },
  }, [mids, mids.map(() => null)], $("errors"));
  charts = [band, errors];
  for (const chart of charts) {
    chart.over.tabIndex = 0; // reachable by keyboard: arrows pan, + and - zoom
    chart.over.setAttribute("aria-label", "picture of the panels; arrow keys pan, plus and minus zoom, 0 resets");
    chart.over.addEventListener("keydown", (e) => keyZoom(e, chart));
  }
  // zoom one, zoom both
  band.hooks.setScale = [(u, key) => { if (key === "x") syncX(u); }];
  errors.hooks.setScale = [(u, key) => { if (key === "x") syncX(u); }];
  band.root.dataset.panels = String(boxes.length);
  $("band").dataset.drawMs = (performance.now() - started).toFixed(0); // both charts built and drawn once
}

let syncing = false;
function syncX(source) {
  if (syncing) return;
  syncing = true;
  const { min, max } = source.scales.x;
  for (const chart of charts) if (chart !== source) chart.setScale("x", { min, max });
  syncing = false;
}

function keyZoom(event, chart) {
  const { min, max } = chart.scales.x;
  const span = max - min;
  const moves = { ArrowLeft: [-0.1, -0.1], ArrowRight: [0.1, 0.1], "+": [0.2, -0.2], "=": [0.2, -0.2], "-": [-0.25, 0.25] };
  if (event.key === "0") { resetZoom(); event.preventDefault(); return; }
  const move = moves[event.key];
  if (!move) return;
  chart.setScale("x", { min: min + move[0] * span, max: max + move[1] * span });
  event.preventDefault();
}

function resetZoom() {
  if (!charts.length) return;
  const xs = charts[0].data[0];
  charts[0].setScale("x", { min: xs[0], max: xs[xs.length - 1] });
}

function zoomDense() {
  // the narrowest stretch that holds a tenth of the panels: where the engine refined most
  if (!charts.length) return;
  const xs = charts[0].data[0];
  const n = xs.length;
  const k = Math.max(2, Math.floor(n / 10));
  let best = 0;
  for (let i = 0; i + k < n; i++) if (xs[i + k] - xs[i] < xs[best + k] - xs[best]) best = i;
  const low = xs[best], high = xs[Math.min(best + k, n - 1)];
  if (high > low) charts[0].setScale("x", { min: low, max: high });
}

// -- the same integral elsewhere ----------------------------------------------------------------------
function shellQuote(text) {
  return `'${text.replace(/'/g, `'"'"'`)}'`;
}

function showSnippets(q) {
  const origin = location.origin;
  const integrand = $("integrand").value;
  const lower = $("lower").value.trim(), upper = $("upper").value.trim();
  const tol = $("tolerance").value.trim() || "1e-8";
  const variable = $("variable").value.trim() || "x";
  const extra = [
    variable !== "x" ? ` --var ${shellQuote(variable)}` : "",
    ...parameters().map(([k, v]) => ` --param ${shellQuote(`${k}=${v}`)}`),
  ].join("");
  const limits = /^-/.test(lower) || /^-/.test(upper) ? ` -- ${shellQuote(lower)} ${shellQuote(upper)}` : ` ${shellQuote(lower)} ${shellQuote(upper)}`;
  const cliTail = /^-/.test(lower) || /^-/.test(upper);
  const cli = cliTail
    ? `quadcert integrate ${shellQuote(integrand)} --tol ${tol}${extra}${limits}`
    : `quadcert integrate ${shellQuote(integrand)}${limits} --tol ${tol}${extra}`;
  const params = parameters();
  const pyParams = params.length ? `, parameters={${params.map(([k, v]) => `"${k}": "${v}"`).join(", ")}}` : "";
  const pyVar = variable !== "x" ? `, variable="${variable}"` : "";
  const snippets = [
    ["curl", `curl -s ${origin}/v1/integrals -H 'content-type: application/json' -d ${shellQuote(requestBody())}`],
    ["Command line", cli],
    ["Spreadsheet cell", `=VALUE(WEBSERVICE("${origin}/v1/integral?${q.toString().replace(/"/g, "%22")}"))`],
    ["Python", `from quadcert import integrate\n\nr = integrate(${JSON.stringify(integrand)}, ${JSON.stringify(lower)}, ${JSON.stringify(upper)}, "${tol}"${pyVar}${pyParams})\nprint(r.enclosure, r.error_bound)`],
    ["CI check (exit code 0 pass, 1 fail, 2 undecided)", `quadcert check ${shellQuote(integrand)}${cliTail ? "" : limits} --claimed VALUE --tol ${tol}${extra}${cliTail ? limits : ""}`],
    ["Picture for a report (SVG)", `curl -s '${origin}/v1/integral?${q}&format=svg' -o integral.svg`],
  ];
  const holder = $("snippets");
  holder.textContent = "";
  for (const [title, text] of snippets) {
    const box = document.createElement("div");
    box.className = "snippet";
    const h = document.createElement("h3");
    h.textContent = title;
    const pre = document.createElement("pre");
    pre.textContent = text;
    pre.tabIndex = 0;
    box.append(h, pre);
    holder.append(box);
  }
}

// -- start --------------------------------------------------------------------------------------------
function fillFromQuery() {
  const q = new URLSearchParams(location.search);
  if (!q.has("integrand")) return false;
  $("integrand").value = q.get("integrand");
  $("lower").value = q.get("lower_limit") ?? "0";
  $("upper").value = q.get("upper_limit") ?? "1";
  $("tolerance").value = q.get("tolerance") ?? "1e-8";
  $("variable").value = q.get("variable") ?? "x";
  $("relative").value = q.get("relative_tolerance") ?? "";
  $("parameters").value = q.getAll("parameter").map((p) => p.replace(":", " = ")).join("\n");
  return true;
}

$("form").addEventListener("submit", certify);
for (const id of Object.values(FIELDS)) $(id).addEventListener("input", scheduleCheck);
$("zoom-dense").addEventListener("click", zoomDense);
$("zoom-reset").addEventListener("click", resetZoom);
window.addEventListener("resize", () => { if (lastBoxes.length) drawPicture(lastBoxes, lastRange); });
if (fillFromQuery()) certify();
