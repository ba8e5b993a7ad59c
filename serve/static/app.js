// fickfit workbench page. No libraries: the DOM, fetch and SVG.
// Every number comes from the server (the same code as the command line);
// this file only lays it out and draws it.
"use strict";

const $ = (id) => document.getElementById(id);
const SVGNS = "http://www.w3.org/2000/svg";

const app = {
  state: null,      // /api/state
  rows: [],         // /api/profiles rows
  view: [],         // rows after filter and sort
  sort: { key: "", up: true },
  current: "",      // open profile id
  profile: null,    // /api/profile of the open profile
  arr: null,        // /api/arrhenius
  tab: "table",
  gen: -1,          // settings generation of the rows
  wasRunning: false,
};

// ---------- small helpers ----------

function el(tag, attrs, ...kids) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (k === "class") e.className = v;
    else if (k === "text") e.textContent = v;
    else if (k.startsWith("on")) e.addEventListener(k.slice(2), v);
    else if (v !== undefined && v !== null && v !== false) e.setAttribute(k, v === true ? "" : v);
  }
  for (const k of kids) if (k !== null && k !== undefined) e.append(k);
  return e;
}

function svg(tag, attrs, parent) {
  const e = document.createElementNS(SVGNS, tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (k === "text") e.textContent = v; else e.setAttribute(k, v);
  }
  if (parent) parent.append(e);
  return e;
}

async function api(path, opts) {
  const r = await fetch(path, opts);
  const type = r.headers.get("Content-Type") || "";
  const body = type.includes("json") ? await r.json() : await r.text();
  if (!r.ok) throw new Error(body && body.error ? body.error : "the server answered " + r.status);
  return body;
}

const postJSON = (path, v) => api(path, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(v) });

let toastTimer = 0;
function toast(msg, bad) {
  const t = $("toast");
  t.textContent = msg;
  t.className = "toast" + (bad ? " bad" : "");
  t.hidden = false;
  clearTimeout(toastTimer);
  toastTimer = setTimeout(() => { t.hidden = true; }, bad ? 9000 : 3500);
}

// Readable badges for the stable warning codes; the message is the tooltip.
const BADGES = {
  "time-missing": "no time (Dt)", "d-uncertain": "D uncertain", "residual-pattern": "patterned residuals",
  "ill-conditioned": "ill-conditioned", "plateau-not-reached": "no plateau", "penetration-beyond-data": "deeper than data",
  "penetration-below-first-step": "shallower than 1st step", "thin-section": "thin section", "ci-open": "open interval",
  "hardness-proxy": "hardness as proxy", "bootstrap-failures": "bootstrap failures",
};
const badgeText = (code) => BADGES[code] || code.replace(/-/g, " ");

function fmtAxis(v) {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e4 || a < 1e-3) return v.toExponential(1).replace("e", "e");
  return String(Number(v.toPrecision(6)));
}

// nice ticks over [lo, hi]
function ticks(lo, hi, n) {
  const span = hi - lo;
  if (!(span > 0)) return [lo];
  const raw = span / (n || 5);
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw);
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

// A plot frame: scales and axes in an SVG of the given viewBox size.
function frame(root, w, h, m, xr, yr, opts) {
  root.replaceChildren();
  const X = (v) => m.l + (v - xr[0]) / (xr[1] - xr[0]) * (w - m.l - m.r);
  const Y = (v) => h - m.b - (v - yr[0]) / (yr[1] - yr[0]) * (h - m.t - m.b);
  const g = svg("g", { class: "axis" }, root);
  const xt = opts.xticks || ticks(xr[0], xr[1], 7).map((v) => [v, fmtAxis(v)]);
  const yt = opts.yticks || ticks(yr[0], yr[1], 5).map((v) => [v, fmtAxis(v)]);
  for (const [v, lab] of xt) {
    const x = X(v);
    svg("line", { x1: x, x2: x, y1: m.t, y2: h - m.b, class: "gridline" }, g);
    if (!opts.noXLabels) svg("text", { x, y: h - m.b + 14, "text-anchor": "middle", text: lab }, g);
  }
  for (const [v, lab] of yt) {
    const y = Y(v);
    svg("line", { x1: m.l, x2: w - m.r, y1: y, y2: y, class: "gridline" }, g);
    svg("text", { x: m.l - 5, y: y + 4, "text-anchor": "end", text: lab }, g);
  }
  svg("rect", { x: m.l, y: m.t, width: w - m.l - m.r, height: h - m.t - m.b, fill: "none", stroke: "#8e959b" }, g);
  if (opts.xlabel) svg("text", { x: (m.l + w - m.r) / 2, y: h - 6, "text-anchor": "middle", class: "label", text: opts.xlabel }, g);
  if (opts.ylabel) svg("text", { x: 13, y: (m.t + h - m.b) / 2, "text-anchor": "middle", class: "label", transform: `rotate(-90 13 ${(m.t + h - m.b) / 2})`, text: opts.ylabel }, g);
  return { X, Y };
}

function pathOf(xs, ys, X, Y) {
  let d = "";
  for (let i = 0; i < xs.length; i++) {
    if (ys[i] === null || !isFinite(ys[i])) continue;
    d += (d ? "L" : "M") + X(xs[i]).toFixed(1) + "," + Y(ys[i]).toFixed(1);
  }
  return d;
}

