// @ts-check
// Community metabolism per transect (NCP and NEC with their uncertainty and significance, invalid windows
// with their reasons, daily budgets when the daemon writes them), tonight's oxygen forecasts, and the
// weather mast.
import { el, byId } from './dom.js';
import { ago, decimals, num, unitText, withUnit } from './format.js';
import { curveOf, dayBounds, fitSentence, latestFit, lightColumns, RESPONSES } from './light.js';
import { lightPlot } from './plot-light.js';
import { fluxPlot } from './plots.js';
import { fluxColumns, viewRange } from './series.js';
import { nightsFor } from './view-station.js';
import { forecastSentence, reasonWords, sensorProblem, stationLabel } from './words.js';

/** @typedef {import('./app.js').App} App */
/** @typedef {import('./types.js').Rec} Rec */

/** @param {App} app */
export function renderMetabolism(app) {
  const now = app.nowMs();
  const transects = app.site.transects;
  const section = byId('metabolism');
  section.hidden = transects.length === 0;
  if (transects.length === 0) return;
  const id = app.selected.transect;
  const t = transects.find((x) => x.id === id) ?? transects[0];
  if (!t) return;
  byId('transect-chips').replaceChildren(
    ...transects.map((x) => {
      const b = el(
        'button',
        { type: 'button', class: 'chip', 'data-transect': x.id, 'aria-pressed': String(x.id === t.id) },
        x.label,
      );
      b.addEventListener('click', () => app.selectTransect(x.id));
      return b;
    }),
  );
  byId('transect-route').textContent =
    `${stationLabel(app.site, t.upstream)} → ${stationLabel(app.site, t.downstream)}, ${num(t.length_m)} m; flow from ${stationLabel(app.site, t.current)}`;
  const fields = app.site.record_types.flux?.fields ?? {};
  const unit = fields.ncp_mmol_m2_h?.unit ?? '';
  const s = app.store.seriesOf('flux', t.id)[0];
  const last = s?.r[s.r.length - 1];
  const nums = byId('flux-now');
  if (!last) nums.replaceChildren(el('p', { class: 'empty', text: 'No metabolism window computed yet.' }));
  else {
    const big = (
      /** @type {string} */ name,
      /** @type {string} */ what,
      /** @type {unknown} */ v,
      /** @type {unknown} */ sigma,
      /** @type {boolean} */ sig,
    ) =>
      el(
        'div',
        { class: 'big', 'data-field': name, 'data-significant': String(sig) },
        el('span', { class: 'k', text: `${name} · ${what}` }),
        el('span', { class: 'v', text: last.valid === true ? plusMinus(v, sigma) : '—' }),
        el('span', { class: 'u', text: unitText(unit) }),
        el('span', {
          class: 'sig',
          text:
            last.valid !== true ? '' : sig ? 'clearly different from zero' : 'not distinguishable from zero',
        }),
      );
    nums.replaceChildren(
      big(
        'NCP',
        'net production',
        last.ncp_mmol_m2_h,
        last.ncp_sigma_mmol_m2_h,
        last.ncp_significant === true,
      ),
      big(
        'NEC',
        'net calcification',
        last.nec_mmol_m2_h,
        last.nec_sigma_mmol_m2_h,
        last.nec_significant === true,
      ),
      el(
        'div',
        { class: 'window', 'data-valid': String(last.valid === true) },
        el('span', {
          class: 'k',
          text: `Latest window, ${app.clock.when(Date.parse(last.t), now)} (${ago(now - Date.parse(last.t))})`,
        }),
        el('span', {
          class: 'v',
          text:
            last.valid === true
              ? `valid · flow ${withUnit(last.u_m_s, 'm s-1', 'u_m_s')}, ${num(last.residence_min)} min over the transect`
              : `not valid: ${reasonWords(typeof last.invalid_reasons === 'string' ? last.invalid_reasons : '') || 'no reason given'}`,
        }),
      ),
    );
  }
  const range = viewRange(app.view, now);
  const data = fluxColumns(s ?? { t: [], r: [] }, range.fromMs, range.toMs, app.site.processing.window_min);
  const common = {
    clock: app.clock,
    syncKey: `transect-${t.id}`,
    height: app.narrow ? 190 : 220,
    nights: nightsFor(app, range),
    logbook: [],
    range,
    readout: byId('flux-readout'),
    onZoom: (/** @type {number} */ a, /** @type {number} */ b) => app.setRange(a, b),
    onReset: () => app.setPreset(app.lastPresetH),
  };
  const key = `flux|${t.id}`;
  const holder = byId('flux-plot');
  if (holder.dataset.transect !== t.id) {
    app.plots.get(holder.dataset.key ?? '')?.destroy();
    app.plots.delete(holder.dataset.key ?? '');
    holder.replaceChildren();
    holder.dataset.transect = t.id;
    holder.dataset.key = key;
  }
  const have = app.plots.get(key);
  if (!have || !have.update(data, common)) app.plots.set(key, fluxPlot(holder, { ...common, data, unit }));
  const invalid = data.invalid.length;
  holder.dataset.invalid = String(invalid);
  holder.dataset.windows = String(data.recs.length);
  byId('flux-invalid').textContent = invalid
    ? `Hatched: ${invalid} stretch${invalid > 1 ? 'es' : ''} of windows not valid (${[...new Set(data.invalid.flatMap((w) => w.reasons.split(',')))].map((r) => reasonWords(r)).join('; ')}). ${KEY}`
    : `Every window in this range is valid. ${KEY}`;
  renderDaily(app, t.id);
  renderLight(app, t.id, range);
}

