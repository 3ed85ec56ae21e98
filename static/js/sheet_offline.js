// The caregiver sheet on the phone, offline: the twin of clinic_app/caregiver_sheet.py (the
// content) and templates/sheets/sheet.html (the markup, same classes and pictograms), fed by
// the case kept on the phone and the cached rulebook. Strings come through t() from the same
// catalogs. Numbers, units and dates use the browser's Intl (CLDR data, like Babel's); no DOM.

const CUP_QUARTERS = 4; // display precision, as in caregiver_sheet.py
const RETURN_SIGNS = ['watery_stools', 'vomiting', 'thirsty', 'not_drinking', 'fever', 'blood',
  'not_better'];
const ICONS = '/static/icons/sheet/';

const value = (rules, key) => rules[key].value;

function rowBelow(rows, key, x) {
  return rows.find((row) => row[key] === null || row[key] === undefined || x < row[key]) || null;
}

export function formatters(lang) {
  const nf = new Intl.NumberFormat(lang);
  const ml = new Intl.NumberFormat(lang, { style: 'unit', unit: 'milliliter', unitDisplay: 'short' });
  const litre = new Intl.NumberFormat(lang, { style: 'unit', unit: 'liter', unitDisplay: 'long' });
  return {
    number: (x) => nf.format(x),
    ml: (x) => ml.format(Math.trunc(x)),
    litre: (x) => litre.format(x),
    date: (d, style) => new Intl.DateTimeFormat(lang, { dateStyle: style, timeZone: 'UTC' }).format(d),
  };
}

export function cups(volumeMl, cupMl) {
  return Math.max(1, Math.floor(volumeMl / cupMl * CUP_QUARTERS + 0.5)) / CUP_QUARTERS;
}

function amount(volumeMl, cupMl, spoonMl, fmt, withSpoons) {
  const c = cups(volumeMl, cupMl);
  const full = Math.floor(c);
  const fills = [...Array(full).fill(1), ...(c > full ? [c - full] : [])];
  return {
    ml: fmt.ml(volumeMl), cups: fmt.number(c),
    cup_fills: fills.map((fill) => ({ fill, icon: `cup_${Math.round(fill * 100)}` })),
    spoons: withSpoons ? fmt.number(Math.max(1, Math.floor(volumeMl / spoonMl + 0.5))) : null,
  };
}

/** The sheet's content for a case ({input, result, created_at}), formatted for ``lang``. */
export function buildSheet(record, { rules, settings, lang, clinic = {} }) {
  const fmt = formatters(lang);
  const { result } = record;
  const age = record.input.age_months;
  const small = age < value(rules, 'spoons_max_age_months');
  const spoonMl = value(rules, 'teaspoon_ml');
  const seen = new Date(`${String(record.created_at).slice(0, 10)}T00:00:00Z`);
  const follow = new Date(seen.getTime() + value(rules, 'sheet_follow_up_days') * 86400000);
  const sheet = {
    plan: result.plan, refer: result.refer || 'none', small_child: small, locale: lang,
    cup: fmt.ml(settings.cup_ml), spoon: fmt.ml(spoonMl),
    water: fmt.litre(value(rules, 'sheet_ors_water_ml_per_sachet') / 1000),
    keep_hours: fmt.number(value(rules, 'sheet_ors_keep_hours')),
    spoon_every: { low: fmt.number(rules.sheet_spoon_every_minutes.low),
      high: fmt.number(rules.sheet_spoon_every_minutes.high) },
    vomit_wait_minutes: fmt.number(value(rules, 'vomiting_wait_minutes')),
    not_better_days: fmt.number(value(rules, 'sheet_return_if_not_better_days')),
    seen_on: fmt.date(seen, 'long'), follow_up: fmt.date(follow, 'full'),
    clinic: { name: clinic.name || '', phone: clinic.phone || '' },
    referral: { name: settings.referral_facility_name || '', phone: settings.referral_facility_phone || '' },
    return_signs: RETURN_SIGNS,
  };
  const ors = result.ors;
  if (ors && ors.total_ml) {
    const hourly = (ors.hourly_ml && ors.hourly_ml[0]) || ors.total_ml / ors.hours;
    sheet.clinic_ors = { total: amount(ors.total_ml, settings.cup_ml, spoonMl, fmt, false),
      hours: fmt.number(ors.hours), hourly: amount(hourly, settings.cup_ml, spoonMl, fmt, small) };
  }
  let perStool = result.per_stool_ml;
  if (!perStool) {
    const row = rowBelow(rules.plan_a.rows, 'max_age_months', age);
    perStool = row.as_much_as_wanted ? { as_much_as_wanted: true }
      : { low_ml: row.per_stool_low_ml, high_ml: row.per_stool_high_ml };
  }
  sheet.per_stool = perStool.as_much_as_wanted ? null : {
    low: amount(perStool.low_ml, settings.cup_ml, spoonMl, fmt, small),
    high: amount(perStool.high_ml, settings.cup_ml, spoonMl, fmt, small) };
  if (result.home_ors_ml_per_day) {
    const n = Math.ceil(result.home_ors_ml_per_day / value(rules, 'sheet_ors_water_ml_per_sachet'));
    sheet.home_ors = { ml: fmt.ml(result.home_ors_ml_per_day), sachets: fmt.number(n), sachets_n: n };
  }
  if (result.zinc) {
    const z = result.zinc;
    const tablets = z.mg_per_day / value(rules, 'sheet_zinc_tablet_mg');
    sheet.zinc = { tablets: fmt.number(tablets), half: tablets < 1, mg: fmt.number(z.mg_per_day),
      days_min: fmt.number(z.days_min), days_max: fmt.number(z.days_max),
      boxes: Array.from({ length: z.days_max }, (_, i) => fmt.number(i + 1)), required: z.days_min };
  }
  return sheet;
}

