// gearwork demo page, form helpers: unit conversion of the form's figures, the pasted-curve
// reader, plain-sentence errors from problem details, and the form state kept in the URL.
// No DOM access here beyond what callers pass in; demo.js uses window.GearworkForm.
"use strict";

(function () {
  // Exact definitions (international yard and pound, 1959; standard gravity 9.80665 m/s^2):
  // SI value = US value * factor.
  const LBF_N = 0.45359237 * 9.80665;
  const FACTOR = {
    torque: LBF_N * 0.3048, // lbf*ft -> N*m
    length: 25.4, // in -> mm
    mass: 0.45359237, // lb -> kg
    area: 0.3048 * 0.3048, // ft^2 -> m^2
    speed: 1.609344, // mph -> km/h
  };
  // decimals kept in the form after a conversion, by quantity and system
  const DECIMALS = {
    torque: { us: 2, metric: 2 },
    length: { us: 2, metric: 1 },
    mass: { us: 0, metric: 1 },
    area: { us: 2, metric: 3 },
    speed: { us: 1, metric: 1 },
  };
  const UNIT_TEXT = {
    us: { torque: "lbf·ft", length: "in", mass: "lb", area: "ft²", speed: "mph" },
    metric: { torque: "N·m", length: "mm", mass: "kg", area: "m²", speed: "km/h" },
  };

  class InputError extends Error {
    constructor(message, input) {
      super(message);
      this.input = input;
    }
  }

  function toMetric(kind, value, from) {
    return from === "us" ? value * FACTOR[kind] : value;
  }
  function fromMetric(kind, value, to) {
    return to === "us" ? value / FACTOR[kind] : value;
  }
  // a number as the form shows it: at most `decimals` places, no trailing zeros
  function trimmed(value, decimals) {
    return String(Number(value.toFixed(decimals)));
  }
  function shown(kind, metricValue, system) {
    return trimmed(fromMetric(kind, metricValue, system), DECIMALS[kind][system]);
  }

  // ---- pasted torque curves -----------------------------------------------------------
  const RPM_HEADER = /rpm|u\/min|1\/min|engine ?speed|revs/i;
  const TORQUE_HEADER = /torque|\btq\b|n[·*. ]?m|lb[·*. -]?ft|ft[·*. -]?lb/i;

  // one line's cells: tabs, else semicolons, else blanks between numbers, else commas
  function cells(line) {
    if (line.includes("\t")) return { cells: line.split("\t"), byComma: false };
    if (line.includes(";")) return { cells: line.split(";"), byComma: false };
    const words = line.split(/\s+/).map((w) => w.replace(/^,+|,+$/g, "")).filter(Boolean);
    if (words.length > 1 && words.every((w) => /^[-+]?[\d.,]+$/.test(w))) {
      return { cells: words, byComma: false };
    }
    if (line.includes(",")) return { cells: line.split(","), byComma: true };
    return { cells: words, byComma: false };
  }

  // "200,5" (decimal comma) and "200.5" are both 200.5; anything else non-numeric is NaN
  function number(cell) {
    let c = cell.trim().replace(/^"(.*)"$/, "$1").trim();
    if (/^[-+]?\d*,\d+$/.test(c)) c = c.replace(",", ".");
    return c === "" ? NaN : Number(c);
  }

  // the unit system a torque column's header names, if it names one
  function headerSystem(cell) {
    if (/lbf|lb[·*. -]?ft|ft[·*. -]?lb/i.test(cell)) return "us";
    if (/n[·*. ]?m\b|newton/i.test(cell)) return "metric";
    return null;
  }

  function columns(header) {
    const rpm = header.findIndex((h) => RPM_HEADER.test(h));
    const torque = header.findIndex((h, i) => i !== rpm && TORQUE_HEADER.test(h));
    return [rpm >= 0 ? rpm : 0, torque >= 0 ? torque : rpm === 1 ? 0 : 1];
  }

  /**
   * Read a pasted curve into the form's unit system: header lines before the data are
   * skipped (and name the rpm and torque columns when they can; a torque header naming the
   * other system's unit converts the column), then one row per line.
   */
  function parseCurve(text, system) {
    const rpm = [];
    const torque = [];
    let cols = [0, 1];
    let width = 2;
    let header = null;
    const lines = text.split(/\r\n|\r|\n/);
    for (let i = 0; i < lines.length; i += 1) {
      const line = lines[i].trim();
      if (!line || line.startsWith("#")) continue;
      const row = cells(line);
      const values = row.cells.map(number);
      if (values.some((v) => !Number.isFinite(v))) {
        if (rpm.length === 0) {
          if (header === null) {
            header = row.cells;
            cols = columns(header);
            width = header.length;
          }
          continue;
        }
        throw new InputError(
          `Torque curve line ${i + 1} should hold numbers (rpm and torque), not "${line.slice(0, 30)}".`,
          "curve",
        );
      }
      if (row.byComma && values.length !== width) {
        throw new InputError(
          `Torque curve line ${i + 1} reads as ${values.length} numbers: if they hold decimal ` +
            "commas, put a semicolon or a tab between the columns; else add a header line " +
            "naming the rpm and torque columns.",
          "curve",
        );
      }
      if (values.length <= Math.max(...cols)) {
        throw new InputError(`Torque curve line ${i + 1} should hold an rpm and a torque.`, "curve");
      }
      rpm.push(values[cols[0]]);
      torque.push(values[cols[1]]);
    }
    if (rpm.length === 0) {
      throw new InputError("Torque curve is empty: give one rpm and torque pair a line.", "curve");
    }
    const given = header === null ? null : headerSystem(header[cols[1]] || "");
    if (given && system && given !== system) {
      const metric = torque.map((t) => toMetric("torque", t, given));
      return {
        rpm,
        torque: metric.map((t) => fromMetric("torque", t, system)),
        note: `${rpm.length} points; torque converted from ${UNIT_TEXT[given].torque}, as ` +
          "its header says.",
      };
    }
    return { rpm, torque, note: `${rpm.length} points${header === null ? "" : ", header skipped"}.` };
  }

  function curveText(rpm, torque) {
    return rpm.map((r, i) => `${r}, ${torque[i]}`).join("\n");
  }

  // numbers in a list typed with commas, semicolons or blanks
  function parseList(text) {
    return text.split(/[\s,;]+/).filter(Boolean).map(number);
  }

  // ---- plain-sentence errors from RFC 9457 problem details ---------------------------------
  // request field path -> [form input key, the name the form gives it]
  const FIELDS = [
    [/^engine\.curve\.rpm/, "curve", "The torque curve's rpm"],
    [/^engine\.curve\.torque/, "curve", "The torque curve's torque"],
    [/^engine\.curve/, "curve", "Torque curve"],
    [/^engine\.rev_limit_rpm/, "revLimit", "Rev limit"],
    [/^drivetrain\.gear_ratios/, "gears", "Gear ratios"],
    [/^(drivetrain|new)\.final_drive_ratio/, "axle", "Axle ratio"],
    [/^drivetrain\.efficiency/, "efficiency", "Driveline efficiency"],
    [/^(drivetrain|new)\.tire\.diameter/, "tireDiameter", "Tire diameter"],
    [/^(drivetrain|new)\.tire/, "tireSize", "Tire size"],
    [/^original\.tire/, "stockTire", "Calibrated tire size"],
    [/^original\.final_drive_ratio/, "stockAxle", "Calibrated axle ratio"],
    [/^vehicle\.mass/, "mass", "Mass"],
    [/^vehicle\.front_weight_share/, "frontShare", "Weight on front axle"],
    [/^vehicle\.wheelbase/, "wheelbase", "Wheelbase"],
    [/^vehicle\.cg_height/, "cgHeight", "Centre of mass height"],
    [/^vehicle\.friction_coefficient/, "grip", "Tire grip"],
    [/^vehicle\.drive/, "drive", "Driven wheels"],
    [/^vehicle\.road_load\.drag_coefficient/, "cd", "Drag coefficient"],
    [/^vehicle\.road_load\.frontal_area/, "frontalArea", "Frontal area"],
    [/^launch\.launch_rpm/, "launchRpm", "Launch rpm"],
    [/^launch\.shift_time/, "shiftTime", "Time per shift"],
    [/^(cruise_speeds|indicated_speeds)/, "cruise", "Highway speeds"],
    [/^drive$/, "speedoDrive", "Speedometer signal"],
    [/^(shift_criterion|shifts\.criterion)/, "shiftRule", "Shift rule"],
  ];

  function fieldOf(path) {
    const hit = FIELDS.find(([pattern]) => pattern.test(path));
    if (hit) return { input: hit[1], label: hit[2] };
    const last = path.replace(/\[\d+\]/g, "").split(".").pop() || "";
    const words = last.replace(/_/g, " ");
    return { input: null, label: words ? words[0].toUpperCase() + words.slice(1) : "The input" };
  }

  // "Gear ratios, value 3," for drivetrain.gear_ratios[2]; "Torque curve, point 4," for a curve
  function labelWithIndex(path) {
    const f = fieldOf(path);
    const m = /\[(\d+)\]$/.exec(path);
    if (!m) return f.label;
    const what = f.input === "curve" ? "point" : "value";
    return `${f.label}, ${what} ${Number(m[1]) + 1},`;
  }

  /** One problem-details error item as a sentence that names the form's field. */
  function sentence(item) {
    const raw = String(item.message || item.detail || "The request was refused.");
    const path = item.field || (/`([\w.[\]]+)`/.exec(raw) || [])[1] || "";
    if (!path) {
      const plain = raw.replace(/\s+$/, "");
      return { text: /[.!?]$/.test(plain) ? plain : `${plain}.`, input: null, field: "" };
    }
    const field = fieldOf(path);
    let text = raw
      .replace(/^`[\w.[\]]+`:\s*/, "")
      .replace(/^Value error,\s*/i, "")
      .replace(/`([\w.[\]]+)`/g, (_, p) => fieldOf(p).label.toLowerCase())
      .replace(/\b(?:engine|drivetrain|vehicle|launch|original|new)\.[\w.]+(?:\[\d+\])?/g,
        (p) => fieldOf(p).label.toLowerCase())
      .replace(/(?:lie )?(?:in )?\(([-\d.]+), ([-\d.]+)\]/g, "be above $1 and at most $2")
      .replace(/(?:lie )?(?:in )?\[([-\d.]+), ([-\d.]+)\]/g, "be from $1 to $2");
    const label = labelWithIndex(path);
    if (/^(Input|Value|String|List) should/i.test(text)) {
      text = text.replace(/^(Input|Value|String|List) should/i, `${label} should`);
    } else if (/^Field required/i.test(text)) {
      text = `${label} is needed.`;
    } else if (!text.toLowerCase().startsWith(field.label.toLowerCase())) {
      text = `${label.replace(/,$/, "")}: ${text}`;
    }
    text = text[0].toUpperCase() + text.slice(1);
    if (!/[.!?]$/.test(text)) text += ".";
    return { text: text.replace(/,,/g, ","), input: field.input, field: path };
  }

  // ---- the form in the URL ----------------------------------------------------------------
  function encodeState(state) {
    return new URLSearchParams(state).toString();
  }
  function decodeState(hash) {
    const text = hash.replace(/^#/, "");
    if (!text) return null;
    const params = new URLSearchParams(text);
    const out = {};
    params.forEach((v, k) => { out[k] = v; });
    return Object.keys(out).length ? out : null;
  }

  window.GearworkForm = {
    FACTOR,
    InputError,
    UNIT_TEXT,
    curveText,
    decodeState,
    encodeState,
    fromMetric,
    parseCurve,
    parseList,
    sentence,
    shown,
    toMetric,
    trimmed,
  };
})();
