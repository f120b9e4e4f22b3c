// @ts-check
// One station at a time: its condition against the site's limits, every quantity it measures as a plot
// (linked cursors, shared range, night shading, limits, flags, field-log markers), and the time range
// controls (presets, pan, drag to zoom, any range the daemon kept through /api/records).
import { el, byId } from './dom.js';
import { ago, capitalise, unitText, withUnit } from './format.js';
import { quantityPlot } from './plots.js';
import {
  limitsFor,
  observedNear,
  plotColumns,
  POINTS_ONLY,
  rangeWithForecast,
  stationForecast,
  stationGroups,
  viewRange,
} from './series.js';
import { nightIntervals } from './sun.js';
import { LEVEL_RANK, STATE_RANK } from './verdicts.js';
import { forecastLine } from './words.js';

/** @typedef {import('./app.js').App} App */

const COLORS = /** @type {Record<string, string>} */ ({
  o2_mg_l: '#0b6e8a',
  o2_sat_pct: '#3f86a8',
  temp_c: '#b03a2e',
  sal: '#6d4c9f',
  pco2_uatm: '#a8481f',
  omega_ar: '#5a3fa3',
  ph_total: '#7a5d12',
  depth_m: '#24548a',
  hm0_m: '#1b4965',
  tp_s: '#4f7186',
  speed_m_s: '#2d7a4b',
  dir_to_deg: '#2d7a4b',
  par_umol_m2_s: '#b58900',
});

export const PRESETS_H = [6, 24, 48, 24 * 7, 24 * 30];
/** @param {number} h */
const presetText = (h) => (h < 48 ? `${h} h` : `${h / 24} d`);

/**
 * The centre of the site for the sun (its latitude setting, the stations' mean position).
 * @param {App} app
 * @returns {{lat: number, lon: number} | null}
 */
export function siteWhere(app) {
  const pos = app.site.stations.map((s) => s.position).filter((p) => p !== null);
  if (pos.length === 0) return null;
  const lon = pos.reduce((a, p) => a + /** @type {{lon: number}} */ (p).lon, 0) / pos.length;
  const lat =
    app.site.latitude_deg ?? pos.reduce((a, p) => a + /** @type {{lat: number}} */ (p).lat, 0) / pos.length;
  return { lat, lon };
}

/**
 * Night intervals for the range shown, from the site's light records where they exist.
 * @param {App} app
 * @param {{fromMs: number, toMs: number}} r
 */
export function nightsFor(app, r) {
  const light = app.store.latestOfType('light').length
    ? app.store
        .seriesOf('light', /** @type {string} */ (app.store.latestOfType('light')[0]?.station))
        .flatMap((s) => s.r)
        .map((x) => ({ t: x.t, par_umol_m2_s: typeof x.par_umol_m2_s === 'number' ? x.par_umol_m2_s : null }))
    : [];
  return nightIntervals(r.fromMs, r.toMs, siteWhere(app), light);
}

/** @param {App} app */
export function renderRangeControls(app) {
  const box = byId('range');
  const r = viewRange(app.view, app.nowMs());
  const label =
    app.view.presetH !== null
      ? `last ${presetText(app.view.presetH)}`
      : `${app.clock.dayTime(r.fromMs)} – ${app.clock.dayTime(r.toMs)}`;
  byId('range-label').textContent = `${label} · site time`;
  for (const b of box.querySelectorAll('button[data-preset]'))
    b.setAttribute(
      'aria-pressed',
      String(Number(/** @type {HTMLElement} */ (b).dataset.preset) === app.view.presetH),
    );
}

/**
 * The station picker: a chip per station, coloured like the map.
 * @param {App} app
 * @param {Map<string, import('./verdicts.js').Level>} reefBy
 */
export function renderStationChips(app, reefBy) {
  const worstSensor = worstSensorByStation(app);
  const chips = app.site.stations.map((s) => {
    const b = el(
      'button',
      {
        type: 'button',
        class: 'chip',
        'data-station': s.id,
        'data-reef': reefBy.get(s.id) ?? 'unknown',
        'data-instruments': worstSensor.get(s.id) ?? 'unknown',
        'aria-pressed': String(s.id === app.selected.station),
      },
      el('span', { class: 'dot', 'aria-hidden': 'true' }),
      s.label,
    );
    b.addEventListener('click', () => app.selectStation(s.id, false));
    return b;
  });
  byId('station-chips').replaceChildren(...chips);
  for (const s of app.site.stations)
    app.map?.paint(
      s.id,
      reefBy.get(s.id) ?? 'unknown',
      worstSensor.get(s.id) ?? 'unknown',
      s.id === app.selected.station,
    );
}

