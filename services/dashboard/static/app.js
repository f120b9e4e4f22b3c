// @ts-check
// reefd dashboard: loads the site, the recent history, the alerts and the sensors, follows the daemon's
// server-sent events, and asks /api/records for any other range the person looks at. Plain modules, no
// framework, no build step; the logic lives in DOM-free modules (format, sun, verdicts, series).
import { byId } from './dom.js';
import { siteClock } from './format.js';
import { drawMap } from './map.js';
import { viewRange } from './series.js';
import { RecordStore } from './store.js';
import { computeReef, renderAlerts, renderClock, renderVerdicts } from './view-top.js';
import { renderMast, renderMetabolism, renderTonight } from './view-metabolism.js';
import { renderSensors } from './view-sensors.js';
import { PRESETS_H, renderRangeControls, renderStation, renderStationChips } from './view-station.js';

/** @typedef {import('./types.js').SiteInfo} SiteInfo */
/** @typedef {import('./types.js').AlertView} AlertView */
/** @typedef {import('./types.js').SensorsBody} SensorsBody */
/** @typedef {import('./types.js').FieldLog} FieldLog */
/** @typedef {import('./types.js').HistoryBody} HistoryBody */
/** @typedef {import('./types.js').Rec} Rec */
/** @typedef {{update(data: any, next: any): boolean, destroy(): void}} PlotHandle */
/** @typedef {'records' | 'alerts' | 'sensors' | 'view' | 'station' | 'clock'} Change */

/**
 * @typedef {{
 *   site: SiteInfo, clock: import('./format.js').SiteClock, store: RecordStore, alerts: Map<string, AlertView>,
 *   sensors: SensorsBody | null, fieldLog: FieldLog, selected: {station: string, transect: string},
 *   view: {presetH: number | null, fromMs: number, toMs: number}, lastPresetH: number,
 *   plots: Map<string, PlotHandle>, map: ReturnType<typeof drawMap> | null, narrow: boolean,
 *   focusSensor: string | null, fetched: Map<string, {fromMs: number, toMs: number}>, lightKind: 'ncp' | 'nec',
 *   fetchFlux(transect: string, range: {fromMs: number, toMs: number}): void,
 *   nowMs(): number, api(path: string, init?: RequestInit): Promise<unknown>, changed(what: Change): void,
 *   selectStation(id: string, scroll: boolean): void, selectTransect(id: string): void,
 *   setRange(fromMs: number, toMs: number): void, setPreset(h: number): void
 * }} App
 */

const token = new URL(location.href).searchParams.get('token');
/** @param {string} path */
const withToken = (path) =>
  token ? `${path}${path.includes('?') ? '&' : '?'}token=${encodeURIComponent(token)}` : path;

/**
 * @param {string} path
 * @param {RequestInit} [init]
 */
async function api(path, init = {}) {
  const res = await fetch(withToken(path), init);
  const body = await res.json().catch(() => ({}));
  if (!res.ok)
    throw new Error(/** @type {{message?: string}} */ (body).message ?? `${path}: HTTP ${res.status}`);
  return body;
}

/** @type {Set<Change>} */
const dirty = new Set();
let frame = 0;
/** @type {App} */
let app;

function render() {
  frame = 0;
  const what = new Set(dirty);
  dirty.clear();
  const reef = computeReef(app);
  renderClock(app);
  renderVerdicts(app, reef);
  if (what.has('alerts')) renderAlerts(app);
  renderStationChips(app, reef.byStation);
  if (what.has('records') || what.has('view') || what.has('station') || what.has('sensors')) {
    renderRangeControls(app);
    renderStation(app, reef);
    renderMetabolism(app);
    renderTonight(app);
  }
  if (what.has('sensors')) {
    renderSensors(app);
    renderMast(app);
  }
}

/**
 * Fetches the records of the range shown for the selected station and transect, once per range.
 * @param {string} key 'station:<id>' or 'transect:<id>'
 * @param {string} query
 * @param {{fromMs: number, toMs: number}} [range] default the range shown
 * @param {boolean} [quiet] say nothing in the range's status line (a table's own fetch)
 */
async function ensureRange(key, query, range = viewRange(app.view, app.nowMs()), quiet = false) {
  const r = range;
  const have = app.fetched.get(key);
  if (have && have.fromMs <= r.fromMs && have.toMs >= Math.min(r.toMs, app.nowMs())) return;
  // The same range asked again while its answer is on the way is not asked twice.
  const asking = `${key} ${r.fromMs} ${r.toMs}`;
  if (pending.has(asking)) return;
  pending.add(asking);
  try {
    await fetchRange(key, query, r, have, quiet);
  } finally {
    pending.delete(asking);
  }
}

/** @type {Set<string>} */
const pending = new Set();

/**
 * @param {string} key
 * @param {string} query
 * @param {{fromMs: number, toMs: number}} r
 * @param {{fromMs: number, toMs: number} | undefined} have
 * @param {boolean} quiet
 */