const LIGHT_COLORS = { ncp: '#0f7b6c', nec: '#b8562a' };

/**
 * The transect's valid windows against their light with the newest fitted day's curve; NEC as well where
 * that day has a calcification curve.
 * @param {App} app
 * @param {string} transect
 * @param {{fromMs: number, toMs: number}} range
 */
function renderLight(app, transect, range) {
  const box = byId('light');
  const flux = app.store.seriesOf('flux', transect)[0] ?? { t: [], r: [] };
  const daily = latestFit(app.store.seriesOf('daily', transect)[0]?.r ?? []);
  box.hidden = flux.r.length === 0 && !daily;
  if (box.hidden) return;
  // The fitted day's windows, wherever the range shown is.
  if (daily) app.fetchFlux(transect, dayBounds(daily));
  const kinds = /** @type {('ncp' | 'nec')[]} */ (['ncp', 'nec']).filter(
    (k) => k === 'ncp' || (daily !== null && curveOf(daily, k) !== null),
  );
  const kind = kinds.includes(app.lightKind) ? app.lightKind : 'ncp';
  byId('light-kinds').replaceChildren(
    ...kinds.map((k) => {
      const b = el(
        'button',
        { type: 'button', class: 'chip', 'data-kind': k, 'aria-pressed': String(k === kind) },
        `${RESPONSES[k].name} against light`,
      );
      b.addEventListener('click', () => {
        app.lightKind = k;
        app.changed('view');
      });
      return b;
    }),
  );
  const r = RESPONSES[kind];
  const fluxFields = app.site.record_types.flux?.fields ?? {};
  const dailyFields = app.site.record_types.daily?.fields ?? {};
  const data = lightColumns(flux, daily, kind, range);
  byId('light-fit').textContent = daily
    ? fitSentence(daily, kind, dailyFields)
    : 'No day has a fitted light response yet: its windows are shown alone.';
  const holder = byId('light-plot');
  // What the plot draws, for a person inspecting the page and for the browser tests.
  holder.dataset.kind = kind;
  holder.dataset.day = daily ? String(daily.day) : '';
  for (const [k, field] of /** @type {const} */ ([
    ['amp', r.amp],
    ['ik', r.ik],
    ['intercept', r.intercept],
  ]))
    holder.dataset[k] = daily && data.curveParams ? String(daily[field]) : '';
  holder.dataset.dayWindows = String(data.dayCount);
  holder.dataset.otherWindows = String(data.otherCount);
  holder.dataset.last = data.lastMs === null ? '' : new Date(data.lastMs).toISOString();
  const dayLabel = daily ? String(daily.day) : 'the fitted day';
  byId('light-key').textContent =
    `Filled: the valid windows of ${dayLabel}, the day the curve is fitted to; hollow: other valid windows in ` +
    `the range shown. Dotted: zero and Ik, the light at which ${kind === 'ncp' ? 'production' : 'calcification'} nears saturation.`;
  const opts = {
    data,
    name: r.name,
    color: LIGHT_COLORS[kind],
    parUnit: fluxFields.par_umol_m2_s?.unit ?? '',
    rateUnit: fluxFields[r.rate]?.unit ?? '',
    dayLabel,
    height: app.narrow ? 220 : 260,
    clock: app.clock,
    nowMs: app.nowMs(),
    readout: byId('light-readout'),
  };
  const key = `light|${transect}|${kind}`;
  if (holder.dataset.key !== key) {
    app.plots.get(holder.dataset.key ?? '')?.destroy();
    app.plots.delete(holder.dataset.key ?? '');
    holder.replaceChildren();
    holder.dataset.key = key;
  }
  const have = app.plots.get(key);
  if (!have || !have.update(data, opts)) app.plots.set(key, lightPlot(holder, opts));
}

/**
 * Daily budgets of the transect (records of type `daily`), newest first.
 * @param {App} app
 * @param {string} transect
 */