function bandOf(xs, lo, hi, X, Y) {
  const idx = xs.map((_, i) => i).filter((i) => lo[i] !== null && hi[i] !== null);
  if (idx.length < 2) return "";
  let d = "M" + idx.map((i) => X(xs[i]).toFixed(1) + "," + Y(hi[i]).toFixed(1)).join("L");
  d += "L" + idx.reverse().map((i) => X(xs[i]).toFixed(1) + "," + Y(lo[i]).toFixed(1)).join("L") + "Z";
  return d;
}

// ---------- state, files, settings ----------

async function refreshState() {
  const s = await api("api/state");
  app.state = s;
  showProgress(s);
  showFiles(s);
  showSettings(s);
  showExclusions(s);
  $("command").textContent = s.command;
  return s;
}

function showProgress(s) {
  const p = $("progress");
  const frac = s.total > 0 ? s.done / s.total : 1;
  p.querySelector(".fill").style.width = (s.running ? 100 * frac : s.profiles ? 100 : 0) + "%";
  p.classList.toggle("done", !s.running);
  p.querySelector(".label").textContent = s.running ? `fitting ${s.done} / ${s.total} on all cores` :
    s.profiles ? `${s.profiles} profiles fitted` : "no profiles loaded";
  p.dataset.running = s.running ? "1" : "0";
}

let filesShown = "";
function showFiles(s) {
  const sig = JSON.stringify(s.files);
  if (sig === filesShown) return; // unchanged: leave the DOM alone
  filesShown = sig;
  const ul = $("files");
  ul.replaceChildren();
  if (!s.files.length) ul.append(el("li", { class: "none", text: "No files yet." }));
  for (const f of s.files) {
    const li = el("li", { "data-file": f.name },
      el("button", { class: "x", title: "unload this file (the file itself is not touched)", text: "×", onclick: () => removeFile(f.name) }),
      el("span", { class: "mono", title: f.name, text: f.name.split(/[\\/]/).pop() }), " ",
      f.error ? null : el("span", { class: "n", text: `${f.profiles.length} profile${f.profiles.length === 1 ? "" : "s"}` }),
      f.error ? el("span", { class: "error", text: f.error }) : null);
    ul.append(li);
  }
}

let settingsShown = -1;
function showSettings(s) {
  if (settingsShown === s.generation && $("s-model").options.length) return;
  settingsShown = s.generation;
  const st = s.settings;
  const fill = (sel, vals, cur) => {
    sel.replaceChildren(...vals.map((v) => el("option", { value: v, text: v })));
    sel.value = cur;
  };
  fill($("s-model"), s.models, st.model);
  fill($("s-dc"), s.dc_laws, st.dc);
  $("s-surface").value = st.surface;
  showNumeric();
  fill($("s-ci"), s.ci_methods, st.ci);
  $("s-level").value = st.level;
  $("s-fix").value = st.fix.join(", ");
  $("s-free").value = st.free.join(", ");
  $("s-case").value = st.case_threshold;
  $("s-by").value = st.by;
  $("s-unit").value = st.temperature_unit;
  $("s-cal").textContent = st.calibration || "none";
}

// The numerical model's own settings show only when it is chosen.
function showNumeric() {
  $("s-numeric").hidden = $("s-model").value !== "numeric";
}

function showExclusions(s) {
  const pts = s.exclusions.filter((e) => e.depth_um !== null).length;
  const whole = s.exclusions.length - pts;
  $("ex-summary").textContent = !s.exclusions.length ? "No points excluded." :
    `${pts} point${pts === 1 ? "" : "s"} excluded` + (whole ? `, ${whole} profile${whole === 1 ? "" : "s"} left out of the Arrhenius lines` : "") + ".";
}

const split = (v) => v.split(",").map((x) => x.trim()).filter(Boolean);

async function applySettings() {
  const st = {
    model: $("s-model").value, ci: $("s-ci").value, level: Number($("s-level").value), fix: split($("s-fix").value),
    free: split($("s-free").value), case_threshold: $("s-case").value.trim(), by: $("s-by").value.trim(),
    temperature_unit: $("s-unit").value, dc: $("s-dc").value, surface: $("s-surface").value,
  };
  $("s-error").hidden = true;
  try {
    await postJSON("api/settings", st);
    settingsShown = -1;
    await refreshState();
    await refreshAll();
  } catch (e) {
    $("s-error").textContent = e.message;
    $("s-error").hidden = false;
  }
}

async function removeFile(name) {
  await api("api/files?name=" + encodeURIComponent(name), { method: "DELETE" });
  await refreshState();
  await refreshRows();
}