async function fetchRange(key, query, r, have, quiet) {
  const status = quiet ? document.createElement('p') : byId('range-status');
  status.textContent = 'Loading the records of this range…';
  let cursor = '';
  let n = 0;
  let source = '';
  try {
    for (let page = 0; page < 20; page++) {
      const body = /** @type {{records: Rec[], next_cursor: string | null, source: string}} */ (
        await api(
          `/api/records?${query}&from=${new Date(r.fromMs).toISOString()}&to=${new Date(r.toMs).toISOString()}&limit=5000${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`,
        )
      );
      app.store.add(body.records);
      n += body.records.length;
      source = body.source;
      if (!body.next_cursor) break;
      cursor = body.next_cursor;
    }
    app.fetched.set(
      key,
      have && have.toMs >= r.fromMs && have.fromMs <= r.toMs
        ? { fromMs: Math.min(have.fromMs, r.fromMs), toMs: Math.max(have.toMs, r.toMs) }
        : { fromMs: r.fromMs, toMs: r.toMs },
    );
    status.textContent = `${n.toLocaleString('en')} records from ${source}`;
    app.changed('records');
  } catch (err) {
    status.textContent = `Could not load this range: ${/** @type {Error} */ (err).message}`;
  }
}

function ensureRanges() {
  void ensureRange(`station:${app.selected.station}`, `station=${encodeURIComponent(app.selected.station)}`);
  if (app.selected.transect)
    void ensureRange(
      `transect:${app.selected.transect}`,
      `transect=${encodeURIComponent(app.selected.transect)}&type=flux`,
    );
  // The daily budgets table lists the last fortnight whatever range the plots show.
  const now = app.nowMs();
  for (const t of app.site.transects)
    void ensureRange(
      `daily:${t.id}`,
      `transect=${encodeURIComponent(t.id)}&type=daily`,
      {
        fromMs: now - 15 * 86_400_000,
        toMs: now + 60_000,
      },
      true,
    );
}

/**
 * True for the records whose whole series the page keeps: the station and transect shown, and the site-wide
 * series the panels read (light for the night, forecasts, daily budgets).
 * @param {Rec} r
 */
function keepSeries(r) {
  if (!app) return true;
  if (r.type === 'light' || r.type === 'forecast' || r.type === 'daily') return true;
  return r.station === app.selected.station || r.transect === app.selected.transect;
}

/**
 * The dashboard's recent history of one place, for its plots (the ranges beyond come from /api/records).
 * @param {string} query
 */
async function loadPlace(query) {
  const body = /** @type {HistoryBody} */ (await api(`/api/history?part=records&${query}`));
  app.store.add(/** @type {Rec[]} */ (body.records));
  app.changed('records');
}

async function refreshSensors() {
  try {
    app.sensors = /** @type {SensorsBody} */ (await api('/api/sensors'));
    app.changed('sensors');
  } catch (err) {
    console.error(err);
  }
}

function connect() {
  const live = byId('live');
  const es = new EventSource(withToken('/api/events'));
  es.addEventListener('open', () => {
    live.dataset.state = 'live';
    live.textContent = 'live';
  });
  es.addEventListener('error', () => {
    live.dataset.state = 'down';
    live.textContent = 'reconnecting…';
  });
  es.addEventListener('records', (e) => {
    app.store.add(JSON.parse(/** @type {MessageEvent} */ (e).data));
    app.changed('records');
  });
  let sensorsTimer = 0;
  es.addEventListener('alert', (e) => {
    const a = /** @type {AlertView} */ (JSON.parse(/** @type {MessageEvent} */ (e).data));
    app.alerts.set(a.id, a);
    app.changed('alerts');
    // A fault changes a sensor's state: read the sensors again (once for a burst of alerts).
    clearTimeout(sensorsTimer);
    sensorsTimer = setTimeout(() => void refreshSensors(), 300);
  });
  es.addEventListener('notice', (e) => {
    const n = JSON.parse(/** @type {MessageEvent} */ (e).data);
    const box = byId('notice');
    box.hidden = false;
    box.textContent = `${n.title}${n.body ? ` — ${n.body.split('\n')[0]}` : ''}`;
  });
}

