// The result screen shows the rulebook's action and caution texts in the user's language
// (static/js/pages/assess_view.js localize, twin of clinic_app/i18n_rules.py).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";

import { localize } from "../../static/js/pages/assess_view.js";
import { exportRulebooks } from "./rulebook.mjs";

const loadRulebook = async () => exportRulebooks([{}])[0];

const vectors = JSON.parse(readFileSync(new URL("../vectors/assessments.json", import.meta.url)));
const cases = Array.isArray(vectors) ? vectors : vectors.cases;

function marked(rules) {
  const out = {};
  for (const kind of ["actions", "cautions"]) {
    for (const entry of Object.values(rules[kind].texts)) out[entry.text] = `[[${entry.text}]]`;
  }
  return out;
}

test("every action and caution of every vector is matched and re-filled", async () => {
  const rulebook = await loadRulebook();
  const translations = marked(rulebook.rules);
  let checked = 0;
  for (const vector of cases) {
    for (const kind of ["actions", "cautions"]) {
      for (const item of vector.expected[kind] || []) {
        assert.equal(localize(rulebook.rules, kind, item, translations), `[[${item.text}]]`,
                     `${vector.name} ${item.code}`);
        checked += 1;
      }
    }
  }
  assert.ok(checked > 500, `only ${checked} texts checked`);
});

test("the facility suffix and rule labels are translated too", async () => {
  const { rules } = await loadRulebook();
  const template = rules.actions.texts.plan_c_refer_iv_facility.text;
  const translations = {
    [template]: "Rufaa HARAKA{facility}.",
    [rules.facility_texts.name]: " kwa {name}",
    [rules.facility_texts.phone]: " (simu {phone})",
  };
  const text = template.replace("{facility}", " to Siwelo Hospital (phone +000 1)");
  assert.equal(localize(rules, "actions", { code: "plan_c_refer_iv_facility", text }, translations),
               "Rufaa HARAKA kwa Siwelo Hospital (simu +000 1).");
});

test("a text that does not match its template, or a broken translation, stays in English",
  async () => {
    const { rules } = await loadRulebook();
    const template = rules.cautions.texts.vomiting.text;
    const item = { code: "vomiting", text: "something else" };
    assert.equal(localize(rules, "cautions", item, { [template]: "x {minutes}" }), "something else");
    const good = { code: "vomiting", text: template.replace("{minutes}", "10") };
    assert.equal(localize(rules, "cautions", good, { [template]: "x {seconds}" }), good.text);
  });