/** @param {App} app */
function worstSensorByStation(app) {
  /** @type {Map<string, import('./types.js').SensorState>} */
  const out = new Map();
  for (const s of app.sensors?.sensors ?? []) {
    const have = out.get(s.station);
    if (!have || STATE_RANK[s.state] > STATE_RANK[have]) out.set(s.station, s.state);
  }
  return out;
}

/**
 * The selected station: its condition and its plots (rebuilt when the station changes, updated otherwise).
 * @param {App} app
 * @param {ReturnType<typeof import('./verdicts.js').reefVerdict>} reef
 */
export function renderStation(app, reef) {
  const id = app.selected.station;
  const st = app.site.stations.find((s) => s.id === id);
  if (!st) return;
  renderStationStatus(app, st, reef);
  renderStationPlots(app, id);
}

/**
 * The station's name and one line: its condition against the site's limits, its sensors, its last update.
 * @param {App} app
 * @param {import('./types.js').SiteStation} st
 * @param {ReturnType<typeof import('./verdicts.js').reefVerdict>} reef
 */
function renderStationStatus(app, st, reef) {
  const id = st.id;
  const now = app.nowMs();
  const findings = reef.findings
    .filter((f) => f.station === id)
    .sort((a, b) => LEVEL_RANK[b.level] - LEVEL_RANK[a.level]);
  const level = findings[0]?.level ?? 'unknown';
  byId('station-title').textContent = st.label;
  const status = byId('station-status');
  status.dataset.level = level;
  const problems = (app.sensors?.sensors ?? []).filter(
    (s) => s.station === id && s.state !== 'ok' && s.state !== 'disabled',
  );
  const newest = Math.max(
    0,
    ...app.store
      .seriesOf('oxygen', id)
      .concat(
        app.store.seriesOf('carbonate', id),
        app.store.seriesOf('waves', id),
        app.store.seriesOf('current', id),
      )
      .map((s) => s.t[s.t.length - 1] ?? 0),
  );
  status.textContent = [
    findings.length === 0
      ? 'no limits apply here'
      : level === 'ok'
        ? "within the site's limits"
        : level === 'unknown'
          ? 'no recent values'
          : findings[0] && `${findings[0].rule.label} ${level === 'alarm' ? 'beyond' : 'near'} the limit`,
    problems.length
      ? `${problems.length} sensor${problems.length > 1 ? 's' : ''} to look at: ${problems.map((p) => p.label).join(', ')}`
      : 'sensors working',
    newest ? `updated ${ago(now - newest)}` : 'no data yet',
  ]
    .filter(Boolean)
    .join(' · ');
}

/**
 * Every quantity the station measures, in groups, over the range shown (rebuilt when the station changes,
 * updated in place otherwise).
 * @param {App} app
 * @param {string} id
 */