async function start() {
  const site = /** @type {SiteInfo} */ (await api('/api/site'));
  const [history, alerts, sensors, fieldLog] = await Promise.all([
    /** @type {Promise<HistoryBody>} */ (api('/api/history?part=latest')),
    /** @type {Promise<{alerts: AlertView[]}>} */ (api('/api/alerts')),
    /** @type {Promise<SensorsBody>} */ (api('/api/sensors')),
    /** @type {Promise<FieldLog>} */ (api('/api/fieldlog')),
  ]);
  // Whole series for the station and transect shown (and the small site-wide ones); the newest of the rest.
  const store = new RecordStore(20_000, (r) => keepSeries(r));
  store.add(/** @type {Rec[]} */ (history.latest));
  const narrow = matchMedia('(max-width: 720px)').matches;
  app = {
    site,
    clock: siteClock(site.timezone),
    store,
    alerts: new Map(alerts.alerts.map((a) => [a.id, a])),
    sensors,
    fieldLog,
    selected: { station: site.stations[0]?.id ?? '', transect: site.transects[0]?.id ?? '' },
    view: { presetH: 24, fromMs: 0, toMs: 0 },
    lastPresetH: 24,
    plots: new Map(),
    map: null,
    narrow,
    focusSensor: null,
    fetched: new Map(),
    lightKind: 'ncp',
    fetchFlux(transect, range) {
      // A key of its own: the fitted day's windows are kept apart from the range shown.
      void ensureRange(
        `lightday:${transect}`,
        `transect=${encodeURIComponent(transect)}&type=flux`,
        range,
        true,
      );
    },
    nowMs() {
      // The wall clock, or the data's own time when it is far from it (a replayed or stopped site).
      const now = Date.now();
      return store.latestMs > 0 && Math.abs(now - store.latestMs) > 2 * 3_600_000 ? store.latestMs : now;
    },
    api,
    changed(what) {
      dirty.add(what);
      if (!frame) frame = requestAnimationFrame(render);
    },
    selectStation(id, scroll) {
      if (app.selected.station !== id) {
        app.selected.station = id;
        app.store.prune();
        app.changed('station');
        void loadPlace(`station=${encodeURIComponent(id)}`);
        ensureRanges();
      }
      if (scroll) byId('stations').scrollIntoView({ block: 'start' });
    },
    selectTransect(id) {
      app.selected.transect = id;
      app.store.prune();
      app.changed('station');
      void loadPlace(`transect=${encodeURIComponent(id)}`);
      ensureRanges();
    },
    setRange(fromMs, toMs) {
      app.view = { presetH: null, fromMs, toMs };
      app.changed('view');
      ensureRanges();
    },
    setPreset(h) {
      app.view = { presetH: h, fromMs: 0, toMs: 0 };
      app.lastPresetH = h;
      app.changed('view');
      ensureRanges();
    },
  };
  const fromHash = /station=([^&]+)/.exec(location.hash)?.[1];
  const reef = computeReef(app);
  app.selected.station =
    fromHash && site.stations.some((s) => s.id === fromHash)
      ? fromHash
      : (reef.station ?? app.selected.station);
  byId('site-name').textContent = site.site;
  document.title = `${site.site} · reefd`;
  const mapNode = /** @type {SVGSVGElement} */ (/** @type {unknown} */ (byId('map')));
  app.map = drawMap(mapNode, site, (id) => app.selectStation(id, false), narrow);
  wireControls();
  await Promise.all([
    loadPlace(`station=${encodeURIComponent(app.selected.station)}`),
    app.selected.transect ? loadPlace(`transect=${encodeURIComponent(app.selected.transect)}`) : undefined,
    loadPlace('type=light,forecast,daily'),
  ]);
  for (const w of /** @type {Change[]} */ (['alerts', 'sensors', 'records', 'station'])) dirty.add(w);
  render();
  connect();
  ensureRanges();
  setInterval(() => app.changed('clock'), 30_000);
  setInterval(() => void refreshSensors(), 30_000);
  document.body.dataset.ready = 'true';
}

function wireControls() {
  const range = byId('range');
  for (const h of PRESETS_H) {
    const b = document.createElement('button');
    b.type = 'button';
    b.dataset.preset = String(h);
    b.textContent = h < 48 ? `${h} h` : `${h / 24} d`;
    b.addEventListener('click', () => app.setPreset(h));
    range.insertBefore(b, byId('range-later'));
  }
  const shift = (/** @type {number} */ f) => {
    const r = viewRange(app.view, app.nowMs());
    const w = r.toMs - r.fromMs;
    const from = Math.min(r.fromMs + f * w, app.nowMs() + 60_000 - w);
    app.setRange(from, from + w);
  };
  byId('range-earlier').addEventListener('click', () => shift(-0.5));
  byId('range-later').addEventListener('click', () => shift(0.5));
  byId('reef-go').addEventListener('click', (e) => {
    e.preventDefault();
    const id = /** @type {HTMLElement} */ (e.currentTarget).dataset.station;
    if (id) app.selectStation(id, true);
  });
  byId('inst-go').addEventListener('click', (e) => {
    e.preventDefault();
    app.focusSensor = /** @type {HTMLElement} */ (e.currentTarget).dataset.sensor || null;
    if (!app.focusSensor) byId('sensors').scrollIntoView({ block: 'start' });
    app.changed('sensors');
  });
}

start().catch((/** @type {Error} */ err) => {
  const live = document.getElementById('live');
  if (live) {
    live.textContent = `failed to load: ${err.message}`;
    live.dataset.state = 'down';
  }
  console.error(err);
});
