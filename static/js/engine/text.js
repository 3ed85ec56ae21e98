// Text templates and volume rounding: the JavaScript twin of clinic_app/clinical/messages.py.
// No DOM, no clinical numbers: the rounding precision comes from the rulebook.

// Round-half-up offset. Written as 1 / 2 (exactly 0.5) so the only literals are 1 and 2.
export const HALF = 1 / 2;

const PLACEHOLDER = /\{([a-z0-9_]+)\}/g;

export function own(obj, key) {
  return obj !== null && typeof obj === 'object' && Object.prototype.hasOwnProperty.call(obj, key);
}

// obj[key] = value that also works for a key such as "__proto__" (which JSON.parse allows).
export function setOwn(obj, key, value) {
  Object.defineProperty(obj, key, { value, enumerable: true, writable: true, configurable: true });
}

export function isObject(value) {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

// Python's str() of the values the core puts into texts (None/True/False spelt as Python does,
// so a slip would show the same text on both engines).
export function fmt(value) {
  if (value === null || value === undefined) return 'None';
  if (value === true) return 'True';
  if (value === false) return 'False';
  return String(value);
}

export function render(template, params) {
  return template.replace(PLACEHOLDER, (_m, name) => {
    if (!own(params, name)) throw new Error(`missing text parameter ${name}`);
    return fmt(params[name]);
  });
}

// Python str.replace: every occurrence, literal text.
export function replaceAll(text, search, value) {
  return text.split(search).join(value);
}

export function roundVolume(rules, ml) {
  const p = rules.volume_rounding_ml.value;
  return Math.floor(ml / p + HALF) * p;
}

export function ordered(rules, kind, items) {
  const out = [];
  for (const code of rules[kind].order) {
    if (items.has(code)) {
      out.push({ code, text: render(rules[kind].texts[code].text, items.get(code)) });
    }
  }
  return out;
}

export function facility(rules, name, phone) {
  const texts = rules.facility_texts;
  let suffix = '';
  if (name) suffix += render(texts.name, { name });
  if (phone) suffix += render(texts.phone, { phone });
  return suffix;
}

// Python's sorted() order for strings: by code point (JS sort() compares UTF-16 units).
const SURROGATE_OR_ABOVE = /[\uD800-\uFFFF]/;

export function codePointCompare(a, b) {
  if (!SURROGATE_OR_ABOVE.test(a) && !SURROGATE_OR_ABOVE.test(b)) {
    if (a === b) return 0;
    return a < b ? -1 : 1;
  }
  const x = Array.from(a);
  const y = Array.from(b);
  const n = Math.min(x.length, y.length);
  for (let i = 0; i < n; i += 1) {
    const d = x[i].codePointAt(0) - y[i].codePointAt(0);
    if (d !== 0) return d;
  }
  return x.length - y.length;
}

// Python's sorted() of a list of strings, or of an object's keys.
export function sortedKeys(keysOrObject) {
  const keys = Array.isArray(keysOrObject) ? [...keysOrObject] : Object.keys(keysOrObject);
  return keys.sort(codePointCompare);
}