// An exclusions file has only the exclusions columns (no measured value).
async function isExclusions(f) {
  if (!/\.(csv|tsv|txt)$/i.test(f.name)) return false;
  const head = await f.slice(0, 8192).text();
  const line = head.split(/\r?\n/).map((l) => l.trim()).find((l) => l && !l.startsWith("#"));
  if (!line) return false;
  const cols = line.split(/[,;\t]/).map((c) => c.trim().toLowerCase().replace(/^"|"$/g, ""));
  const known = /^(file|source|profile|id|specimen|sample|line|row|reason|note|comment|(depth|position|distance)[ _(\[/].*)$/;
  return cols.every((c) => c === "" || known.test(c)) && cols.some((c) => /^(depth|position|distance)/.test(c));
}

async function upload(files) {
  const list = Array.from(files);
  let n = 0;
  for (const f of list) {
    n++;
    $("progress").querySelector(".label").textContent = `reading ${n} / ${list.length}: ${f.name}`;
    try {
      if (await isExclusions(f)) {
        await api("api/exclusions?name=" + encodeURIComponent(f.name), { method: "POST", body: f });
        toast(`Exclusions loaded from ${f.name}`);
        continue;
      }
      if (app.state && f.size > app.state.max_file_bytes) {
        toast(`${f.name}: larger than ${app.state.max_file_bytes >> 20} MiB, the most the readers take`, true);
        continue;
      }
      await api("api/files?name=" + encodeURIComponent(f.name), { method: "POST", body: f });
    } catch (e) {
      toast(`${f.name}: ${e.message}`, true);
    }
  }
  await refreshState();
  await refreshAll();
}

// ---------- the table ----------

const COLS = [
  { key: "id", label: "id" }, { key: "lot", label: "lot" }, { key: "temperature_K", label: "T", num: true },
  { key: "time_s", label: "t", num: true }, { key: "model", label: "model" }, { key: "D", label: "D (m²/s)", num: true },
  { key: "ci_text", label: "interval" }, { key: "r2", label: "R²", num: true }, { key: "warnings", label: "warnings" },
];

function buildHead() {
  const h = $("thead");
  h.replaceChildren(...COLS.map((c) => el("div", { class: c.num ? "num" : "", "data-key": c.key, text: c.label,
    onclick: () => { app.sort = { key: c.key, up: app.sort.key === c.key ? !app.sort.up : true }; applyView(); } })));
}

let rowsShown = "";
async function refreshRows() {
  const r = await api("api/profiles");
  const sig = JSON.stringify(r.rows);
  if (sig === rowsShown) return; // unchanged: keep the DOM (and the scroll) as it is
  rowsShown = sig;
  app.rows = r.rows;
  app.gen = r.generation;
  fillFilters();
  applyView();
}

function fillFilters() {
  const keep = (sel, vals, first) => {
    const cur = sel.value;
    sel.replaceChildren(...first, ...vals.map((v) => el("option", { value: v, text: v })));
    sel.value = vals.includes(cur) || first.some((o) => o.value === cur) ? cur : "";
  };
  const lots = [...new Set(app.rows.map((r) => r.lot || "(none)"))].sort();
  keep($("f-lot"), lots, [el("option", { value: "", text: "every lot" })]);
  const temps = [...new Map(app.rows.filter((r) => r.temperature).map((r) => [r.temperature, r.temperature_K])).entries()]
    .sort((a, b) => a[1] - b[1]).map((e) => e[0]);
  keep($("f-temp"), temps, [el("option", { value: "", text: "every temperature" })]);
  const codes = [...new Set(app.rows.flatMap((r) => r.warnings.map((w) => w.code)))].sort();
  keep($("f-warn"), codes, [el("option", { value: "", text: "any warnings" }), el("option", { value: "-", text: "no warnings" }),
    el("option", { value: "+", text: "with warnings" })]);
  for (const o of $("f-warn").options) if (BADGES[o.value]) o.textContent = badgeText(o.value);
}

function applyView() {
  const q = $("f-text").value.trim().toLowerCase();
  const lot = $("f-lot").value, temp = $("f-temp").value, warn = $("f-warn").value, status = $("f-status").value;
  let v = app.rows.filter((r) => {
    if (q && !r.id.toLowerCase().includes(q) && !r.file.toLowerCase().includes(q)) return false;
    if (lot && (r.lot || "(none)") !== lot) return false;
    if (temp && r.temperature !== temp) return false;
    if (warn === "-" && r.warnings.length) return false;
    if (warn === "+" && !r.warnings.length) return false;
    if (warn && warn !== "-" && warn !== "+" && !r.warnings.some((w) => w.code === warn)) return false;
    if (status === "failed" && r.status !== "failed") return false;
    if (status === "excluded" && !(r.excluded || r.left_out)) return false;
    if (status === "unknown" && !r.unknown) return false;
    return true;
  });
  const k = app.sort.key;
  if (k) {
    const val = (r) => k === "warnings" ? r.warnings.length : r[k];
    const dir = app.sort.up ? 1 : -1;
    v = v.slice().sort((a, b) => {
      const x = val(a), y = val(b);
      if (x === y) return 0;
      if (x === null || x === undefined || x === "") return 1;
      if (y === null || y === undefined || y === "") return -1;
      return (x < y ? -1 : 1) * dir;
    });
  }
  app.view = v;
  for (const d of $("thead").children) {
    d.classList.toggle("sorted", d.dataset.key === k);
    d.classList.toggle("up", d.dataset.key === k && app.sort.up);
  }
  $("f-count").textContent = `${v.length} of ${app.rows.length} profiles`;
  $("spacer").style.height = v.length * rowHeight() + "px";
  alignHead();
  drawRows(true);
}

const rowHeight = () => 30;

// The header lines up with the rows, whose scroller may show a scroll bar.
function alignHead() {
  const sc = $("scroller");
  $("thead").style.paddingRight = (sc.offsetWidth - sc.clientWidth) + "px";
}

// Only the rows in sight are in the DOM, so thousands of profiles scroll smoothly.
let drawnFrom = -1, drawnTo = -1;
function drawRows(force) {
  const sc = $("scroller");
  const h = rowHeight();
  const from = Math.max(0, Math.floor(sc.scrollTop / h) - 10);
  const to = Math.min(app.view.length, Math.ceil((sc.scrollTop + sc.clientHeight) / h) + 10);
  if (!force && from === drawnFrom && to === drawnTo) return;
  drawnFrom = from; drawnTo = to;
  const box = $("rows");
  box.style.transform = `translateY(${from * h}px)`;
  const frag = document.createDocumentFragment();
  for (let i = from; i < to; i++) frag.append(rowEl(app.view[i]));
  box.replaceChildren(frag);
}

function rowEl(r) {
  const stale = r.status === "pending" || r.status === "stale";
  const warn = el("div", {});
  if (r.status === "failed") warn.append(el("span", { class: "badge bad", title: r.error, text: "not fitted" }));
  if (r.unknown) warn.append(el("span", { class: "badge info", title: "marked unknown: back-calculated, not in the calibration", text: "part" }));
  if (r.excluded) warn.append(el("span", { class: "badge ex", title: "points excluded by you", text: `${r.excluded} excluded` }));
  if (r.left_out) warn.append(el("span", { class: "badge ex", title: "left out of the Arrhenius lines by you", text: "left out" }));
  for (const w of r.warnings) warn.append(el("span", { class: "badge", title: w.message, text: badgeText(w.code) }));
  if (stale) warn.append(el("span", { class: "stale", text: "fitting…" }));
  return el("div", { class: "grid" + (r.status === "failed" ? " failed" : ""), "data-id": r.id, onclick: () => openProfile(r.id) },
    el("div", { class: "mono", title: r.file, text: r.id }),
    el("div", { text: r.lot }),
    el("div", { class: "num", text: r.temperature }),
    el("div", { class: "num", text: r.time }),
    el("div", { text: r.model }),
    el("div", { class: "num d" + (stale ? " stale" : ""), "data-d": r.D === null ? "" : String(r.D), text: r.D_text + (r.dt ? " Dt" : "") }),
    el("div", { class: "mono", text: r.ci_text }),
    el("div", { class: "num", text: r.r2_text }),
    warn);
}

// ---------- one profile ----------

async function openProfile(id) {
  app.current = id;
  showTab("profile");
  await loadProfile();
}

async function loadProfile() {
  if (!app.current) return;
  try {
    app.profile = await api("api/profile?id=" + encodeURIComponent(app.current));
    drawProfileView();
  } catch (e) {
    toast(e.message, true);
  }
}

function step(dir) {
  const i = app.view.findIndex((r) => r.id === app.current);
  const j = i + dir;
  if (j >= 0 && j < app.view.length) openProfile(app.view[j].id);
}

function depthScale(max) {
  return max < 2e-3 ? { f: 1e6, u: "µm" } : { f: 1e3, u: "mm" };
}

function drawProfileView() {
  const p = app.profile;
  const fit = p.fit;
  $("p-title").textContent = p.id;
  const cond = [p.lot && "lot " + p.lot, p.temperature, p.time, p.file].filter(Boolean).join(" · ");
  $("p-sub").textContent = cond + (p.unknown ? " · part marked unknown" : "");
  const d = $("p-d");
  d.replaceChildren();
  if (fit) {
    d.append(el("div", { class: "v", "data-d": p.D === null ? "" : String(p.D), text: (p.dt ? "Dt = " : "D = ") + p.D_text + (p.dt ? " m²" : " m²/s") }),
      el("div", { class: "ci", text: p.interval + ": " + p.ci_text }),
      el("div", { class: "ci", text: p.model_title }));
  } else if (p.error) {
    d.append(el("div", { class: "v", text: "not fitted" }), el("div", { class: "ci", text: p.error }));
  }
  const wl = el("ul", { class: "warnings" });
  for (const w of p.warnings) wl.append(el("li", { text: w.message }));
  $("p-warn").replaceChildren(wl);
  const t = $("p-params");
  t.replaceChildren();
  if (p.Params) {
    t.append(el("tr", {}, el("th", { text: "parameter" }), el("th", { text: "value" }), el("th", { text: "std. error" }), el("th", { text: "interval" })));
    for (const q of p.Params) t.append(el("tr", {}, el("td", { text: q.Name }), el("td", { text: q.Value }), el("td", { text: q.SE }), el("td", { text: q.CI })));
  }
  $("p-stats").textContent = (p.stats || []).join(" · ");
  $("p-extra").textContent = p.extra || "";
  $("p-extra").hidden = !p.extra;
  const ex = p.points.filter((q) => q.excluded);
  const exbox = $("p-excluded");
  exbox.replaceChildren();
  if (ex.length) {
    const sc = depthScale(Math.max(...p.points.map((q) => Math.abs(q.depth_m))));
    exbox.append(el("h2", { text: "Excluded points" }));
    const ul = el("ul", { class: "exlist" });
    for (const q of ex) ul.append(el("li", { text: `${fmtAxis(q.depth_m * sc.f)} ${sc.u} (line ${q.line}): ${q.reason || "no reason given"}` }));
    exbox.append(ul);
  }
  const lo = $("p-leaveout");
  lo.classList.toggle("on", p.left_out);
  lo.textContent = p.left_out ? "Left out of the Arrhenius lines — take it back in" : "Leave this profile out of the Arrhenius lines";
  drawProfilePlot(p);
}

function drawProfilePlot(p) {
  const root = $("p-plot"), rroot = $("p-resid");
  const W = 680, H = 330, HR = 140, m = { l: 62, r: 16, t: 14, b: 36 };
  const pts = p.points;
  if (!pts.length) { root.replaceChildren(); rroot.replaceChildren(); return; }
  const xs = pts.map((q) => q.depth_m);
  const sc = depthScale(Math.max(...xs.map(Math.abs)));
  let x0 = Math.min(0, ...xs), x1 = Math.max(...xs);
  if (p.curve) { x0 = Math.min(x0, p.curve.x[0]); x1 = Math.max(x1, p.curve.x[p.curve.x.length - 1]); }
  const ys = pts.map((q) => q.value);
  if (p.curve) for (const arr of [p.curve.lo, p.curve.hi]) for (const v of arr) if (v !== null) ys.push(v);
  let y0 = Math.min(...ys), y1 = Math.max(...ys);
  const pad = (y1 - y0) * 0.06 || 0.1;
  y0 -= pad; y1 += pad;
  const unit = p.value_unit ? ` (${p.value_unit})` : "";
  const xr = [x0 * sc.f, x1 * sc.f];
  const { X, Y } = frame(root, W, H, m, xr, [y0, y1], { xlabel: `depth (${sc.u})`, ylabel: (p.quantity || p.value_name || "value") + unit });
  if (p.curve) {
    const cx = p.curve.x.map((v) => v * sc.f);
    svg("path", { d: bandOf(cx, p.curve.lo, p.curve.hi, X, Y), class: "band" }, root);
    svg("path", { d: pathOf(cx, p.curve.y, X, Y), class: "curve" }, root);
  }
  const fitted = (depth) => {
    if (!p.curve) return null;
    const c = p.curve, x = c.x;
    for (let i = 1; i < x.length; i++) {
      if (x[i] >= depth) {
        const f = (depth - x[i - 1]) / (x[i] - x[i - 1]);
        return c.y[i - 1] + f * (c.y[i] - c.y[i - 1]);
      }
    }
    return null;
  };
  pts.forEach((q, i) => {
    const cx = X(q.depth_m * sc.f), cy = Y(q.value);
    const g = svg("g", { "data-index": i, class: "point" + (q.excluded ? " excluded" : "") }, root);
    const tip = `depth ${fmtAxis(q.depth_m * sc.f)} ${sc.u}, ${q.value}${p.value_unit ? " " + p.value_unit : ""}, line ${q.line}` +
      (q.excluded ? ` — excluded${q.reason ? ": " + q.reason : ""}; click to bring it back` : " — click to exclude");
    svg("circle", { cx, cy, r: 10, class: "hit" }, g);
    svg("title", { text: tip }, g);
    if (q.excluded) {
      svg("rect", { x: cx - 4.5, y: cy - 4.5, width: 9, height: 9, class: "pt out" }, g);
      svg("path", { d: `M${cx - 4.5},${cy - 4.5}L${cx + 4.5},${cy + 4.5}M${cx + 4.5},${cy - 4.5}L${cx - 4.5},${cy + 4.5}`, class: "cross" }, g);
    } else {
      svg("circle", { cx, cy, r: 4.5, class: "pt" }, g);
    }
    g.addEventListener("click", () => toggleExclude(i));
  });
  // residual panel on the same depth axis
  const res = pts.map((q) => { const f = fitted(q.depth_m); return f === null ? null : q.value - f; });
  const rv = res.filter((v) => v !== null);
  const rmax = Math.max(1e-12, ...rv.map(Math.abs)) * 1.15;
  const mr = { l: m.l, r: m.r, t: 8, b: 34 };
  const R = frame(rroot, W, HR, mr, xr, [-rmax, rmax], { xlabel: `depth (${sc.u}) — residual = measured − fitted`, ylabel: "residual",
    yticks: ticks(-rmax, rmax, 4).map((v) => [v, fmtAxis(v)]) });
  svg("line", { x1: mr.l, x2: W - mr.r, y1: R.Y(0), y2: R.Y(0), class: "zero" }, rroot);
  pts.forEach((q, i) => {
    if (res[i] === null) return;
    const cx = R.X(q.depth_m * sc.f), cy = R.Y(res[i]);
    if (q.excluded) svg("rect", { x: cx - 3.5, y: cy - 3.5, width: 7, height: 7, class: "pt out" }, rroot);
    else svg("circle", { cx, cy, r: 3.5, class: "pt" }, rroot);
  });
}

async function toggleExclude(i) {
  try {
    app.profile = await postJSON("api/exclude", { id: app.current, index: i, reason: $("p-reason").value });
    drawProfileView();
    refreshState();
    refreshRows();
  } catch (e) {
    toast(e.message, true);
  }
}

async function toggleLeaveOut(id) {
  try {
    await postJSON("api/exclude", { id, whole: true, reason: $("p-reason").value });
    await refreshState();
    await refreshRows();
    if (app.tab === "profile") await loadProfile();
    if (app.tab === "arrhenius") await loadArrhenius();
  } catch (e) {
    toast(e.message, true);
  }
}

// ---------- Arrhenius and lots ----------

const PALETTE = ["#2c6e6a", "#b4532a", "#5b4b8a", "#7a8b2e", "#8a3f66", "#3d6fa3"];

function tempLabel(K, unit) {
  const v = unit === "K" ? K : unit === "F" ? K * 9 / 5 - 459.67 : K - 273.15;
  return Math.round(v) + (unit === "K" ? " K" : " °" + unit);
}

// Ticks of a log10 axis over [y0, y1]: decades, with 2 and 5 (or every
// digit) between them when the axis spans few decades.
const SUP = { "-": "⁻", 0: "⁰", 1: "¹", 2: "²", 3: "³", 4: "⁴", 5: "⁵", 6: "⁶", 7: "⁷", 8: "⁸", 9: "⁹" };
const pow10 = (k) => "10" + String(k).split("").map((c) => SUP[c]).join("");
function logTicks(y0, y1) {
  const span = y1 - y0;
  const mants = span > 4 ? [1] : span > 1.2 ? [1, 2, 5] : [1, 2, 3, 4, 5, 6, 7, 8, 9];
  const out = [];
  for (let k = Math.floor(y0); k <= Math.ceil(y1); k++) {
    for (const m of mants) {
      const v = k + Math.log10(m);
      if (v >= y0 && v <= y1) out.push([v, m === 1 ? pow10(k) : m + "×" + pow10(k)]);
    }
  }
  return out;
}

async function loadArrhenius() {
  try {
    app.arr = await api("api/arrhenius");
  } catch (e) {
    $("a-plot").replaceChildren(svg("text", { x: 340, y: 200, "text-anchor": "middle", class: "empty", text: e.message }));
    return;
  }
  drawArrhenius(app.arr);
  fillBackcalc();
}

function drawArrhenius(a) {
  const root = $("a-plot");
  const W = 680, H = 420, m = { l: 70, r: 18, t: 16, b: 44 };
  const all = [...a.points, ...a.left_out];
  if (!all.length) {
    root.replaceChildren(svg("text", { x: W / 2, y: H / 2, "text-anchor": "middle", class: "empty", text: "No Arrhenius points yet: load profiles with a temperature and a time." }));
  } else {
    const invs = all.map((p) => 1e4 / p.temperature_K);
    const lds = all.flatMap((p) => [p.D, p.lo, p.hi]).filter((v) => v !== null && v > 0).map(Math.log10);
    for (const l of a.lines) for (const c of l.curve) { invs.push(1e4 / c.temperature_K); }
    let x0 = Math.min(...invs), x1 = Math.max(...invs);
    const xp = (x1 - x0) * 0.04 || 0.1;
    x0 -= xp; x1 += xp;
    let y0 = Math.min(...lds), y1 = Math.max(...lds);
    const yp = (y1 - y0) * 0.08 || 0.3;
    y0 -= yp; y1 += yp;
    // x ticks at round temperatures, in the chosen unit
    const Tlo = 1e4 / x1, Thi = 1e4 / x0;
    const stepK = [5, 10, 20, 25, 50, 100, 200].find((s) => (Thi - Tlo) / s <= 8) || 500;
    const off = a.temperature_unit === "K" ? 0 : a.temperature_unit === "F" ? 459.67 * 5 / 9 : 273.15;
    const xt = [];
    const scale = a.temperature_unit === "F" ? 5 / 9 : 1;
    for (let t = Math.ceil((Tlo - off) / (stepK * scale)) * stepK * scale; t + off <= Thi; t += stepK * scale) xt.push([1e4 / (t + off), tempLabel(t + off, a.temperature_unit)]);
    const yt = logTicks(y0, y1);
    const { X, Y } = frame(root, W, H, m, [x0, x1], [y0, y1], { xticks: xt, yticks: yt,
      xlabel: "hold temperature (axis linear in 1/T)", ylabel: "D (m²/s), log scale" });
    const color = {};
    a.lines.forEach((l, i) => { color[l.group] = PALETTE[i % PALETTE.length]; });
    const colorOf = (g) => color[g] || "#6d7780";
    for (const l of a.lines) {
      const cx = l.curve.map((c) => 1e4 / c.temperature_K);
      const lg = (v) => v === null ? null : Math.log10(v);
      svg("path", { d: bandOf(cx, l.curve.map((c) => lg(c.lo)), l.curve.map((c) => lg(c.hi)), X, Y), fill: colorOf(l.group), "fill-opacity": 0.14 }, root);
      svg("path", { d: pathOf(cx, l.curve.map((c) => lg(c.D)), X, Y), fill: "none", stroke: colorOf(l.group), "stroke-width": 2 }, root);
    }
    const point = (p, out) => {
      const cx = X(1e4 / p.temperature_K), cy = Y(Math.log10(p.D));
      const g = svg("g", { class: "apoint" + (out ? " excluded" : ""), "data-id": p.id }, root);
      if (p.lo !== null && p.hi !== null && p.lo > 0) svg("line", { x1: cx, x2: cx, y1: Y(Math.log10(p.lo)), y2: Y(Math.log10(p.hi)), class: "errbar" }, g);
      svg("circle", { cx, cy, r: 9, class: "hit" }, g);
      svg("title", { text: `${p.id} (${p.group || "no group"}): ${tempLabel(p.temperature_K, a.temperature_unit)}, D = ${p.D.toPrecision(3)} m²/s` +
        (out ? ` — left out${p.reason ? ": " + p.reason : ""}; click to take it back in` : " — click to leave it out") }, g);
      if (out) svg("rect", { x: cx - 4.5, y: cy - 4.5, width: 9, height: 9, class: "pt out" }, g);
      else svg("circle", { cx, cy, r: 4.5, fill: colorOf(p.group), stroke: "#fff" }, g);
      g.addEventListener("click", () => toggleLeaveOut(p.id));
    };
    for (const p of a.points) point(p, false);
    for (const p of a.left_out) point(p, true);
    // legend
    a.lines.forEach((l, i) => {
      const y = H - m.b - 12 - (a.lines.length - 1 - i) * 17;
      svg("rect", { x: m.l + 10, y: y - 9, width: 12, height: 12, fill: colorOf(l.group) }, root);
      svg("text", { x: m.l + 28, y: y + 1, text: (a.by ? a.by + " " : "") + (l.group || "all profiles") }, root);
    });
  }
  const lines = $("a-lines");
  lines.replaceChildren(el("h2", { text: `Arrhenius lines (${a.method})` }));
  a.lines.forEach((l, i) => {
    const box = el("div", { class: "line" },
      el("strong", { text: (a.by ? a.by + " " : "") + (l.group || "all profiles") }),
      el("div", { text: "D0 = " + l.D0 }), el("div", { text: "Q = " + l.Q }),
      el("div", { class: "stats", text: `${l.n_points} points at ${l.n_temperatures} temperatures; Birge ratio ${l.birge}` }));
    box.style.borderLeftColor = PALETTE[i % PALETTE.length];
    if (l.warnings.length) box.append(el("ul", { class: "warnings" }, ...l.warnings.map((w) => el("li", { text: w }))));
    lines.append(box);
  });
  for (const e of a.line_errors) lines.append(el("p", { class: "error", text: "No line: " + e }));
  const cmp = $("a-cmp");
  cmp.replaceChildren();
  if (a.verdict || a.comparison_error) cmp.append(el("h2", { text: "Lot comparison" }));
  if (a.verdict) {
    cmp.append(el("p", { class: "verdict", text: a.verdict }));
    for (const r of a.ratios) cmp.append(el("p", { text: r }));
    const t = el("table", { class: "params" }, el("tr", {}, el("th", { text: "test" }), el("th", { text: "F" }), el("th", { text: "df" }), el("th", { text: "p" })));
    for (const x of a.tests) t.append(el("tr", {}, ...x.map((c) => el("td", { text: c }))));
    cmp.append(t);
  } else if (a.comparison_error) {
    cmp.append(el("p", { class: "error", text: a.comparison_error }));
  }
  const notes = $("a-notes");
  notes.replaceChildren();
  if (a.notes.length) notes.append(el("h2", { text: "Notes" }), el("ul", { class: "stats" }, ...a.notes.map((n) => el("li", { text: n }))));
}

// ---------- back-calculation ----------

function fillBackcalc() {
  const sel = $("b-id");
  const cur = sel.value;
  const fitted = app.rows.filter((r) => r.status === "fitted" || r.status === "stale");
  const parts = fitted.filter((r) => r.unknown), others = fitted.filter((r) => !r.unknown);
  sel.replaceChildren(...parts.map((r) => el("option", { value: r.id, text: r.id + " (marked unknown)" })),
    ...others.map((r) => el("option", { value: r.id, text: r.id })));
  if (cur) sel.value = cur;
  const gs = $("b-group");
  const gcur = gs.value;
  gs.replaceChildren(el("option", { value: "", text: "the part's own group" }),
    ...(app.arr ? app.arr.lines : []).map((l) => el("option", { value: l.group, text: (app.arr.by || "line") + " " + (l.group || "(all)") })));
  gs.value = gcur;
  const pb = $("b-parts");
  pb.replaceChildren();
  if (app.arr && app.arr.parts.length) {
    for (const p of app.arr.parts) pb.append(el("div", { class: "line" }, el("strong", { text: p.id + (p.lot ? " (lot " + p.lot + ")" : "") }),
      el("div", { text: p.text }), p.warnings.length ? el("ul", { class: "warnings" }, ...p.warnings.map((w) => el("li", { text: w }))) : null));
  } else {
    pb.append(el("p", { class: "hint", text: "No profile is marked unknown (metadata or column \"unknown: temperature\" or \"unknown: time\")." }));
  }
}

async function backcalc() {
  const out = $("b-out");
  out.replaceChildren(el("p", { class: "hint", text: "computing…" }));
  try {
    const r = await postJSON("api/backcalc", { id: $("b-id").value, solve: $("b-solve").value, known: $("b-known").value, group: $("b-group").value });
    out.replaceChildren(...[el("div", { class: "result", id: "b-result", text: `${r.id}: ${r.text}` }),
      el("p", { class: "stats", text: "from the current Arrhenius line" + (r.line ? " of " + r.line : "") }),
      r.warnings.length ? el("ul", { class: "warnings" }, ...r.warnings.map((w) => el("li", { text: w }))) : null,
      el("div", { class: "cautions" }, el("strong", { text: "Cautions" }), el("ol", {}, ...r.cautions.map((c) => el("li", { text: c }))))].filter(Boolean));
  } catch (e) {
    out.replaceChildren(el("p", { class: "error", text: e.message }));
  }
}

// ---------- export ----------

async function exportFolder() {
  const out = $("e-out");
  out.replaceChildren(el("p", { class: "hint", text: "writing the report…" }));
  try {
    const r = await postJSON("api/export", { folder: $("e-folder").value, replace: $("e-replace").checked });
    out.replaceChildren(el("p", { id: "e-done", text: `Written: ${r.folder} (${r.files.length} files). Open ${r.html} in a browser.` }),
      el("ul", { class: "stats" }, ...r.files.map((f) => el("li", { class: "mono", text: f }))));
  } catch (e) {
    out.replaceChildren(el("p", { class: "error", text: e.message }));
  }
}

// ---------- tabs, polling, wiring ----------

function showTab(name) {
  app.tab = name;
  for (const b of document.querySelectorAll(".tabs button")) b.classList.toggle("on", b.dataset.tab === name);
  for (const s of document.querySelectorAll(".tab")) s.classList.toggle("on", s.id === "tab-" + name);
  if (name === "table") { alignHead(); drawRows(true); }
  if (name === "arrhenius") loadArrhenius();
  if (name === "backcalc") { fillBackcalc(); if (!app.arr) loadArrhenius(); }
  if (name === "profile" && !app.current && app.view.length) openProfile(app.view[0].id);
}

async function refreshAll() {
  await refreshRows();
  if (app.tab === "profile") await loadProfile();
  if (app.tab === "arrhenius") await loadArrhenius();
}

async function poll() {
  try {
    const s = await refreshState();
    if (s.running || app.wasRunning) await refreshRows();
    if (app.wasRunning && !s.running) {
      if (app.tab === "profile") await loadProfile();
      if (app.tab === "arrhenius") await loadArrhenius();
    }
    app.wasRunning = s.running;
  } catch (e) {
    $("progress").querySelector(".label").textContent = "server not reachable";
  }
  setTimeout(poll, app.wasRunning ? 600 : 2500);
}

function wire() {
  for (const b of document.querySelectorAll(".tabs button")) b.addEventListener("click", () => showTab(b.dataset.tab));
  const drop = $("drop");
  // Files may be dropped anywhere on the page; the drop zone lights up.
  document.body.addEventListener("dragover", (e) => { e.preventDefault(); drop.classList.add("over"); });
  document.body.addEventListener("dragleave", () => drop.classList.remove("over"));
  document.body.addEventListener("drop", (e) => { e.preventDefault(); drop.classList.remove("over"); upload(e.dataTransfer.files); });
  $("pick").addEventListener("change", (e) => { upload(e.target.files); e.target.value = ""; });
  $("s-apply").addEventListener("click", applySettings);
  $("s-model").addEventListener("change", showNumeric);
  $("s-calfile").addEventListener("change", async (e) => {
    const f = e.target.files[0];
    e.target.value = "";
    if (!f) return;
    try {
      await api("api/calibration?name=" + encodeURIComponent(f.name), { method: "POST", body: f });
      settingsShown = -1;
      await refreshState();
      await refreshAll();
    } catch (err) { toast(err.message, true); }
  });
  $("s-calclear").addEventListener("click", async () => {
    await api("api/calibration", { method: "POST", body: "" });
    settingsShown = -1;
    await refreshState();
    await refreshAll();
  });
  for (const id of ["f-lot", "f-temp", "f-warn", "f-status"]) $(id).addEventListener("change", applyView);
  $("f-text").addEventListener("input", applyView);
  $("scroller").addEventListener("scroll", () => drawRows(false), { passive: true });
  window.addEventListener("resize", () => { alignHead(); drawRows(true); });
  $("p-prev").addEventListener("click", () => step(-1));
  $("p-next").addEventListener("click", () => step(1));
  $("p-leaveout").addEventListener("click", () => app.current && toggleLeaveOut(app.current));
  $("b-go").addEventListener("click", backcalc);
  $("b-solve").addEventListener("change", () => {
    $("b-known").placeholder = $("b-solve").value === "time" ? "hold temperature, e.g. 880 C (default: the file's)" : "hold time, e.g. 6 h (default: the file's)";
  });
  $("e-go").addEventListener("click", exportFolder);
  document.addEventListener("keydown", (e) => {
    if (app.tab !== "profile" || e.target.tagName === "INPUT") return;
    if (e.key === "ArrowLeft") step(-1);
    if (e.key === "ArrowRight") step(1);
  });
}

wire();
buildHead();
refreshState().then(refreshRows).then(poll);