function renderStationPlots(app, id) {
  const now = app.nowMs();
  const shown = viewRange(app.view, now);
  // Tonight's forecast of the station, and the range reaching on to its expected minimum while it is ahead.
  const forecast = stationForecast(app.store.seriesOf('forecast', id)[0]?.r ?? [], shown);
  const range = rangeWithForecast(shown, forecast, app.view.presetH !== null);
  const nights = nightsFor(app, range);
  const logbook = app.fieldLog.logbook.filter((e) => e.station === id);
  const box = byId('station-groups');
  box.dataset.nights = nights
    .map(([a, b]) => `${new Date(a).toISOString()}/${new Date(b).toISOString()}`)
    .join(' ');
  if (box.dataset.station !== id) {
    // The plots of the station shown before go; the metabolism's stay.
    for (const [key, p] of app.plots)
      if (key.startsWith(`${box.dataset.station}|`)) {
        p.destroy();
        app.plots.delete(key);
      }
    box.replaceChildren();
    box.dataset.station = id;
  }
  const groups = stationGroups(app.site, id, app.store);
  if (groups.length === 0 && !box.querySelector('.empty'))
    box.replaceChildren(
      el('p', {
        class: 'empty',
        text: 'This station reports no quantity the dashboard plots (see its sensors below).',
      }),
    );
  groups.forEach((g, gi) => {
    let details = /** @type {HTMLDetailsElement | null} */ (
      box.querySelector(`details[data-group="${CSS.escape(g.group)}"]`)
    );
    if (!details) {
      details = el(
        'details',
        { class: 'group', 'data-group': g.group, open: gi === 0 || !app.narrow },
        el('summary', { text: g.group }),
        el('div', { class: 'plots' }),
      );
      box.append(details);
    }
    const holder = /** @type {HTMLElement} */ (details.querySelector('.plots'));
    for (const item of g.items) {
      const key = `${id}|${item.type}|${item.field}`;
      const spec = app.site.record_types[item.type]?.fields[item.field];
      if (!spec) continue;
      const series = app.store.seriesOf(item.type, id);
      const data = plotColumns(series, item.field, range.fromMs, range.toMs);
      const limits = limitsFor(app.site, item.type, item.field, id);
      const latest = series
        .map((s) => s.r[s.r.length - 1])
        .filter(Boolean)
        .sort((a, b) => (/** @type {{t: string}} */ (b).t < /** @type {{t: string}} */ (a).t ? -1 : 1))[0];
      let card = /** @type {HTMLElement | null} */ (
        holder.querySelector(`[data-plot="${item.type}.${item.field}"]`)
      );
      if (!card) {
        card = el(
          'figure',
          { class: 'plot-card', 'data-plot': `${item.type}.${item.field}` },
          el(
            'figcaption',
            {},
            el('span', { class: 'name', text: capitalise(spec.label) }),
            el('span', { class: 'unit', text: unitText(spec.unit) }),
            el('span', { class: 'now' }),
          ),
          el('div', { class: 'readout', 'aria-live': 'off' }),
          el('div', { class: 'plot' }),
        );
        holder.append(card);
      }
      const nowEl = /** @type {HTMLElement} */ (card.querySelector('.now'));
      const f = latest && typeof latest.flag === 'number' ? latest.flag : 1;
      nowEl.textContent = latest ? withUnit(latest[item.field], spec.unit, item.field) : '—';
      nowEl.dataset.flag = String(f);
      const beyond =
        latest &&
        limits.some(
          (r) =>
            typeof latest[item.field] === 'number' &&
            (r.dir === 'below'
              ? /** @type {number} */ (latest[item.field]) < r.limit
              : /** @type {number} */ (latest[item.field]) > r.limit),
        );
      card.dataset.beyond = String(Boolean(beyond));
      // What the plot holds, for a person inspecting the page and for the browser tests.
      card.dataset.points = String(data.xs.length);
      card.dataset.first = data.xs.length
        ? new Date(/** @type {number} */ (data.xs[0]) * 1000).toISOString()
        : '';
      card.dataset.suspect = String(data.marks.filter((m) => m.flag === 3).length);
      card.dataset.failed = String(data.marks.filter((m) => m.flag === 4).length);
      card.dataset.limits = limits.map((r) => r.limit).join(',');
      const common = {
        clock: app.clock,
        syncKey: `station-${id}`,
        height: app.narrow ? 130 : 150,
        nights,
        logbook,
        range,
        readout: /** @type {HTMLElement} */ (card.querySelector('.readout')),
        onZoom: (/** @type {number} */ a, /** @type {number} */ b) => app.setRange(a, b),
        onReset: () => app.setPreset(app.lastPresetH),
      };
      const mark = item.type === 'oxygen' && item.field === 'o2_mg_l' ? forecast : null;
      if (item.type === 'oxygen' && item.field === 'o2_mg_l')
        renderForecastLine(app, card, mark, series, now);
      const have = app.plots.get(key);
      if (have && have.update(data, { ...common, limits, forecast: mark })) continue;
      have?.destroy();
      const node = /** @type {HTMLElement} */ (card.querySelector('.plot'));
      node.replaceChildren();
      app.plots.set(
        key,
        quantityPlot(node, {
          ...common,
          field: item.field,
          label: spec.label,
          unit: spec.unit,
          color: COLORS[item.field] ?? '#1b4965',
          pointsOnly: POINTS_ONLY.has(item.field),
          data,
          limits,
          forecast: mark,
        }),
      );
    }
  });
}

/**
 * The forecast's line on the oxygen plot, with what it shows as data attributes (for a person inspecting the
 * page and the browser tests).
 * @param {App} app
 * @param {HTMLElement} card
 * @param {import('./series.js').ForecastMark | null} mark
 * @param {{t: number[], r: import('./types.js').Rec[]}[]} series the station's oxygen
 * @param {number} now
 */
function renderForecastLine(app, card, mark, series, now) {
  let line = /** @type {HTMLElement | null} */ (card.querySelector('.forecast-line'));
  if (!line) {
    line = el('div', { class: 'forecast-line' });
    card.querySelector('.readout')?.after(line);
  }
  line.hidden = !mark;
  if (!mark) {
    for (const k of ['min', 'lo', 'hi', 'tMin', 'issued']) delete line.dataset[k];
    return;
  }
  const unit = app.site.record_types.forecast?.fields.o2_min_mg_l?.unit ?? '';
  // The water's reading nearest the expected minimum, within half an hour.
  const observed = observedNear(series, 'o2_mg_l', mark.tMinS * 1000, 1_800_000);
  line.textContent = forecastLine(mark, observed, unit, app.clock, now);
  line.dataset.min = String(mark.rec.o2_min_mg_l);
  line.dataset.lo = String(mark.rec.o2_min_lo_mg_l);
  line.dataset.hi = String(mark.rec.o2_min_hi_mg_l);
  line.dataset.tMin = String(mark.rec.t_min);
  line.dataset.issued = mark.rec.t;
}