const esc = (s) => String(s).replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
const icon = (name, label = '') => `<img class="icon" src="${ICONS}${name}.svg" alt="${esc(label)}"${label ? '' : ' aria-hidden="true"'}>`;

function cupRow(a, t) {
  const pics = a.cup_fills.map((f) => `<img class="cup" src="${ICONS}${f.icon}.svg" alt="" aria-hidden="true">`).join('');
  return `<span class="cups" role="img" aria-label="${esc(t('%(n)s cups', { n: a.cups }))}">${pics}</span>`;
}

/** A run of day cells, as the template writes them: squares are the span's background. */
function tickCells(days, cls) {
  if (!days.length) return '';
  const cells = days.map((d) => `&#8199;&#8199;&#8199;${esc(d)}${'&#8199;'.repeat(Math.max(0, 3 - String(d).length))}&#8203;`);
  return `<span class="${cls}">${cells.join('')}</span>`;
}

const SIGN_TEXT = {
  watery_stools: 'has many watery stools', vomiting: 'vomits again and again',
  thirsty: 'is very thirsty', not_drinking: 'cannot drink or breastfeed, or eats or drinks poorly',
  fever: 'has a fever', blood: 'has blood in the stool', not_better: 'is not better in %(days)s days',
};

/** The sheet's <article> markup, the same structure as templates/sheets/sheet.html. */
export function renderSheet(s, t) {
  const T = (msgid, params) => esc(t(msgid, params));
  const out = [];
  out.push(`<article class="page"><header class="head">${icon('hospital')}<h1>${T('Home care for your child')}</h1>`,
    `<p class="meta">${s.clinic.name ? `${esc(s.clinic.name)} · ` : ''}${T('Seen on %(date)s', { date: s.seen_on })}</p></header>`);
  if (s.refer === 'urgent') {
    out.push(`<section class="alert" role="alert"><span class="pics">${icon('warning', t('Warning'))}</span><div class="txt">`,
      `<p class="big">${T('Go to the hospital now.')}</p><p>${T('On the way, give small sips of ORS often. Keep breastfeeding.')}</p></div></section>`);
  }
  // A list item's pictograms are its background (sheet.css), as in the template.
  const step = (pics, text) => `<li class="pic pic-${pics.join('-')}">${text}</li>`;
  out.push(`<section class="box mix"><h2><span class="num">1</span> ${T('Mix the ORS')}</h2><ol class="steps">`,
    step(['hands'], T('Wash your hands with soap and water.')),
    step(['sachet', 'bottle'], T('Pour one sachet into %(water)s of clean water. If you are not sure the water is clean, boil it and let it cool.', { water: s.water })),
    step(['stir', 'nothing_else'], T('Stir until it dissolves. Add nothing else: no sugar, no milk, no juice.')),
    step(['clock'], `<strong class="numeral">${esc(s.keep_hours)}</strong> ${T('Use it within %(hours)s hours. Make it fresh each day.', { hours: s.keep_hours })}`),
    '</ol></section>');
  out.push(`<section class="box give"><h2><span class="num">2</span> ${T('How much ORS to give')}</h2>`,
    `<p class="cupsize">${icon('cup')} ${T('Cup = %(ml)s', { ml: s.cup })}${s.small_child ? ` · ${icon('spoon')} ${T('Teaspoon = %(ml)s', { ml: s.spoon })}` : ''}</p>`);
  if (s.clinic_ors) {
    out.push(`<p class="label">${T('First %(hours)s hours (in the clinic):', { hours: s.clinic_ors.hours })}</p>`,
      `<p><strong class="numeral">${esc(s.clinic_ors.total.ml)}</strong> · ${T('each hour about %(ml)s', { ml: s.clinic_ors.hourly.ml })} ${cupRow(s.clinic_ors.hourly, t)}</p>`);
  }
  out.push(`<p class="label">${T('After each loose stool:')}</p>`);
  if (s.per_stool) {
    const { low, high } = s.per_stool;
    out.push(`<p><strong class="numeral">${esc(low.ml)} – ${esc(high.ml)}</strong> ${cupRow(low, t)} – ${cupRow(high, t)} <span class="cupword">${T('%(low)s to %(high)s cups', { low: low.cups, high: high.cups })}</span></p>`);
    out.push(s.small_child
      ? `<p>${icon('spoon')} ${T('%(low)s to %(high)s teaspoons. Give one teaspoon every %(every_low)s to %(every_high)s minutes.', { low: low.spoons, high: high.spoons, every_low: s.spoon_every.low, every_high: s.spoon_every.high })}</p>`
      : `<p>${icon('cup')} ${T('Give frequent small sips from a cup.')}</p>`);
  } else {
    out.push(`<p><strong>${T('As much as the child wants.')}</strong></p>`);
  }
  if (s.home_ors) {
    const one = 'Take home %(n)s sachet. Give up to %(ml)s a day.';
    const many = 'Take home %(n)s sachets. Give up to %(ml)s a day.';
    out.push(`<p>${icon('sachet')} ${T(s.home_ors.sachets_n === 1 ? one : many, { n: s.home_ors.sachets, ml: s.home_ors.ml })}</p>`);
  }
  out.push(`<p>${T('If the child vomits, wait %(minutes)s minutes, then give more slowly.', { minutes: s.vomit_wait_minutes })}</p></section>`);
  if (s.zinc) {
    const z = s.zinc;
    const dose = z.half ? T('%(n)s tablet once a day, for %(min)s to %(max)s days.', { n: z.tablets, min: z.days_min, max: z.days_max })
      : T('One tablet once a day, for %(min)s to %(max)s days.', { min: z.days_min, max: z.days_max });
    out.push(`<section class="box zinc"><h2><span class="num">3</span> ${T('Zinc')}</h2>`,
      `<p>${icon(z.half ? 'tablet_half' : 'tablet')} <strong class="numeral">${esc(z.tablets)}</strong> ${dose}</p>`,
      `<p>${T('Dissolve the tablet in a spoonful of breast milk, ORS or clean water. An older child may chew it.')}</p>`,
      `<p>${T('Keep giving zinc every day, even when the diarrhoea has stopped.')}</p>`,
      `<p class="ticklabel">${T('Tick a box each day:')}</p><p class="ticks">`,
      tickCells(z.boxes.slice(0, z.required), 'days'), tickCells(z.boxes.slice(z.required), 'days extra'),
      '</p></section>');
  }
  out.push(`<div class="row"><section class="box feed"><h2><span class="num">${s.zinc ? 4 : 3}</span> ${T('Keep feeding')}</h2>`,
    `<p>${icon('breastfeed')}${icon('food')} ${T('Keep breastfeeding, more often and for longer. Keep giving food.')}</p></section>`,
    `<div class="spacer"></div><section class="box followup"><h2>${icon('calendar')} ${T('Next visit')}</h2><p><strong>${esc(s.follow_up)}</strong></p></section></div>`);
  out.push(`<section class="box danger"><h2>${icon('warning', t('Warning'))} ${T('Come back at once if the child:')}</h2><ul class="signs">`,
    s.return_signs.map((sign) => `<li class="pic pic-sign_${sign}">${T(SIGN_TEXT[sign], { days: s.not_better_days })}</li>`).join(''),
    '</ul></section>');
  const foot = [];
  if (s.clinic.name || s.clinic.phone) foot.push(`${icon('phone')} ${esc(s.clinic.name)}${s.clinic.phone ? ` · ${esc(s.clinic.phone)}` : ''}`);
  if (s.referral.name) foot.push(`${T('Referral: %(name)s', { name: s.referral.name })}${s.referral.phone ? ` · ${esc(s.referral.phone)}` : ''}`);
  out.push(`<footer class="foot">${foot.length ? `<p>${foot.join(' · ')}</p>` : ''}<p class="caution">${T("Local protocols and the health worker's advice come first.")}</p>`,
    `<p class="sources">${T('Sources: WHO/UNICEF ORS (S16), WHO 2005 home treatment (S02), IMCI (S04), zinc (S10). Keeping time of mixed ORS: see conflict C14.')}</p></footer></article>`);
  return out.join('\n');
}
