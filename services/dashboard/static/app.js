// reefd dashboard: loads the site, the last 48 h of derived records, alerts and sensor health, then follows
// the daemon's server-sent events. Plain modules, no framework, no build step.
import { fluxPlot, linePlot } from './charts.js';
import { age, dateTimeUtc, el, fmt, freshness, METRICS, timeUtc } from './format.js';
import { drawMap, paintStation } from './map.js';

const token = new URL(location.href).searchParams.get('token');
const withToken = (path) =>
  token ? `${path}${path.includes('?') ? '&' : '?'}token=${encodeURIComponent(token)}` : path;
const headers = token ? { authorization: `Bearer ${token}` } : {};
const api = async (path, init = {}) => {
  const res = await fetch(path, { ...init, headers: { ...headers, ...(init.headers ?? {}) } });
  if (!res.ok) throw new Error(`${path}: HTTP ${res.status}`);
  return res.json();
};

const state = {
  site: null,
  series: new Map(), // `${type}|${station or transect}` -> records sorted by time
  alerts: new Map(),
  health: [],
  latestMs: 0,
  mapGroups: {},
  plots: new Map(),
  dirty: false,
};

const WINDOW_MS = 48 * 3600_000;
const whereOf = (r) => (r.type === 'flux' ? r.transect : (r.station ?? ''));

function addRecords(records) {
  for (const r of records) {
    const tMs = Date.parse(r.t);
    if (!Number.isFinite(tMs)) continue;
    if (tMs > state.latestMs) state.latestMs = tMs;
    if (r.type === 'alert') continue;
    const key = `${r.type}|${whereOf(r)}`;
    let list = state.series.get(key);
    if (!list) state.series.set(key, (list = []));
    if (list.length && Date.parse(list[list.length - 1].t) > tMs) {
      list.push(r);
      list.sort((a, b) => Date.parse(a.t) - Date.parse(b.t));
    } else list.push(r);
  }
  const cutoff = state.latestMs - WINDOW_MS;
  for (const list of state.series.values()) {
    let n = 0;
    while (n < list.length && Date.parse(list[n].t) < cutoff) n++;
    if (n) list.splice(0, n);
  }
}

const refNow = () => (Math.abs(Date.now() - state.latestMs) < 2 * 3600_000 ? Date.now() : state.latestMs);
const last = (type, where) => {
  const l = state.series.get(`${type}|${where}`);
  return l && l.length ? l[l.length - 1] : undefined;
};

function metricSeries(m, station) {
  const list = state.series.get(`${m.type}|${station}`) ?? [];
  const xs = [];
  const ys = [];
  for (const r of list) {
    const v = r[m.key];
    xs.push(Date.parse(r.t) / 1000);
    ys.push(typeof v === 'number' && Number.isFinite(v) ? v : null);
  }
  return [xs, ys];
}

function activeFaults(station) {
  return [...state.alerts.values()].filter((a) => a.station === station && a.state === 'raised');
}

function stationStatus(s) {
  let lastMs = -Infinity;
  let qc = 9;
  for (const type of ['carbonate', 'oxygen', 'waves', 'current']) {
    const r = last(type, s.id);
    if (!r) continue;
    lastMs = Math.max(lastMs, Date.parse(r.t));
    const f = typeof r.flag === 'number' ? r.flag : 1;
    qc = qc === 9 ? f : Math.max(qc === 2 ? 1 : qc, f === 2 ? 1 : f);
  }
  const raised = activeFaults(s.id);
  if (raised.length && qc !== 9) qc = Math.max(qc, raised.some((a) => a.class === 'fault') ? 3 : qc);
  const h = state.health.filter((x) => x.station === s.id && x.last_seen);
  for (const x of h) lastMs = Math.max(lastMs, Date.parse(x.last_seen));
  // A station that reports but has no derived series (a weather mast) is "not rated", not missing.
  if (qc === 9 && h.length) qc = 2;
  return { lastMs, qc, ageMs: refNow() - lastMs };
}

function headlineValue(s) {
  for (const [type, key, dp, unit] of [
    ['oxygen', 'o2_mg_l', 1, 'mg/L O₂'],
    ['carbonate', 'pco2_uatm', 0, 'µatm'],
    ['waves', 'hm0_m', 2, 'm Hm0'],
    ['current', 'speed_m_s', 2, 'm/s'],
  ]) {
    const r = last(type, s.id);
    if (r && typeof r[key] === 'number') return `${fmt(r[key], dp)} ${unit}`;
  }
  return '';
}

