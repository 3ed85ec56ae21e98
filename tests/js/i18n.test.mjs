// t() of static/js/i18n.js: the offline pages' strings, from the JSON catalogs that
// `make setup` exports from the same .po files as the server's.
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { test } from 'node:test';
import { direction, format, load, t, useCatalog } from '../../static/js/i18n.js';
import { ROOT } from './rulebook.mjs';

const fromDisk = async (url) => {
  const path = join(ROOT, url.replace(/^\//, ''));
  try {
    const body = readFileSync(path, 'utf8');
    return { ok: true, json: async () => JSON.parse(body) };
  } catch {
    return { ok: false, status: 404 };
  }
};

test('placeholders are filled the way Python fills %(name)s', () => {
  assert.equal(format('Cup = %(ml)s', { ml: '200 ml' }), 'Cup = 200 ml');
  assert.equal(format('%(a)s and %(b)s', { a: 1 }), '1 and %(b)s');
});

test('a translated string comes from the catalog, an unknown one stays English', () => {
  useCatalog({ locale: 'xx', dir: 'ltr', messages: { 'Zinc': 'Zinki', 'Seen on %(date)s': 'Alionwa %(date)s' } });
  assert.equal(t('Zinc'), 'Zinki');
  assert.equal(t('Seen on %(date)s', { date: '2 Machi' }), 'Alionwa 2 Machi');
  assert.equal(t('Not in the catalog'), 'Not in the catalog');
});

test('the exported Swahili and Arabic catalogs load, Arabic right to left', async () => {
  await load('sw', fromDisk);
  assert.equal(t('Mix the ORS'), 'Changanya ORS');
  await load('ar', fromDisk);
  assert.equal(direction(), 'rtl');
  assert.equal(t('Zinc'), 'الزنك');
});

test('a missing catalog falls back to English instead of failing', async () => {
  await load('zz', fromDisk);
  assert.equal(t('Mix the ORS'), 'Mix the ORS');
  assert.equal(direction(), 'ltr');
});
