// gearwork demo page: reads the form, asks POST /v1/shift-plan, draws the answer.
// Plain browser JavaScript, no build step, no outside assets. The demo cars are invented.
"use strict";

(function () {
  const PRESETS = {
    coupe: {
      units: "us",
      rpm: [1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500, 7000],
      torque: [262, 281, 300, 318, 331, 338, 340, 333, 318, 296, 268, 236],
      revLimit: 7000,
      gears: [3.10, 2.05, 1.48, 1.16, 0.94, 0.79],
      axle: 3.55,
      efficiency: 0.87,
      tireSize: "255/40R18",
      tireDiameter: 26.0,
    },
    sedan: {
      units: "metric",
      rpm: [1000, 1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500],
      torque: [180, 205, 228, 246, 258, 265, 268, 266, 258, 244, 224, 198],
      revLimit: 6500,
      gears: [3.58, 2.02, 1.35, 1.02, 0.82, 0.68],
      axle: 3.94,
      efficiency: 0.9,
      tireSize: "215/55R17",
      tireDiameter: 670,
    },
  };
  // one colour per gear, first gear first
  const GEAR_COLOURS = [
    "#1b6ca8", "#c8553d", "#d9a404", "#2a9d8f", "#6a4c93", "#7d8f3a",
    "#e07a5f", "#3d405b", "#4f9d69", "#b5838d", "#0f7b8a", "#8c5e34",
  ];
  const UNIT_TEXT = { "lbf*ft": "lbf·ft", "N*m": "N·m" };
  // diameter slider range by unit system
  const DIAMETER = { us: { min: 20, max: 40, step: 0.1 }, metric: { min: 500, max: 1000, step: 1 } };

  const $ = (id) => document.getElementById(id);
  const els = {
    preset: $("preset"), curve: $("curve"), revLimit: $("rev-limit"), gears: $("gears"),
    axle: $("axle"), axleSlider: $("axle-slider"), efficiency: $("efficiency"),
    tireSize: $("tire-size"), tireDiameter: $("tire-diameter"),
    tireDiameterSlider: $("tire-diameter-slider"), status: $("status"), chart: $("chart"),
    legend: $("legend"), shiftBody: document.querySelector("#shift-table tbody"),
    gearBody: document.querySelector("#gear-table tbody"), warnings: $("warnings"),
    cautions: $("cautions"),
  };
  // request field path prefix -> the input to mark when the service rejects it
  const FIELD_INPUTS = [
    ["engine.curve", "curve"], ["engine.rev_limit_rpm", "revLimit"],
    ["drivetrain.gear_ratios", "gears"], ["drivetrain.final_drive_ratio", "axle"],
    ["drivetrain.efficiency", "efficiency"], ["drivetrain.tire.size", "tireSize"],
    ["drivetrain.tire.diameter", "tireDiameter"], ["drivetrain.tire", "tireSize"],
  ];

  let lastPlan = null;
  let updates = 0;
  let sequence = 0;
  let inFlight = null;
  let timer = 0;

  function units() {
    return document.querySelector('input[name="units"]:checked').value;
  }
  function tireMode() {
    return document.querySelector('input[name="tire-mode"]:checked').value;
  }

  function setUnits(system) {
    document.querySelector(`input[name="units"][value="${system}"]`).checked = true;
    const torque = system === "us" ? "lbf·ft" : "N·m";
    const length = system === "us" ? "in" : "mm";
    document.querySelectorAll('[data-unit="torque"]').forEach((e) => { e.textContent = torque; });
    document.querySelectorAll('[data-unit="length"]').forEach((e) => { e.textContent = length; });
    const d = DIAMETER[system];
    Object.assign(els.tireDiameterSlider, { min: d.min, max: d.max, step: d.step });
    Object.assign(els.tireDiameter, { min: d.min, max: d.max, step: d.step });
  }

  function loadPreset(name) {
    const p = PRESETS[name];
    if (!p) return;
    setUnits(p.units);
    els.curve.value = p.rpm.map((r, i) => `${r}, ${p.torque[i]}`).join("\n");
    els.revLimit.value = p.revLimit;
    els.gears.value = p.gears.map((g) => g.toFixed(2)).join(", ");
    setAxle(p.axle);
    els.efficiency.value = p.efficiency;
    els.tireSize.value = p.tireSize;
    setDiameter(p.tireDiameter);
  }

  function setAxle(value) {
    els.axle.value = Number(value).toFixed(2);
    els.axleSlider.value = value;
  }
  function setDiameter(value) {
    els.tireDiameter.value = value;
    els.tireDiameterSlider.value = value;
  }

  function parseCurve(text) {
    const rpm = [];
    const torque = [];
    const lines = text.split(/\r?\n/);
    for (let i = 0; i < lines.length; i += 1) {
      const line = lines[i].trim();
      if (!line || line.startsWith("#")) continue;
      const parts = line.split(/[\s,;]+/).filter(Boolean);
      const a = Number(parts[0]);
      const b = Number(parts[1]);
      if (parts.length !== 2 || !Number.isFinite(a) || !Number.isFinite(b)) {
        throw new InputError(`Curve line ${i + 1} should be two numbers: rpm, torque.`, "curve");
      }
      rpm.push(a);
      torque.push(b);
    }
    return { rpm, torque };
  }

  function parseNumbers(text) {
    return text.split(/[\s,;]+/).filter(Boolean).map(Number);
  }

  class InputError extends Error {
    constructor(message, input) {
      super(message);
      this.input = input;
    }
  }

  function readNumber(el, name) {
    const value = Number(el.value);
    if (el.value.trim() === "" || !Number.isFinite(value)) {
      throw new InputError(`${name} must be a number.`, Object.keys(els).find((k) => els[k] === el));
    }
    return value;
  }

  function buildRequest() {
    const curve = parseCurve(els.curve.value);
    const gears = parseNumbers(els.gears.value);
    if (gears.length === 0 || gears.some((g) => !Number.isFinite(g))) {
      throw new InputError("Gear ratios must be numbers, first gear first.", "gears");
    }
    const tire = tireMode() === "size"
      ? { size: els.tireSize.value.trim() }
      : { diameter: readNumber(els.tireDiameter, "Tire diameter") };
    const request = {
      units: units(),
      reference: "demo page",
      engine: { curve: { rpm: curve.rpm, torque: curve.torque } },
      drivetrain: {
        gear_ratios: gears,
        final_drive_ratio: readNumber(els.axle, "Axle ratio"),
        efficiency: readNumber(els.efficiency, "Efficiency"),
        tire,
      },
    };
    if (els.revLimit.value.trim() !== "") {
      request.engine.rev_limit_rpm = readNumber(els.revLimit, "Rev limit");
    }
    return request;
  }

  function clearMarks() {
    Object.values(els).forEach((e) => e && e.classList && e.classList.remove("invalid"));
  }

  function showStatus(text, isError) {
    els.status.textContent = text;
    els.status.classList.toggle("error", Boolean(isError));
  }

  function markInput(key) {
    const el = els[key];
    if (el) el.classList.add("invalid");
  }

  function schedule() {
    clearTimeout(timer);
    timer = setTimeout(update, 120);
  }

  async function update() {
    clearMarks();
    let request;
    try {
      request = buildRequest();
    } catch (err) {
      if (err instanceof InputError) {
        markInput(err.input);
        finish("error", err.message);
        return;
      }
      throw err;
    }
    if (inFlight) inFlight.abort();
    const controller = new AbortController();
    inFlight = controller;
    const mine = ++sequence;
    document.body.dataset.state = "busy";
    showStatus("Calculating…", false);
    let response;
    let body;
    try {
      response = await fetch("/v1/shift-plan", {
        method: "POST",
        headers: { "Content-Type": "application/json", Accept: "application/json" },
        body: JSON.stringify(request),
        signal: controller.signal,
      });
      body = await response.json();
    } catch (err) {
      if (err.name === "AbortError") return;
      if (mine === sequence) finish("error", "The service could not be reached; try again.");
      return;
    }
    if (mine !== sequence) return;
    inFlight = null;
    if (!response.ok) {
      const field = body && body.field ? String(body.field) : "";
      const hit = FIELD_INPUTS.find(([prefix]) => field.startsWith(prefix));
      if (hit) markInput(hit[1]);
      const retry = response.headers.get("Retry-After");
      const extra = retry ? ` Retry in ${retry} s.` : "";
      finish("error", `${(body && body.detail) || "The request was refused."}${extra}`);
      return;
    }
    lastPlan = body;
    render(body);
    const top = body.gears[body.gears.length - 1];
    finish("ready", `${body.gears.length} gears, ${body.shifts.length} shifts. In top gear the ` +
      `rev limit comes at ${fmt(top.max_speed, 1)} ${body.units.speed} (drag not counted).`);
  }

  function finish(state, message) {
    updates += 1;
    document.body.dataset.state = state;
    document.body.dataset.updates = String(updates);
    showStatus(message, state === "error");
  }

  function fmt(x, digits) {
    return Number(x).toLocaleString("en-US", {
      minimumFractionDigits: digits, maximumFractionDigits: digits,
    });
  }

  function unitText(u) {
    return UNIT_TEXT[u] || u;
  }

  function cell(row, text, cls) {
    const td = document.createElement("td");
    if (cls) {
      const span = document.createElement("span");
      span.className = cls;
      span.textContent = text;
      td.appendChild(span);
    } else {
      td.textContent = text;
    }
    row.appendChild(td);
  }

  function render(plan) {
    const u = plan.units;
    els.shiftBody.replaceChildren();
    plan.shifts.forEach((s) => {
      const tr = document.createElement("tr");
      cell(tr, `${s.from_gear} → ${s.to_gear}`);
      cell(tr, fmt(s.shift_rpm, 0));
      cell(tr, `${fmt(s.shift_speed, 1)} ${u.speed}`);
      cell(tr, fmt(s.rpm_after, 0));
      cell(tr, fmt(s.rpm_drop, 0));
      const why = { crossover: "next gear pulls harder", rev_limit: "rev limit",
        drag_limit: "gear stops gaining" }[s.reason] || s.reason;
      cell(tr, why, `reason ${s.reason}`);
      tr.dataset.shiftRpm = String(s.shift_rpm);
      tr.dataset.shiftSpeed = String(s.shift_speed);
      els.shiftBody.appendChild(tr);
    });
    els.gearBody.replaceChildren();
    plan.gears.forEach((g) => {
      const tr = document.createElement("tr");
      cell(tr, String(g.gear));
      cell(tr, fmt(g.ratio, 2));
      cell(tr, fmt(g.overall_ratio, 2));
      cell(tr, `${fmt(g.max_speed, 1)} ${u.speed}`);
      cell(tr, `${fmt(Math.max(...g.table.tractive_force), 0)} ${unitText(u.force)}`);
      els.gearBody.appendChild(tr);
    });
    els.warnings.replaceChildren();
    const notes = plan.warnings.length ? plan.warnings.map((w) => w.message) : [null];
    notes.forEach((text) => {
      const li = document.createElement("li");
      if (text === null) { li.className = "none"; li.textContent = "None."; } else { li.textContent = text; }
      els.warnings.appendChild(li);
    });
    els.cautions.replaceChildren();
    plan.cautions.forEach((text) => {
      const li = document.createElement("li");
      li.textContent = text;
      els.cautions.appendChild(li);
    });
    els.legend.replaceChildren();
    plan.gears.forEach((g, i) => {
      const li = document.createElement("li");
      const sw = document.createElement("span");
      sw.className = "swatch";
      sw.style.background = GEAR_COLOURS[i % GEAR_COLOURS.length];
      li.append(sw, `gear ${g.gear}`);
      els.legend.appendChild(li);
    });
    drawChart(plan);
  }

  // axis ticks at 1, 2 or 5 times a power of ten
  function ticks(max, count) {
    const raw = max / count;
    const power = 10 ** Math.floor(Math.log10(raw));
    const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw);
    const out = [];
    for (let v = 0; v <= max + 1e-9; v += step) out.push(v);
    return out;
  }

  function drawChart(plan) {
    const canvas = els.chart;
    const ratio = window.devicePixelRatio || 1;
    const width = canvas.clientWidth;
    const height = canvas.clientHeight;
    canvas.width = Math.round(width * ratio);
    canvas.height = Math.round(height * ratio);
    const ctx = canvas.getContext("2d");
    ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
    ctx.clearRect(0, 0, width, height);
    const pad = { left: 64, right: 16, top: 14, bottom: 44 };
    const plotW = width - pad.left - pad.right;
    const plotH = height - pad.top - pad.bottom;
    const maxSpeed = Math.max(...plan.gears.map((g) => g.max_speed)) * 1.03;
    const maxForce = Math.max(...plan.gears.map((g) => Math.max(...g.table.tractive_force))) * 1.08;
    const x = (v) => pad.left + (v / maxSpeed) * plotW;
    const y = (f) => pad.top + plotH - (f / maxForce) * plotH;
    const u = plan.units;

    ctx.font = "12px system-ui, sans-serif";
    ctx.lineWidth = 1;
    ctx.strokeStyle = "#e6e1d6";
    ctx.fillStyle = "#5d6670";
    ctx.textAlign = "center";
    ctx.textBaseline = "top";
    ticks(maxSpeed, 8).forEach((v) => {
      ctx.beginPath(); ctx.moveTo(x(v), pad.top); ctx.lineTo(x(v), pad.top + plotH); ctx.stroke();
      ctx.fillText(fmt(v, 0), x(v), pad.top + plotH + 6);
    });
    ctx.textAlign = "right";
    ctx.textBaseline = "middle";
    ticks(maxForce, 6).forEach((f) => {
      ctx.beginPath(); ctx.moveTo(pad.left, y(f)); ctx.lineTo(pad.left + plotW, y(f)); ctx.stroke();
      ctx.fillText(fmt(f, 0), pad.left - 6, y(f));
    });
    ctx.strokeStyle = "#8a8378";
    ctx.strokeRect(pad.left, pad.top, plotW, plotH);
    ctx.textAlign = "center";
    ctx.textBaseline = "alphabetic";
    ctx.fillText(`road speed (${u.speed})`, pad.left + plotW / 2, height - 6);
    ctx.save();
    ctx.translate(14, pad.top + plotH / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.fillText(`tractive force (${unitText(u.force)})`, 0, 0);
    ctx.restore();

    ctx.lineWidth = 2.4;
    ctx.lineJoin = "round";
    plan.gears.forEach((g, i) => {
      const t = g.table;
      ctx.strokeStyle = GEAR_COLOURS[i % GEAR_COLOURS.length];
      ctx.beginPath();
      t.speed.forEach((v, k) => {
        if (k === 0) ctx.moveTo(x(v), y(t.tractive_force[k]));
        else ctx.lineTo(x(v), y(t.tractive_force[k]));
      });
      ctx.stroke();
    });

    // each shift: a filled dot on this gear, a dashed drop, a ring where the next takes over
    plan.shifts.forEach((s) => {
      const sx = x(s.shift_speed);
      const top = y(s.force_before);
      const bottom = y(s.force_after);
      ctx.strokeStyle = "#22272e";
      ctx.lineWidth = 1.6;
      ctx.setLineDash([4, 3]);
      ctx.beginPath(); ctx.moveTo(sx, top); ctx.lineTo(sx, bottom); ctx.stroke();
      ctx.setLineDash([]);
      ctx.fillStyle = "#22272e";
      ctx.beginPath(); ctx.arc(sx, top, 4, 0, 2 * Math.PI); ctx.fill();
      ctx.fillStyle = "#ffffff";
      ctx.beginPath(); ctx.arc(sx, bottom, 3.5, 0, 2 * Math.PI); ctx.fill(); ctx.stroke();
    });
    canvas.dataset.series = String(plan.gears.length);
    canvas.dataset.shifts = String(plan.shifts.length);
  }

  function wire() {
    els.preset.addEventListener("change", () => {
      if (els.preset.value !== "own") loadPreset(els.preset.value);
      schedule();
    });
    document.querySelectorAll('input[name="units"]').forEach((r) => r.addEventListener("change", () => {
      setUnits(units());
      els.preset.value = "own";
      schedule();
    }));
    document.querySelectorAll('input[name="tire-mode"]').forEach((r) => r.addEventListener("change", () => {
      const bySize = tireMode() === "size";
      $("tire-size-row").hidden = !bySize;
      $("tire-diameter-row").hidden = bySize;
      schedule();
    }));
    els.axleSlider.addEventListener("input", () => { els.axle.value = Number(els.axleSlider.value).toFixed(2); schedule(); });
    els.axle.addEventListener("input", () => { els.axleSlider.value = els.axle.value; schedule(); });
    els.tireDiameterSlider.addEventListener("input", () => { els.tireDiameter.value = els.tireDiameterSlider.value; schedule(); });
    els.tireDiameter.addEventListener("input", () => { els.tireDiameterSlider.value = els.tireDiameter.value; schedule(); });
    [els.curve, els.revLimit, els.gears, els.efficiency, els.tireSize].forEach((el) => {
      el.addEventListener("input", () => {
        if (el === els.curve) els.preset.value = "own";
        schedule();
      });
    });
    window.addEventListener("resize", () => { if (lastPlan) drawChart(lastPlan); });
  }

  loadPreset("coupe");
  wire();
  update();
})();
