// gearwork demo page: reads the form, asks the service (shift plan, acceleration run,
// speedometer correction) and draws the answers. Plain browser JavaScript, no build step,
// no outside assets, no inline handlers. The demo cars are invented.
"use strict";

(function () {
  const F = window.GearworkForm;
  // each preset in its own units; loading one into the other system converts its figures
  const PRESETS = {
    coupe: {
      units: "us",
      rpm: [1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500, 7000],
      torque: [262, 281, 300, 318, 331, 338, 340, 333, 318, 296, 268, 236],
      values: {
        "rev-limit": 7000, gears: "3.10, 2.05, 1.48, 1.16, 0.94, 0.79", axle: 3.55,
        efficiency: 0.87, "tire-size": "255/40R18", "tire-diameter": 26.03, mass: 3550,
        drive: "rear", "front-share": 53, grip: 1.0, wheelbase: 107, "cg-height": 19,
        cd: 0.34, "frontal-area": 23.5, "launch-rpm": 3500, "shift-time": 0.25,
        cruise: "55, 65, 75", "stock-tire": "245/40R18", "stock-axle": 3.55,
        "speedo-drive": "transmission_output", "shift-rule": "net_acceleration",
      },
      cruise: { us: "55, 65, 75", metric: "90, 110, 130" },
    },
    sedan: {
      units: "metric",
      rpm: [1000, 1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500],
      torque: [180, 205, 228, 246, 258, 265, 268, 266, 258, 244, 224, 198],
      values: {
        "rev-limit": 6500, gears: "3.58, 2.02, 1.35, 1.02, 0.82, 0.68", axle: 3.94,
        efficiency: 0.9, "tire-size": "215/55R17", "tire-diameter": 668.3, mass: 1520,
        drive: "front", "front-share": 60, grip: 0.95, wheelbase: 2720, "cg-height": 540,
        cd: 0.3, "frontal-area": 2.25, "launch-rpm": 2800, "shift-time": 0.3,
        cruise: "90, 110, 130", "stock-tire": "205/60R16", "stock-axle": 3.94,
        "speedo-drive": "wheel", "shift-rule": "net_acceleration",
      },
      cruise: { us: "55, 65, 75", metric: "90, 110, 130" },
    },
  };
  // one colour per gear, first gear first
  const GEAR_COLOURS = [
    "#2f5d8a", "#d1603d", "#3f8f6b", "#b8860b", "#7a4f9a", "#c2477a",
    "#4a90a4", "#8a6d3b", "#5b7a2e", "#a33f3f", "#3d5a80", "#996515",
  ];
  const UNIT_TEXT = { "lbf*ft": "lbf·ft", "N*m": "N·m", "ft^2": "ft²", "m^2": "m²" };
  const DIAMETER = { us: { min: 20, max: 40, step: 0.01 }, metric: { min: 500, max: 1000, step: 0.1 } };
  // form inputs carrying a quantity with a unit, converted when the units change
  const CONVERTED = [
    ["tire-diameter", "length"], ["mass", "mass"], ["wheelbase", "length"],
    ["cg-height", "length"], ["frontal-area", "area"],
  ];
  // every field kept in the shared link, by element id
  const STATE_FIELDS = [
    "curve", "rev-limit", "gears", "axle", "efficiency", "tire-size", "tire-diameter", "mass",
    "drive", "front-share", "grip", "wheelbase", "cg-height", "cd", "frontal-area",
    "launch-rpm", "shift-time", "cruise", "stock-tire", "stock-axle", "speedo-drive",
    "shift-rule",
  ];
  const NAMES = {
    "rev-limit": "Rev limit", axle: "Axle ratio", efficiency: "Driveline efficiency",
    "tire-diameter": "Tire diameter", mass: "Mass", "front-share": "Weight on front axle",
    grip: "Tire grip", wheelbase: "Wheelbase", "cg-height": "Centre of mass height",
    cd: "Drag coefficient", "frontal-area": "Frontal area", "launch-rpm": "Launch rpm",
    "shift-time": "Time per shift", "stock-axle": "Calibrated axle ratio",
  };

  const $ = (id) => document.getElementById(id);
  const input = (id) => $(id);
  const els = {
    preset: $("preset"), curve: $("curve"), axle: $("axle"), axleSlider: $("axle-slider"),
    tireSize: $("tire-size"), tireDiameter: $("tire-diameter"),
    tireDiameterSlider: $("tire-diameter-slider"), tireNote: $("tire-note"),
    status: $("status"), chart: $("chart"), legend: $("legend"),
    shiftBody: document.querySelector("#shift-table tbody"),
    gearBody: document.querySelector("#gear-table tbody"),
    cruiseHead: document.querySelector("#cruise-table thead tr"),
    cruiseBody: document.querySelector("#cruise-table tbody"),
    runBody: document.querySelector("#run-table tbody"), runNote: $("run-note"),
    speedoBody: document.querySelector("#speedo-table tbody"), speedoHead: $("speedo-headline"),
    warnings: $("warnings"), cautions: $("cautions"), shareRow: $("share-row"),
    shareLink: $("share-link"), permalink: $("permalink"),
  };
  // the form keys used in error mapping -> element ids
  const INPUT_IDS = {
    curve: "curve", revLimit: "rev-limit", gears: "gears", axle: "axle",
    efficiency: "efficiency", tireSize: "tire-size", tireDiameter: "tire-diameter",
    stockTire: "stock-tire", stockAxle: "stock-axle", mass: "mass", frontShare: "front-share",
    wheelbase: "wheelbase", cgHeight: "cg-height", grip: "grip", drive: "drive", cd: "cd",
    frontalArea: "frontal-area", launchRpm: "launch-rpm", shiftTime: "shift-time",
    cruise: "cruise", speedoDrive: "speedo-drive", shiftRule: "shift-rule",
  };

  let lastPlan = null;
  let updates = 0;
  let sequence = 0;
  let inFlight = null;
  let timer = 0;
  let retries = 0;
  const MAX_RETRIES = 3;
  const MAX_RETRY_S = 10;

  const units = () => document.querySelector('input[name="units"]:checked').value;
  const tireMode = () => document.querySelector('input[name="tire-mode"]:checked').value;

  function unitText(u) {
    return UNIT_TEXT[u] || u;
  }
  function fmt(x, digits) {
    return Number(x).toLocaleString("en-US", {
      minimumFractionDigits: digits, maximumFractionDigits: digits,
    });
  }

  // ---- the form ---------------------------------------------------------------------------
  function showUnits(system) {
    document.querySelector(`input[name="units"][value="${system}"]`).checked = true;
    document.querySelectorAll("[data-unit]").forEach((e) => {
      e.textContent = F.UNIT_TEXT[system][e.dataset.unit];
    });
    const d = DIAMETER[system];
    Object.assign(els.tireDiameterSlider, { min: d.min, max: d.max, step: d.step });
    Object.assign(els.tireDiameter, { min: d.min, max: d.max, step: "any" });
  }

  function setTireMode(mode) {
    document.querySelector(`input[name="tire-mode"][value="${mode}"]`).checked = true;
    els.tireNote.textContent = mode === "size"
      ? "The diameter follows the size code."
      : "The diameter is used; the size code is set aside.";
    els.tireSize.classList.toggle("set-aside", mode !== "size");
    els.tireDiameter.classList.toggle("set-aside", mode === "size");
  }

  function setAxle(value) {
    els.axle.value = String(value);
    els.axleSlider.value = String(value);
  }
  function setDiameter(value) {
    els.tireDiameter.value = String(value);
    els.tireDiameterSlider.value = String(value);
    delete els.tireDiameter.dataset.shown;
  }

  // a figure's value in metric: exact when the field still shows what a conversion put there
  function metricOf(el) {
    if (el.dataset.shown === el.value && el.dataset.metric) return JSON.parse(el.dataset.metric);
    return null;
  }

  function convertNumber(el, kind, from, to) {
    const kept = metricOf(el);
    const value = Number(el.value);
    if (kept === null && (el.value.trim() === "" || !Number.isFinite(value))) return;
    const metric = kept === null ? F.toMetric(kind, value, from) : kept;
    el.value = F.shown(kind, metric, to);
    el.dataset.metric = JSON.stringify(metric);
    el.dataset.shown = el.value;
  }

  function convertCurve(from, to) {
    const el = els.curve;
    let curve;
    try {
      curve = F.parseCurve(el.value, from);
    } catch (err) {
      return err;
    }
    const kept = metricOf(el);
    const metric = kept === null ? curve.torque.map((t) => F.toMetric("torque", t, from)) : kept;
    el.value = F.curveText(curve.rpm, metric.map((t) => F.shown("torque", t, to)));
    el.dataset.metric = JSON.stringify(metric);
    el.dataset.shown = el.value;
    return null;
  }

  function convertList(el, from, to) {
    const values = F.parseList(el.value);
    if (values.length === 0 || values.some((v) => !Number.isFinite(v))) return;
    const kept = metricOf(el);
    const metric = kept === null ? values.map((v) => F.toMetric("speed", v, from)) : kept;
    el.value = metric.map((v) => F.shown("speed", v, to)).join(", ");
    el.dataset.metric = JSON.stringify(metric);
    el.dataset.shown = el.value;
  }

  /** Convert every figure in the form from one unit system to the other. */
  function convertForm(from, to) {
    if (from === to) return null;
    const problem = convertCurve(from, to);
    CONVERTED.forEach(([id, kind]) => convertNumber(input(id), kind, from, to));
    convertList(input("cruise"), from, to);
    els.tireDiameterSlider.value = els.tireDiameter.value;
    showUnits(to);
    return problem;
  }

  function loadPreset(name, system) {
    const p = PRESETS[name];
    if (!p) return;
    els.preset.value = name;
    showUnits(p.units);
    els.curve.value = F.curveText(p.rpm, p.torque);
    Object.entries(p.values).forEach(([id, v]) => { input(id).value = String(v); });
    STATE_FIELDS.forEach((id) => { delete input(id).dataset.shown; });
    setAxle(p.values.axle);
    setDiameter(p.values["tire-diameter"]);
    setTireMode("size");
    convertForm(p.units, system);
    // highway speeds are a choice, not a measurement: round figures in either system
    input("cruise").value = p.cruise[system];
    delete input("cruise").dataset.shown;
  }

  function readState() {
    const state = { u: units(), p: els.preset.value, tm: tireMode() };
    STATE_FIELDS.forEach((id) => { state[id] = input(id).value; });
    return state;
  }

  function applyState(state) {
    const system = state.u === "metric" ? "metric" : "us";
    // a demo car first, so a link from an older page missing a field still gives a full form
    loadPreset(PRESETS[state.p] ? state.p : "coupe", system);
    showUnits(system);
    els.preset.value = PRESETS[state.p] || state.p === "own" ? state.p : "own";
    STATE_FIELDS.forEach((id) => {
      if (typeof state[id] === "string") {
        input(id).value = state[id];
        delete input(id).dataset.shown;
      }
    });
    setAxle(input("axle").value);
    els.tireDiameterSlider.value = els.tireDiameter.value;
    setTireMode(state.tm === "diameter" ? "diameter" : "size");
  }

  function shareUrl() {
    return `${window.location.origin}${window.location.pathname}#${F.encodeState(readState())}`;
  }
  function keepUrl() {
    const url = shareUrl();
    window.history.replaceState(null, "", url);
    els.permalink.href = url;
    els.shareLink.value = url;
  }

  // ---- requests ---------------------------------------------------------------------------
  function readNumber(id) {
    const el = input(id);
    const value = Number(el.value);
    if (el.value.trim() === "" || !Number.isFinite(value)) {
      throw new F.InputError(`${NAMES[id]} must be a number.`, id);
    }
    return value;
  }

  function readTire() {
    if (tireMode() === "size") {
      const size = els.tireSize.value.trim();
      if (!size) throw new F.InputError("Tire size is empty: type a size code such as 245/40R18.", "tire-size");
      return { size };
    }
    return { diameter: readNumber("tire-diameter") };
  }

  function readList(id, name) {
    const values = F.parseList(input(id).value);
    if (values.some((v) => !Number.isFinite(v))) {
      throw new F.InputError(`${name} must be numbers separated by commas.`, id);
    }
    return values;
  }

  function buildRequests() {
    const curve = F.parseCurve(els.curve.value, units());
    $("curve-note").textContent = curve.note;
    const gears = readList("gears", "Gear ratios");
    if (gears.length === 0) throw new F.InputError("Gear ratios are empty: give first gear first.", "gears");
    const share = readNumber("front-share");
    if (share < 5 || share > 95) {
      throw new F.InputError("Weight on front axle must lie between 5 and 95 %.", "front-share");
    }
    const cruise = readList("cruise", "Highway speeds");
    const base = {
      units: units(),
      reference: "demo page",
      engine: {
        curve: { rpm: curve.rpm, torque: curve.torque },
      },
      drivetrain: {
        gear_ratios: gears,
        final_drive_ratio: readNumber("axle"),
        efficiency: readNumber("efficiency"),
        tire: readTire(),
      },
    };
    if (input("rev-limit").value.trim() !== "") base.engine.rev_limit_rpm = readNumber("rev-limit");
    const vehicle = {
      mass: readNumber("mass"),
      front_weight_share: share / 100,
      wheelbase: readNumber("wheelbase"),
      cg_height: readNumber("cg-height"),
      drive: input("drive").value,
      friction_coefficient: readNumber("grip"),
      road_load: { drag_coefficient: readNumber("cd"), frontal_area: readNumber("frontal-area") },
    };
    const rule = input("shift-rule").value;
    const stockTire = input("stock-tire").value.trim();
    if (!stockTire) throw new F.InputError("Calibrated tire size is empty.", "stock-tire");
    return {
      plan: { ...base, vehicle, cruise_speeds: cruise, shift_criterion: rule },
      run: {
        ...base,
        vehicle,
        shifts: { criterion: rule },
        launch: {
          coupling: "clutch", launch_rpm: readNumber("launch-rpm"),
          shift_time: readNumber("shift-time"),
        },
      },
      speedo: {
        units: base.units,
        reference: "demo page",
        drive: input("speedo-drive").value,
        original: { tire: { size: stockTire }, final_drive_ratio: readNumber("stock-axle") },
        new: { tire: base.drivetrain.tire, final_drive_ratio: base.drivetrain.final_drive_ratio },
        indicated_speeds: cruise.length ? cruise : undefined,
      },
    };
  }

  async function ask(path, body, signal) {
    const response = await fetch(path, {
      method: "POST",
      headers: { "Content-Type": "application/json", Accept: "application/json" },
      body: JSON.stringify(body),
      signal,
    });
    let answer = null;
    try {
      answer = await response.json();
    } catch (err) {
      answer = null;
    }
    if (response.ok) return { ok: true, body: answer, retry: 0 };
    const retry = Number(response.headers.get("Retry-After")) || 0;
    if (response.status >= 500 || response.status === 429 || !answer) {
      const text = retry
        ? `The service is busy; the page asks again in ${Math.min(retry, MAX_RETRY_S)} s.`
        : `The service could not answer (status ${response.status}); try again.`;
      return { ok: false, problems: [{ text, input: null }], retry };
    }
    const items = Array.isArray(answer.errors) && answer.errors.length
      ? answer.errors : [{ field: answer.field, message: answer.detail }];
    return { ok: false, problems: items.map(F.sentence), retry: 0 };
  }

  function clearMarks() {
    document.querySelectorAll(".invalid").forEach((e) => {
      e.classList.remove("invalid");
      e.removeAttribute("aria-invalid");
      e.removeAttribute("aria-describedby");
    });
    document.querySelectorAll(".field-error").forEach((e) => e.remove());
  }
  // mark the input and say what is wrong right under it (the status says it too)
  function markInput(key, text) {
    const el = input(INPUT_IDS[key] || key);
    if (!el) return;
    el.classList.add("invalid");
    el.setAttribute("aria-invalid", "true");
    if (!text || document.getElementById(`${el.id}-error`)) return;
    const note = document.createElement("p");
    note.className = "field-error";
    note.id = `${el.id}-error`;
    note.textContent = text;
    el.setAttribute("aria-describedby", note.id);
    (el.closest(".slider-row") || el).after(note);
  }

  function schedule() {
    retries = 0;
    clearTimeout(timer);
    timer = setTimeout(update, 120);
  }

  async function update() {
    clearMarks();
    keepUrl();
    $("curve-print").textContent = els.curve.value;
    let requests;
    try {
      requests = buildRequests();
    } catch (err) {
      if (!(err instanceof F.InputError)) throw err;
      if (inFlight) inFlight.abort();
      sequence += 1;
      markInput(err.input, err.message);
      finish("error", [{ text: err.message, field: err.input }]);
      return;
    }
    if (inFlight) inFlight.abort();
    const controller = new AbortController();
    inFlight = controller;
    const mine = ++sequence;
    document.body.dataset.state = "busy";
    // each answer is drawn as it arrives (the plan is quickest), the status when all are in
    const shown = (request, draw, cards) => request.then((a) => {
      if (mine !== sequence) return a;
      cards.forEach((sel) => document.querySelector(sel).closest(".card").classList.toggle("stale", !a.ok));
      if (a.ok) draw(a.body);
      return a;
    });
    let answers;
    try {
      answers = await Promise.all([
        shown(ask("/v1/shift-plan", requests.plan, controller.signal), renderPlan,
          ["#shift-table", "#gear-table", "#cruise-table", "#chart"]),
        shown(ask("/v1/acceleration-run", requests.run, controller.signal), renderRun,
          ["#run-table"]),
        shown(ask("/v1/speedometer-correction", requests.speedo, controller.signal), renderSpeedo,
          ["#speedo-table"]),
      ]);
    } catch (err) {
      if (err.name === "AbortError") return;
      if (mine === sequence) finish("error", [{ text: "The service could not be reached; try again." }]);
      return;
    }
    if (mine !== sequence) return;
    inFlight = null;
    const [plan, run, speedo] = answers;
    const problems = [];
    const seen = new Set();
    answers.forEach((a) => {
      if (a.ok) return;
      a.problems.forEach((p) => {
        // one sentence per field: a second about the same input only repeats the first
        const key = p.input || p.text;
        if (seen.has(key)) return;
        seen.add(key);
        problems.push(p);
        if (p.input) markInput(p.input, p.text);
      });
    });
    renderNotes([plan, run, speedo].filter((a) => a.ok).map((a) => a.body));
    if (problems.length) {
      finish("error", problems);
      // a busy service names its wait (Retry-After): ask again by itself, a few times
      const retry = Math.max(...answers.map((a) => a.retry));
      if (retry > 0 && retries < MAX_RETRIES) {
        retries += 1;
        clearTimeout(timer);
        timer = setTimeout(update, Math.min(retry, MAX_RETRY_S) * 1000);
      }
      return;
    }
    const top = plan.body.gears[plan.body.gears.length - 1];
    finish("ready", [{
      text: `${plan.body.gears.length} gears, ${plan.body.shifts.length} shifts; in top gear ` +
        `the rev limit comes at ${fmt(top.max_speed, 1)} ${plan.body.units.speed}.`,
    }]);
  }

  function finish(state, messages) {
    updates += 1;
    els.status.replaceChildren(...messages.map((m) => {
      const p = document.createElement("p");
      p.textContent = m.text;
      if (m.field) p.dataset.field = m.field;
      return p;
    }));
    els.status.classList.toggle("error", state === "error");
    document.body.dataset.state = state;
    document.body.dataset.updates = String(updates);
  }

  // ---- rendering --------------------------------------------------------------------------
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
    return td;
  }
  function headCell(row, text) {
    const th = document.createElement("th");
    th.scope = "col";
    th.textContent = text;
    row.appendChild(th);
  }
  function setKpi(id, text) {
    $(id).textContent = text;
  }

  function renderPlan(plan) {
    lastPlan = plan;
    const u = plan.units;
    if (tireMode() === "size" && plan.tire.diameter !== null) {
      const digits = units() === "us" ? 2 : 1;
      setDiameter(F.trimmed(plan.tire.diameter, digits));
    }
    els.shiftBody.replaceChildren();
    plan.shifts.forEach((s) => {
      const tr = document.createElement("tr");
      cell(tr, `${s.from_gear} → ${s.to_gear}`);
      cell(tr, fmt(s.shift_rpm, 0));
      cell(tr, `${fmt(s.shift_speed, 1)} ${u.speed}`);
      cell(tr, fmt(s.rpm_after, 0));
      cell(tr, fmt(s.rpm_drop, 0));
      const why = {
        crossover: plan.shift_criterion === "net_acceleration"
          ? "next gear accelerates harder" : "next gear pulls harder",
        rev_limit: "rev limit",
        drag_limit: "gear stops gaining",
        traction_limit: "tires at their grip",
      }[s.reason] || s.reason.replace(/_/g, " ");
      cell(tr, why, `reason ${s.reason}`);
      tr.dataset.shiftRpm = String(s.shift_rpm);
      tr.dataset.shiftSpeed = String(s.shift_speed);
      els.shiftBody.appendChild(tr);
    });
    els.gearBody.replaceChildren();
    plan.gears.forEach((g) => {
      const tr = document.createElement("tr");
      const most = Math.max(...g.table.tractive_force);
      cell(tr, String(g.gear));
      cell(tr, fmt(g.ratio, 2));
      cell(tr, fmt(g.overall_ratio, 2));
      cell(tr, `${fmt(g.max_speed, 1)} ${u.speed}`);
      cell(tr, `${fmt(most, 0)} ${unitText(u.force)}`);
      tr.dataset.maxForce = String(most);
      els.gearBody.appendChild(tr);
    });
    renderCruise(plan);
    const top = plan.gears[plan.gears.length - 1];
    setKpi("kpi-limit", `${fmt(top.max_speed, 1)} ${u.speed}`);
    const perf = plan.performance;
    setKpi("kpi-top", perf ? `${fmt(perf.top_speed.speed, 1)} ${u.speed}` : "–");
    renderLegend(plan);
    drawChart(plan);
    $("chart-hint").textContent = "One line per gear, from the curve's first rpm to the rev " +
      "limit. A filled dot marks a shift and the dashed drop ends where the next gear takes " +
      (plan.shift_criterion === "net_acceleration"
        ? "over: where the next gear accelerates the car harder once drag, rolling resistance, " +
          "the rotating parts and the tires' grip (dashed rule) are counted, so often before " +
          "the lines cross; or the rev limit."
        : "over: where the next gear pulls harder at the tires, or the rev limit if it never " +
          "does.");
  }

  // one row per gear, one column per highway speed; above the rev limit is marked
  function renderCruise(plan) {
    els.cruiseHead.replaceChildren();
    els.cruiseBody.replaceChildren();
    const cruise = plan.performance ? plan.performance.cruise : [];
    if (cruise.length === 0) {
      $("cruise-note").textContent = "Give one or more highway speeds.";
      return;
    }
    const u = plan.units.speed;
    headCell(els.cruiseHead, "Gear");
    cruise.forEach((c) => headCell(els.cruiseHead, `${fmt(c.speed, Number.isInteger(c.speed) ? 0 : 1)} ${u}`));
    const limit = plan.engine.rev_limit_rpm;
    plan.gears.forEach((g, i) => {
      const tr = document.createElement("tr");
      cell(tr, String(g.gear));
      cruise.forEach((c) => {
        const rpm = c.rpm[i];
        const over = rpm > limit;
        const td = cell(tr, over ? "over the limit" : `${fmt(rpm, 0)} rpm`, over ? "over-limit" : "");
        td.dataset.rpm = String(rpm);
      });
      els.cruiseBody.appendChild(tr);
    });
    $("cruise-note").textContent = `Engine speed at a steady road speed, no slip; ` +
      `"over the limit" is above the rev limit (${fmt(limit, 0)} rpm).`;
  }

  const RUN_MARKS = {
    us: ["60 ft", "330 ft", "1/8 mile", "1000 ft", "1/4 mile"],
    metric: ["60 ft", "1/8 mile", "1/4 mile", "400 m", "1000 m"],
  };
  const SPRINT = { us: "0-60 mph", metric: "0-100 km/h" };

  function renderRun(run) {
    const system = units();
    const u = run.units;
    els.runBody.replaceChildren();
    run.distances.filter((d) => RUN_MARKS[system].includes(d.name)).forEach((d) => {
      const tr = document.createElement("tr");
      cell(tr, d.name);
      cell(tr, d.elapsed === null ? "not reached" : `${fmt(d.elapsed, 2)} s`);
      cell(tr, d.speed === null ? "" : `${fmt(d.speed, 1)} ${u.speed}`);
      cell(tr, d.trap_speed === null ? "" : `${fmt(d.trap_speed, 1)} ${u.speed}`);
      tr.dataset.mark = d.name;
      tr.dataset.elapsed = String(d.elapsed);
      els.runBody.appendChild(tr);
    });
    run.speeds.forEach((s) => {
      const tr = document.createElement("tr");
      tr.className = "speed-row";
      cell(tr, s.name);
      cell(tr, s.elapsed === null ? "not reached" : `${fmt(s.elapsed, 2)} s`);
      cell(tr, s.less_rollout === null ? "" : `${fmt(s.less_rollout, 2)} s less rollout`).colSpan = 2;
      els.runBody.appendChild(tr);
    });
    const sprint = run.speeds.find((s) => s.name === SPRINT[system]);
    $("kpi-sprint-label").textContent = SPRINT[system];
    setKpi("kpi-sprint", sprint && sprint.elapsed !== null ? `${fmt(sprint.elapsed, 2)} s` : "–");
    const quarter = run.distances.find((d) => d.name === "1/4 mile");
    setKpi("kpi-quarter", quarter && quarter.elapsed !== null ? `${fmt(quarter.elapsed, 2)} s` : "–");
    $("kpi-trap").textContent = quarter && quarter.trap_speed !== null
      ? `trap ${fmt(quarter.trap_speed, 1)} ${u.speed}` : "";
    els.runBody.dataset.shiftRpm = JSON.stringify(run.shift_rpm);
    const shifts = run.shifts.map((s) => fmt(s.rpm_before, 0)).join(", ");
    const grip = run.traction_limited_to === null ? "The tires never limit the drive."
      : `The tires limit the drive up to ${fmt(run.traction_limited_to, 1)} ${u.speed}.`;
    els.runNote.textContent = `Clock starts after the rollout. Shifts at ${shifts || "–"} rpm. ` +
      `${grip} Top speed ${fmt(run.top_speed.speed, 1)} ${u.speed} in gear ${run.top_speed.gear} ` +
      `(${run.top_speed.limited_by === "drag" ? "drag" : "rev limit"}).`;
  }

  function renderSpeedo(s) {
    const u = s.units.speed;
    const pct = Math.abs(s.reading_error_percent);
    const first = s.speeds[Math.min(1, s.speeds.length - 1)];
    let head;
    if (pct < 0.05) {
      head = "The speedometer still reads true.";
    } else {
      head = `Reads ${fmt(pct, 1)} % ${s.reads}` + (first
        ? `: showing ${fmt(first.indicated, Number.isInteger(first.indicated) ? 0 : 1)} ${u}, ` +
          `the car does ${fmt(first.true, 1)} ${u}.`
        : ".");
    }
    els.speedoHead.textContent = head;
    els.speedoHead.dataset.errorPercent = String(s.reading_error_percent);
    els.speedoBody.replaceChildren();
    s.speeds.forEach((r) => {
      const tr = document.createElement("tr");
      cell(tr, `${fmt(r.indicated, Number.isInteger(r.indicated) ? 0 : 1)} ${u}`);
      cell(tr, `${fmt(r.true, 1)} ${u}`);
      cell(tr, `${r.error >= 0 ? "+" : "−"}${fmt(Math.abs(r.error), 1)} ${u}`);
      els.speedoBody.appendChild(tr);
    });
    const odo = s.distances[s.distances.length - 1];
    if (odo) {
      const unit = units() === "us" ? "mi" : "km";
      const tr = document.createElement("tr");
      tr.className = "speed-row";
      cell(tr, `odometer ${fmt(odo.indicated, 0)} ${unit}`);
      cell(tr, `${fmt(odo.true, 0)} ${unit} driven`).colSpan = 2;
      els.speedoBody.appendChild(tr);
    }
  }

  function renderNotes(bodies) {
    const warnings = [...new Set(bodies.flatMap((b) => b.warnings.map((w) => w.message)))];
    const cautions = [...new Set(bodies.flatMap((b) => b.cautions))];
    els.warnings.replaceChildren();
    (warnings.length ? warnings : [null]).forEach((text) => {
      const li = document.createElement("li");
      if (text === null) { li.className = "none"; li.textContent = "None."; } else { li.textContent = text; }
      els.warnings.appendChild(li);
    });
    els.cautions.replaceChildren();
    cautions.forEach((text) => {
      const li = document.createElement("li");
      li.textContent = text;
      els.cautions.appendChild(li);
    });
  }

  function renderLegend(plan) {
    els.legend.replaceChildren();
    plan.gears.forEach((g, i) => {
      const li = document.createElement("li");
      const sw = document.createElement("span");
      sw.className = `swatch gear-${i % GEAR_COLOURS.length}`;
      li.append(sw, `gear ${g.gear}`);
      els.legend.appendChild(li);
    });
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
    const pad = { left: 66, right: 14, top: 12, bottom: 42 };
    const plotW = width - pad.left - pad.right;
    const plotH = height - pad.top - pad.bottom;
    const maxSpeed = Math.max(...plan.gears.map((g) => g.max_speed)) * 1.03;
    const maxForce = Math.max(...plan.gears.map((g) => Math.max(...g.table.tractive_force))) * 1.08;
    const x = (v) => pad.left + (v / maxSpeed) * plotW;
    const y = (f) => pad.top + plotH - (f / maxForce) * plotH;
    const u = plan.units;

    ctx.fillStyle = "#fbfcfd";
    ctx.fillRect(pad.left, pad.top, plotW, plotH);
    ctx.font = "12px system-ui, 'DejaVu Sans', sans-serif";
    ctx.lineWidth = 1;
    ctx.strokeStyle = "#e3e8ee";
    ctx.fillStyle = "#56606b";
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
    ctx.strokeStyle = "#9aa5b1";
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

    // the most the driven tires can put down (with a car described): a dashed rule
    if (plan.performance && plan.performance.traction_limit < maxForce) {
      const gy = y(plan.performance.traction_limit);
      ctx.strokeStyle = "#8a96a3";
      ctx.lineWidth = 1.2;
      ctx.setLineDash([7, 5]);
      ctx.beginPath(); ctx.moveTo(pad.left, gy); ctx.lineTo(pad.left + plotW, gy); ctx.stroke();
      ctx.setLineDash([]);
      ctx.fillStyle = "#56606b";
      ctx.textAlign = "right";
      ctx.textBaseline = "bottom";
      ctx.fillText("tire grip limit", pad.left + plotW - 6, gy - 3);
    }

    // each shift: a filled dot on this gear, a dashed drop, a ring where the next takes over
    plan.shifts.forEach((s) => {
      const sx = x(s.shift_speed);
      const top = y(s.force_before);
      const bottom = y(s.force_after);
      ctx.strokeStyle = "#1d2733";
      ctx.lineWidth = 1.5;
      ctx.setLineDash([4, 3]);
      ctx.beginPath(); ctx.moveTo(sx, top); ctx.lineTo(sx, bottom); ctx.stroke();
      ctx.setLineDash([]);
      ctx.fillStyle = "#1d2733";
      ctx.beginPath(); ctx.arc(sx, top, 4, 0, 2 * Math.PI); ctx.fill();
      ctx.fillStyle = "#ffffff";
      ctx.beginPath(); ctx.arc(sx, bottom, 3.5, 0, 2 * Math.PI); ctx.fill(); ctx.stroke();
    });
    canvas.dataset.series = String(plan.gears.length);
    canvas.dataset.drawn = String(Number(canvas.dataset.drawn || 0) + 1);
    canvas.dataset.shifts = String(plan.shifts.length);
  }

  // ---- wiring -----------------------------------------------------------------------------
  function onUnits() {
    const to = units();
    const from = to === "us" ? "metric" : "us";
    const problem = convertForm(from, to);
    if (problem) {
      // the curve could not be read, so it could not be converted: say so, keep the text
      const text = `${problem.message} Its torque was not converted to ${F.UNIT_TEXT[to].torque}.`;
      clearMarks();
      markInput("curve", text);
      finish("error", [{ text, field: "curve" }]);
      keepUrl();
      return;
    }
    schedule();
  }

  function wire() {
    els.preset.addEventListener("change", () => {
      if (PRESETS[els.preset.value]) loadPreset(els.preset.value, units());
      schedule();
    });
    document.querySelectorAll('input[name="units"]').forEach((r) => r.addEventListener("change", onUnits));
    document.querySelectorAll('input[name="tire-mode"]').forEach((r) => r.addEventListener("change", () => {
      setTireMode(tireMode());
      schedule();
    }));
    els.axleSlider.addEventListener("input", () => {
      els.axle.value = Number(els.axleSlider.value).toFixed(2);
      schedule();
    });
    els.axle.addEventListener("input", () => { els.axleSlider.value = els.axle.value; schedule(); });
    const byDiameter = () => { if (tireMode() !== "diameter") setTireMode("diameter"); };
    els.tireDiameterSlider.addEventListener("input", () => {
      els.tireDiameter.value = els.tireDiameterSlider.value;
      byDiameter();
      schedule();
    });
    els.tireDiameter.addEventListener("input", () => {
      els.tireDiameterSlider.value = els.tireDiameter.value;
      byDiameter();
      schedule();
    });
    els.tireSize.addEventListener("input", () => {
      if (tireMode() !== "size") setTireMode("size");
      schedule();
    });
    STATE_FIELDS.filter((id) => !["axle", "tire-diameter", "tire-size"].includes(id)).forEach((id) => {
      input(id).addEventListener(input(id).tagName === "SELECT" ? "change" : "input", () => {
        if (id === "curve" || id === "gears" || id === "rev-limit") els.preset.value = "own";
        schedule();
      });
    });
    $("print").addEventListener("click", () => window.print());
    $("share").addEventListener("click", () => {
      keepUrl();
      els.shareRow.hidden = false;
      els.shareLink.focus();
      els.shareLink.select();
      if (navigator.clipboard && window.isSecureContext) {
        navigator.clipboard.writeText(els.shareLink.value).then(
          () => {
            $("share").textContent = "Link copied";
            setTimeout(() => { $("share").textContent = "Copy link to this set-up"; }, 2500);
          },
          () => {},
        );
      }
    });
    window.addEventListener("hashchange", () => {
      const state = F.decodeState(window.location.hash);
      if (state && F.encodeState(state) !== F.encodeState(readState())) {
        applyState(state);
        schedule();
      }
    });
    window.addEventListener("resize", () => { if (lastPlan) drawChart(lastPlan); });
  }

  const initial = F.decodeState(window.location.hash);
  if (initial) applyState(initial); else loadPreset("coupe", "us");
  wire();
  update();
})();
