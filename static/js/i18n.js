// Translations for the offline JavaScript: the JSON catalogs exported from the same .po files
// as the server's (clinic_app/i18n_export.py writes /static/i18n/<lang>.json at set-up).
// `t(msgid, params)` needs no DOM, so it runs under node --test as well as in the browser.

const catalogs = new Map();
let current = { locale: 'en', dir: 'ltr', messages: {} };

// Fill %(name)s placeholders the way Python's gettext formatting does.
export function format(text, params = {}) {
  return text.replace(/%\((\w+)\)s/g, (whole, name) => (name in params ? String(params[name]) : whole));
}

export function useCatalog(catalog) {
  current = { locale: catalog.locale, dir: catalog.dir || 'ltr', messages: catalog.messages || {} };
  catalogs.set(catalog.locale, current);
  return current;
}

// Load /static/i18n/<lang>.json (from the service worker cache when offline) and make it current.
export async function load(lang, fetcher = globalThis.fetch) {
  if (catalogs.has(lang)) {
    current = catalogs.get(lang);
    return current;
  }
  try {
    const response = await fetcher(`/static/i18n/${encodeURIComponent(lang)}.json`);
    if (!response.ok) throw new Error(`catalog ${lang}: ${response.status}`);
    return useCatalog(await response.json());
  } catch (error) {
    // No catalog: English source strings are always a readable fallback.
    return useCatalog({ locale: 'en', dir: 'ltr', messages: {} });
  }
}

export function t(msgid, params = {}) {
  const found = current.messages[msgid];
  const text = typeof found === 'string' && found ? found : msgid;
  return format(text, params);
}

export function locale() {
  return current.locale;
}

export function direction() {
  return current.dir;
}