// ------------------------------------------------------------------------------------------ overview
function renderOverview() {
  const list = document.getElementById('station-list');
  list.replaceChildren();
  for (const s of state.site.stations) {
    const st = stationStatus(s);
    const fresh = Number.isFinite(st.lastMs) ? freshness(st.ageMs) : 'stale';
    paintStation(state.mapGroups[s.id], { fresh, qc: st.qc, value: headlineValue(s) });
    list.append(
      el(
        'li',
        { 'data-station': s.id, 'data-fresh': fresh },
        el('span', { class: `badge ${fresh}` }),
        el(
          'span',
          {},
          el('strong', { text: s.label }),
          el('span', {
            class: `qc qc-${st.qc}`,
            text: st.qc === 9 ? 'no data' : st.qc === 2 ? 'raw only' : `QC ${st.qc}`,
          }),
        ),
        el('span', { class: 'age', text: Number.isFinite(st.lastMs) ? age(st.ageMs) : 'never' }),
      ),
    );
  }
  renderSiteNow();
  const live = document.getElementById('live-text');
  if (document.getElementById('live').dataset.state === 'live')
    live.textContent = `live · data to ${dateTimeUtc(new Date(state.latestMs).toISOString())} UTC`;
}

/** Extremes across the site right now: the numbers a person on the boat asks for first. */
function renderSiteNow() {
  const pick = (type, key, better) => {
    let best;
    for (const s of state.site.stations) {
      const r = last(type, s.id);
      const v = r?.[key];
      if (typeof v === 'number' && (best === undefined || better(v, best.v))) best = { v, s };
    }
    return best;
  };
  const lo = (a, b) => a < b;
  const hi = (a, b) => a > b;
  const items = [
    ['Lowest O₂', pick('oxygen', 'o2_mg_l', lo), 2, 'mg/L', (v) => v < 2],
    ['Lowest Ω arag', pick('carbonate', 'omega_ar', lo), 2, '', (v) => v < 3],
    ['Highest pCO₂', pick('carbonate', 'pco2_uatm', hi), 0, 'µatm', () => false],
    ['Biggest waves', pick('waves', 'hm0_m', hi), 2, 'm Hm0', () => false],
  ];
  document
    .getElementById('site-now')
    .replaceChildren(
      el('h3', { text: 'Now across the site' }),
      ...items.map(([k, b, dp, unit, bad]) =>
        el(
          'div',
          { class: `tile${b && bad(b.v) ? ' alarm' : ''}`, 'data-now': k },
          el('div', { class: 'k', text: k }),
          el('div', { class: 'v', text: b ? `${fmt(b.v, dp)} ${unit}` : '—' }),
          el('div', { class: 'at', text: b ? b.s.label : '' }),
        ),
      ),
    );
}

// -------------------------------------------------------------------------------------------- alerts
const RULE_NAMES = {
  low_oxygen: 'Low oxygen',
  low_omega_ar: 'Low aragonite saturation',
  stale: 'Sensor silent',
  flatline: 'Flat line',
  range: 'Out of range',
  spike: 'Spike',
  battery: 'Low battery',
};

function renderAlerts() {
  const ul = document.getElementById('alert-list');
  const items = [...state.alerts.values()].sort((a, b) => {
    const open = (x) => (x.state === 'raised' && !x.ack ? 0 : 1);
    return open(a) - open(b) || Date.parse(b.t) - Date.parse(a.t);
  });
  const open = items.filter((a) => a.state === 'raised' && !a.ack).length;
  const count = document.getElementById('alert-count');
  count.textContent = String(open);
  count.classList.toggle('zero', open === 0);
  ul.replaceChildren();
  if (items.length === 0) ul.append(el('li', { class: 'empty', text: 'No alerts in the last 48 h.' }));
  for (const a of items) {
    const name = RULE_NAMES[a.rule] ?? RULE_NAMES[a.fault] ?? a.rule;
    const value =
      a.value !== null && a.value !== undefined
        ? ` · ${fmt(a.value, 2)}${a.limit !== null ? ` (limit ${fmt(a.limit, 2)})` : ''}`
        : '';
    const btn = el('button', {
      type: 'button',
      'data-ack': a.id,
      text: a.ack ? `Acknowledged by ${a.ack.by}` : 'Acknowledge',
    });
    if (a.ack) btn.disabled = true;
    btn.addEventListener('click', () => acknowledge(a.id, btn));
    ul.append(
      el(
        'li',
        { class: `alert ${a.class} ${a.state}${a.ack ? ' acked' : ''}`, 'data-alert-id': a.id },
        el(
          'div',
          {},
          el('span', { class: 'what', text: name }),
          ' ',
          el('span', { class: 'state', text: a.state }),
        ),
        btn,
        el('div', {
          class: 'where',
          text: `${a.station ?? ''}${a.sensor ? ` · ${a.sensor}` : ''}${value} · ${dateTimeUtc(a.raised_t ?? a.t)} UTC`,
        }),
      ),
    );
  }
}

