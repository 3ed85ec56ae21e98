// The result screen's words and numbers on the phone: the twin of clinic_app/web/assess_view.py
// (same templates, same arithmetic; a browser test compares the two renderings). No DOM.

const SLOT = /%\((\w+)\)s/g;

export function fill(template, params) {
  return template.replace(SLOT, (_, name) => String(params[name]));
}

// --- the rulebook's action and caution texts in the screen's language -------------------
// The twin of clinic_app/i18n_rules.py: match the English template of the item's code against
// the engine's text, then put the values into the translated template (English if no match).
const BRACE = /\{([a-z0-9_]+)\}/g;

function escapeRegExp(text) {
  return text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}

function pattern(template) {
  let source = "";
  let pos = 0;
  const names = new Set();
  for (const match of template.matchAll(BRACE)) {
    source += escapeRegExp(template.slice(pos, match.index));
    const name = match[1];
    source += names.has(name) ? `\\k<${name}>` : `(?<${name}>[\\s\\S]*?)`;
    names.add(name);
    pos = match.index + match[0].length;
  }
  return new RegExp(`^${source}${escapeRegExp(template.slice(pos))}$`);
}

function fillBraces(template, params) {
  return template.replace(BRACE, (_, name) => {
    if (!(name in params)) throw new Error(`no value for ${name}`);
    return params[name];
  });
}

function facility(value, rules, translations) {
  const nameT = rules.facility_texts.name;
  const phoneT = rules.facility_texts.phone;
  for (const template of [nameT + phoneT, nameT, phoneT]) {
    const found = value.match(pattern(template));
    if (found) {
      const groups = { ...found.groups };
      const parts = [nameT, phoneT].filter((t) => t.match(/\{([a-z0-9_]+)\}/)[1] in groups);
      const local = (t) => (Object.hasOwn(translations, t) ? translations[t] : t);
      return fillBraces(parts.map(local).join(""), groups);
    }
  }
  return value;
}

/** The text of one action or caution in the screen's language. */
export function localize(rules, kind, item, translations) {
  const entry = rules[kind].texts[item.code];
  const text = item.text || "";
  if (!entry || !Object.hasOwn(translations, entry.text)) return text;
  const found = text.match(pattern(entry.text));
  if (!found) return text;
  const params = {};
  for (const [name, value] of Object.entries(found.groups || {})) {
    params[name] = Object.hasOwn(translations, value) ? translations[value] : value;
  }
  if ("facility" in params) params.facility = facility(found.groups.facility, rules, translations);
  try {
    return fillBraces(translations[entry.text], params);
  } catch {
    return text;
  }
}

function rule(rules, name) {
  return rules[name].value;
}

/** The assess input from the form's values (an object of field name -> string/boolean). */
export function buildInput(data, rules) {
  const unit = data.age_unit || "months";
  let age = parseFloat(data.age_value);
  if (unit === "weeks") age = age * 7 / rule(rules, "growth_days_per_month");
  else if (unit === "years") age = age * 12;
  const input = {
    age_months: age,
    danger_signs: Object.fromEntries(rules.danger_signs.inputs.map((name) => [name, Boolean(data[name])])),
    signs: Object.fromEntries(["condition", "eyes", "drinking", "skin_pinch"]
      .filter((name) => data[name]).map((name) => [name, data[name]])),
    oedema_both_feet: Boolean(data.oedema_both_feet),
    blood_in_stool: Boolean(data.blood_in_stool),
  };
  if (data.sex) input.sex = data.sex;
  if (data.weight_kg !== "" && data.weight_kg != null && !data.no_scale) {
    input.weight_kg = parseFloat(data.weight_kg);
  }
  for (const name of ["muac_mm", "diarrhoea_days"]) {
    if (data[name] !== "" && data[name] != null) input[name] = parseInt(data[name], 10);
  }
  if (data.confirm_implausible_weight) input.confirm_implausible_weight = true;
  return input;
}

export function cups(ml, cupMl) {
  return Math.floor(ml / cupMl * 4 + 0.5) / 4;
}

export function spoons(ml, rules) {
  return Math.floor(ml / rule(rules, "teaspoon_ml") + 0.5);
}

/** The result screen's texts, exactly as the server's present(). */
export function present(result, settings, ageMonths, rules, w) {
  const out = {
    severity: result.severity, severity_text: w[`severity_${result.severity}`],
    plan_text: w[`plan_${result.plan}`], ors_text: "", schedule: [],
    cup_text: fill(w.cup_size, { cup_ml: settings.cup_ml }), per_stool_text: "",
    zinc_text: "", refer_text: w[`refer_${result.refer}`], facility_text: "",
    actions: (result.actions || []).map((a) => localize(rules, "actions", a, w.rule_texts || {})),
    cautions: (result.cautions || []).map((c) => localize(rules, "cautions", c, w.rule_texts || {})),
  };
  const ors = result.ors;
  if (ors) {
    if (ors.total_ml == null && ors.low_ml == null) {
      // no weight and no table row: the actions say to weigh the child
    } else if (ors.total_ml == null) {
      out.ors_text = fill(w.ors_range, { low: ors.low_ml, high: ors.high_ml, hours: ors.hours });
    } else if (ors.low_ml == null) {  // beyond the table's last row
      out.ors_text = fill(w.ors_total_only, { total: ors.total_ml, hours: ors.hours });
    } else {
      out.ors_text = fill(w.ors_total, { total: ors.total_ml, hours: ors.hours,
                                         low: ors.low_ml, high: ors.high_ml });
    }
    const small = ageMonths < rule(rules, "spoons_max_age_months");
    (ors.hourly_ml || []).forEach((ml, index) => {
      out.schedule.push({
        hour: fill(w.hour, { n: index + 1 }), ml: fill(w.ml, { ml }),
        cups: fill(w.cups, { cups: cups(ml, settings.cup_ml) }),
        spoons: small ? fill(w.spoons, { n: spoons(ml, rules) }) : "",
      });
    });
  }
  const perStool = result.per_stool_ml;
  if (perStool) {
    out.per_stool_text = perStool.as_much_as_wanted ? w.per_stool_any
      : fill(w.per_stool, { low: perStool.low_ml, high: perStool.high_ml });
  }
  const zinc = result.zinc;
  if (zinc) {
    // A clinic that gives a fixed number of days sees "for 10 days", not "for 10-10 days".
    out.zinc_text = zinc.days_min === zinc.days_max
      ? fill(w.zinc_fixed, { mg: zinc.mg_per_day, days: zinc.days_min })
      : fill(w.zinc, { mg: zinc.mg_per_day, min: zinc.days_min, max: zinc.days_max });
  }
  if (result.refer !== "none" && settings.referral_facility_name) {
    out.facility_text = fill(w.facility, { name: settings.referral_facility_name,
                                           phone: settings.referral_facility_phone || "-" });
  }
  return out;
}