function renderDaily(app, transect) {
  const box = byId('daily');
  const s = app.store.seriesOf('daily', transect)[0];
  box.hidden = !s || s.r.length === 0;
  if (!s) return;
  const f = app.site.record_types.daily?.fields ?? {};
  const u = unitText(f.ncp_mmol_m2_d?.unit ?? '');
  const cell = (/** @type {Rec} */ r, /** @type {string} */ k) =>
    el('td', { text: plusMinus(r[k], r[`${k}_sigma`]) });
  const rows = [...s.r]
    .reverse()
    .slice(0, 14)
    .map((r) =>
      el(
        'tr',
        { 'data-valid': String(r.valid === true) },
        el('th', { scope: 'row', text: String(r.day ?? '') }),
        cell(r, 'ncp_mmol_m2_d'),
        cell(r, 'r_mmol_m2_d'),
        cell(r, 'gpp_mmol_m2_d'),
        cell(r, 'nec_mmol_m2_d'),
        el('td', {
          text: `${pct(r.coverage)}${typeof r.gap_filled === 'number' && r.gap_filled > 0 ? ` (${pct(r.gap_filled)} filled)` : ''}${r.valid === true ? '' : ' · not valid'}`,
        }),
      ),
    );
  byId('daily-body').replaceChildren(...rows);
  byId('daily-unit').textContent = `per local day, ${u}; measured share of the day`;
}

const KEY =
  'Green: NCP, orange: NEC, each with its ±1σ band; a filled dot is clearly different from zero (more than 2σ), a hollow one is not.';

/**
 * A value and its uncertainty with the value's decimals: '17.0 ± 9.0'.
 * @param {unknown} v
 * @param {unknown} s
 */
function plusMinus(v, s) {
  if (typeof v !== 'number' || !Number.isFinite(v)) return '—';
  const dp = decimals(v);
  return `${v.toFixed(dp).replace('-', '−')}${typeof s === 'number' && Number.isFinite(s) ? ` ± ${s.toFixed(dp)}` : ''}`;
}

/** @param {unknown} f a fraction */
const pct = (f) => (typeof f === 'number' && Number.isFinite(f) ? `${Math.round(f * 100)} %` : '—');

/** @param {App} app */
export function renderTonight(app) {
  const now = app.nowMs();
  const rule = app.site.rules.find((r) => r.id === 'low_oxygen');
  const forecasts = app.store
    .latestOfType('forecast')
    .filter(
      (f) =>
        typeof f.t_min === 'string' &&
        Date.parse(f.t_min) > now - 3_600_000 &&
        now - Date.parse(f.t) < 14 * 3_600_000,
    );
  const box = byId('tonight');
  box.hidden = forecasts.length === 0;
  byId('tonight-list').replaceChildren(
    ...forecasts.map((f) => {
      const below = rule && typeof f.o2_min_mg_l === 'number' && f.o2_min_mg_l < rule.limit;
      return el(
        'li',
        { 'data-level': below ? 'watch' : 'ok' },
        el('strong', { text: stationLabel(app.site, String(f.station)) }),
        ' ',
        forecastSentence(f, app.clock, now),
        rule ? ` The site's limit is ${withUnit(rule.limit, rule.unit, 'o2_mg_l')}.` : '',
        el('span', { class: 'issued', text: ` Issued ${app.clock.when(Date.parse(f.t), now)}.` }),
      );
    }),
  );
}

/**
 * The weather mast: its sensors' state, and its readings when the daemon publishes them as records.
 * @param {App} app
 */
export function renderMast(app) {
  const now = app.nowMs();
  const mastSensors = (app.sensors?.sensors ?? []).filter((s) => s.kind === 'met');
  const box = byId('mast');
  box.hidden = mastSensors.length === 0;
  const met = app.store.latestOfType('met');
  byId('mast-body').replaceChildren(
    ...mastSensors.map((s) =>
      el(
        'div',
        { class: 'mast-sensor', 'data-state': s.state },
        el('strong', { text: `${s.label} at ${stationLabel(app.site, s.station)}` }),
        el('span', { text: s.state === 'ok' ? 'working' : sensorProblem(s, app.clock, now) }),
        el('span', {
          text: s.last_seen
            ? `last message ${app.clock.when(Date.parse(s.last_seen), now)} (${ago(now - Date.parse(s.last_seen))})`
            : 'no message yet',
        }),
        el('span', { text: s.battery_v !== null ? `supply ${withUnit(s.battery_v, 'V', 'battery_v')}` : '' }),
      ),
    ),
    met.length
      ? el(
          'ul',
          { class: 'mast-values' },
          ...Object.entries(app.site.record_types.met?.fields ?? {})
            .filter(([, f]) => f.kind === 'number')
            .map(([k, f]) => el('li', { text: `${f.label}: ${withUnit(met[0]?.[k], f.unit, k)}` })),
        )
      : el('p', {
          class: 'note',
          text: 'Wind, air pressure and air temperature from the mast feed the air–sea exchange of the metabolism; the daemon does not publish them as records yet, so they are not plotted here.',
        }),
  );
}