async function acknowledge(id, btn) {
  btn.disabled = true;
  btn.textContent = 'Acknowledging…';
  try {
    const r = await api(withToken(`/api/alerts/${encodeURIComponent(id)}/ack`), {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ by: localStorage.getItem('reefd.name') || 'dashboard' }),
    });
    state.alerts.set(r.alert.id, r.alert);
    renderAlerts();
  } catch (err) {
    btn.disabled = false;
    btn.textContent = 'Retry acknowledge';
    console.error(err);
  }
}

// -------------------------------------------------------------------------------------------- fluxes
function fluxData(id) {
  const list = state.series.get(`flux|${id}`) ?? [];
  const cols = [[], [], [], [], [], [], []];
  for (const r of list) {
    const ok = r.valid === true;
    const n = ok && typeof r.ncp_mmol_m2_h === 'number' ? r.ncp_mmol_m2_h : null;
    const c = ok && typeof r.nec_mmol_m2_h === 'number' ? r.nec_mmol_m2_h : null;
    const sn = r.ncp_sigma_mmol_m2_h ?? 0;
    const sc = r.nec_sigma_mmol_m2_h ?? 0;
    cols[0].push(Date.parse(r.t) / 1000);
    cols[1].push(n);
    cols[2].push(n === null ? null : n - sn);
    cols[3].push(n === null ? null : n + sn);
    cols[4].push(c);
    cols[5].push(c === null ? null : c - sc);
    cols[6].push(c === null ? null : c + sc);
  }
  return cols;
}

function renderFluxes() {
  const box = document.getElementById('flux-list');
  for (const t of state.site.transects) {
    let card = box.querySelector(`[data-transect="${t.id}"]`);
    if (!card) {
      card = el(
        'div',
        { class: 'flux', 'data-transect': t.id },
        el('div', { class: 'flux-head' }, el('h3', { text: `${t.label}` }), el('span', { class: 'valid' })),
        el('div', { class: 'nums' }),
        el('div', { class: 'plot' }),
      );
      box.append(card);
    }
    const r = last('flux', t.id);
    const v = card.querySelector('.valid');
    v.className = `valid ${r?.valid ? 'yes' : 'no'}`;
    v.textContent = r ? (r.valid ? 'valid' : 'not valid') : 'no data';
    const num = (k, val, sigma, unit, dp) =>
      el(
        'div',
        { class: 'num', 'data-field': k },
        el('span', { class: 'k', text: k }),
        el(
          'span',
          { class: 'v' },
          fmt(val, dp),
          sigma !== undefined ? el('small', { text: ` ±${fmt(sigma, 1)}` }) : null,
          el('small', { text: ` ${unit}` }),
        ),
      );
    card
      .querySelector('.nums')
      .replaceChildren(
        num('NCP', r?.ncp_mmol_m2_h, r?.ncp_sigma_mmol_m2_h, 'mmol m⁻² h⁻¹', 1),
        num('NEC', r?.nec_mmol_m2_h, r?.nec_sigma_mmol_m2_h, 'mmol m⁻² h⁻¹', 1),
        num('Flow', r?.u_m_s, undefined, 'm/s', 3),
        num('Residence', r?.residence_min, undefined, 'min', 0),
      );
    const data = fluxData(t.id);
    const key = `flux|${t.id}`;
    const plot = state.plots.get(key);
    if (plot) plot.setData(data);
    else if (data[0].length) state.plots.set(key, fluxPlot(card.querySelector('.plot'), data));
  }
}

// ------------------------------------------------------------------------------------------ stations
function stationMetrics(s) {
  const kinds = new Set(s.sensors.map((x) => x.kind));
  return METRICS.filter((m) => {
    if ((state.series.get(`${m.type}|${s.id}`) ?? []).length) return true;
    if (m.type === 'carbonate') return kinds.has('pco2');
    if (m.type === 'oxygen') return kinds.has('oxygen');
    if (m.type === 'waves') return kinds.has('pressure');
    if (m.type === 'current') return kinds.has('adcp');
    return false;
  });
}

function renderStations() {
  const box = document.getElementById('station-cards');
  for (const s of state.site.stations) {
    const metrics = stationMetrics(s);
    if (metrics.length === 0) continue;
    let card = box.querySelector(`[data-station="${s.id}"]`);
    if (!card) {
      card = el(
        'article',
        { class: 'card', 'data-station': s.id },
        el('div', { class: 'card-head' }, el('h3', { text: s.label }), el('span', { class: 'age' })),
        el('div', { class: 'tiles' }),
        el('div', { class: 'plots' }),
      );
      box.append(card);
    }
    const st = stationStatus(s);
    card.querySelector('.age').textContent = Number.isFinite(st.lastMs)
      ? `${timeUtc(new Date(st.lastMs).toISOString())} UTC · ${age(st.ageMs)}`
      : 'no data yet';
    const tiles = card.querySelector('.tiles');
    tiles.replaceChildren(
      ...metrics.map((m) => {
        const r = last(m.type, s.id);
        const v = r?.[m.key];
        const alarm = m.alarmBelow !== undefined && typeof v === 'number' && v < m.alarmBelow;
        return el(
          'div',
          { class: `tile${alarm ? ' alarm' : ''}`, 'data-metric': m.key },
          el('div', { class: 'k', text: `${m.label}${m.unit ? ` · ${m.unit}` : ''}` }),
          el('div', { class: 'v', text: fmt(v, m.dp) }),
        );
      }),
    );
    const plots = card.querySelector('.plots');
    for (const m of metrics) {
      const data = metricSeries(m, s.id);
      if (data[0].length === 0) continue;
      const key = `${s.id}|${m.key}`;
      const p = state.plots.get(key);
      if (p) p.setData(data);
      else {
        const holder = el('div', { class: 'plot', 'data-plot': m.key });
        plots.append(
          el('p', { class: 'plot-label', text: `${m.label}${m.unit ? ` (${m.unit})` : ''}` }),
          holder,
        );
        state.plots.set(key, linePlot(holder, m, data, 104));
      }
    }
  }
}

// ------------------------------------------------------------------------------------------- health
function renderHealth() {
  const body = document.getElementById('health-rows');
  body.replaceChildren(
    ...state.health.map((h) => {
      const seen = h.last_seen
        ? `${dateTimeUtc(h.last_seen)} · ${age(refNow() - Date.parse(h.last_seen))}`
        : '—';
      const bat =
        typeof h.battery_v === 'number'
          ? el('span', {
              class: h.battery_v < 11.5 ? 'battery-low' : '',
              text: `${h.battery_v.toFixed(2)} V`,
            })
          : '—';
      const flags = h.flags?.length
        ? h.flags.map((f) => el('span', { class: 'chip', text: f }))
        : [el('span', { class: 'chip none', text: 'ok' })];
      return el(
        'tr',
        { 'data-sensor': h.sensor },
        el('td', { text: h.station }),
        el('td', { text: h.sensor }),
        el('td', { text: h.kind ?? '' }),
        el('td', { class: 'num-cell', text: seen }),
        el('td', { class: 'num-cell' }, bat),
        el('td', {}, ...flags),
      );
    }),
  );
}

// ------------------------------------------------------------------------------------------- wiring
function renderAll() {
  renderOverview();
  renderAlerts();
  renderFluxes();
  renderStations();
  renderHealth();
}

function schedule() {
  if (state.dirty) return;
  state.dirty = true;
  requestAnimationFrame(() => {
    state.dirty = false;
    renderOverview();
    renderFluxes();
    renderStations();
  });
}

async function refreshHealth() {
  try {
    state.health = (await api(withToken('/api/health'))).sensors;
    renderHealth();
  } catch (err) {
    console.error(err);
  }
}

function connect() {
  const live = document.getElementById('live');
  const text = document.getElementById('live-text');
  const es = new EventSource(withToken('/api/events'));
  es.addEventListener('open', () => {
    live.dataset.state = 'live';
    renderOverview();
  });
  es.addEventListener('error', () => {
    live.dataset.state = 'down';
    text.textContent = 'reconnecting…';
  });
  es.addEventListener('records', (e) => {
    addRecords(JSON.parse(e.data));
    schedule();
  });
  const onAlert = (e) => {
    const a = JSON.parse(e.data);
    state.alerts.set(a.id, a);
    renderAlerts();
    refreshHealth();
  };
  es.addEventListener('alert', onAlert);
  es.addEventListener('ack', onAlert);
  es.addEventListener('notice', (e) => {
    const n = JSON.parse(e.data);
    const box = document.getElementById('notice');
    box.hidden = false;
    box.textContent = `${n.title}${n.body ? ` — ${n.body}` : ''}`;
  });
}

async function start() {
  state.site = await api(withToken('/api/site'));
  document.getElementById('site-name').textContent = state.site.site;
  document.title = `reefd · ${state.site.site}`;
  state.mapGroups = drawMap(document.getElementById('map'), state.site);
  const [records, alerts, health] = await Promise.all([
    api(withToken('/api/records')),
    api(withToken('/api/alerts')),
    api(withToken('/api/health')),
  ]);
  addRecords(records.records);
  for (const a of alerts.alerts) state.alerts.set(a.id, a);
  state.health = health.sensors;
  renderAll();
  connect();
  setInterval(refreshHealth, 30_000);
  setInterval(renderOverview, 60_000);
  document.body.dataset.ready = 'true';
}

start().catch((err) => {
  document.getElementById('live-text').textContent = `failed to load: ${err.message}`;
  document.getElementById('live').dataset.state = 'down';
  console.error(err);
});
