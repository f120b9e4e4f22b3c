// @ts-check
// Every sensor, grouped by station: its state in words, and on opening, its last values with units, expected
// and actual reporting interval, QC flag and reason, active faults since when, battery and its trend, and the
// calibration and field-log entries that concern it.
import { el, byId, sparkline } from './dom.js';
import { ago, capitalise, duration, FLAG_WORDS, withUnit } from './format.js';
import { STATE_RANK } from './verdicts.js';
import { FAULT_WORDS, KIND_WORDS, reasonWords, sensorProblem } from './words.js';

/** @typedef {import('./app.js').App} App */
/** @typedef {import('./types.js').SensorView} SensorView */

const STATE_WORDS = {
  ok: 'working',
  suspect: 'to check',
  failing: 'failing',
  silent: 'silent',
  unknown: 'not heard yet',
  disabled: 'switched off',
};

/** @param {App} app */
export function renderSensors(app) {
  const body = app.sensors;
  const box = byId('sensor-list');
  if (!body) return;
  const now = app.nowMs();
  const open = new Set(
    [...box.querySelectorAll('details[open]')].map((d) => /** @type {HTMLElement} */ (d).dataset.sensor),
  );
  if (app.focusSensor) open.add(app.focusSensor);
  const openGroups = new Set(
    [...box.querySelectorAll('details.working[open]')].map(
      (d) => /** @type {HTMLElement} */ (d).dataset.station,
    ),
  );
  const byStation = new Map(app.site.stations.map((s) => [s.id, /** @type {SensorView[]} */ ([])]));
  for (const s of body.sensors) byStation.get(s.station)?.push(s);
  const groups = [];
  for (const st of app.site.stations) {
    const list = (byStation.get(st.id) ?? []).sort(
      (a, b) => STATE_RANK[b.state] - STATE_RANK[a.state] || (a.sensor < b.sensor ? -1 : 1),
    );
    if (list.length === 0) continue;
    const attention = list.filter((s) => s.state !== 'ok');
    const working = list.filter((s) => s.state === 'ok');
    groups.push(
      el('h3', { class: 'sensor-station', text: st.label }),
      ...attention.map((s) => sensorItem(app, s, now, open.has(`${s.station}/${s.sensor}`))),
    );
    if (working.length) {
      // Working sensors fold into one line per station; each opens to its full view.
      const shown = working.some((s) => open.has(`${s.station}/${s.sensor}`)) || openGroups.has(st.id);
      groups.push(
        el(
          'details',
          { class: 'working', 'data-station': st.id, open: shown },
          el(
            'summary',
            {},
            el('span', { class: 'state', 'data-state': 'ok', text: `${working.length} working` }),
            el('span', { class: 'names', text: working.map((s) => s.label).join(', ') }),
          ),
          ...working.map((s) => sensorItem(app, s, now, open.has(`${s.station}/${s.sensor}`))),
        ),
      );
    }
  }
  box.replaceChildren(...groups);
  const counts = body.sensors.reduce(
    (/** @type {Record<string, number>} */ m, s) => ((m[s.state] = (m[s.state] ?? 0) + 1), m),
    {},
  );
  byId('sensor-count').textContent = Object.entries(counts)
    .sort(
      (a, b) =>
        STATE_RANK[/** @type {keyof typeof STATE_RANK} */ (b[0])] -
        STATE_RANK[/** @type {keyof typeof STATE_RANK} */ (a[0])],
    )
    .map(([k, n]) => `${n} ${STATE_WORDS[/** @type {keyof typeof STATE_WORDS} */ (k)] ?? k}`)
    .join(' · ');
  if (app.focusSensor) {
    const d = box.querySelector(`details[data-sensor="${CSS.escape(app.focusSensor)}"]`);
    app.focusSensor = null;
    d?.scrollIntoView({ block: 'start' });
  }
}

/**
 * @param {App} app
 * @param {SensorView} s
 * @param {number} now
 * @param {boolean} open
 */
function sensorItem(app, s, now, open) {
  const summary = el(
    'summary',
    {},
    el('span', { class: 'state', 'data-state': s.state, text: STATE_WORDS[s.state] }),
    el(
      'span',
      { class: 'name' },
      el('strong', { text: s.label }),
      el('span', { class: 'kind', text: KIND_WORDS[s.kind] ?? s.kind }),
    ),
    el('span', {
      class: 'what',
      text:
        s.state === 'ok'
          ? s.last_seen
            ? `last message ${ago(now - Date.parse(s.last_seen))}`
            : ''
          : sensorProblem(s, app.clock, now),
    }),
  );
  const facts = el('dl', { class: 'facts' });
  /** @param {string} k @param {string | Node} v */
  const add = (k, v) => facts.append(el('dt', { text: k }), el('dd', {}, v));
  for (const v of s.last_values)
    add(
      capitalise(v.label),
      `${withUnit(v.value, v.unit, v.field)} (${app.clock.when(Date.parse(v.t), now)})`,
    );
  add(
    'Last message',
    s.last_seen
      ? `${app.clock.when(Date.parse(s.last_seen), now)} site time, ${ago(now - Date.parse(s.last_seen))}`
      : 'none yet',
  );
  add(
    'Reporting interval',
    `${s.expected_interval_s !== null ? `expected ${duration(s.expected_interval_s * 1000)} (${s.expected_source === 'configured' ? 'configured' : 'its usual'})` : 'no usual interval known yet'}${s.last_gap_s !== null ? `; last gap ${duration(s.last_gap_s * 1000)}` : ''}`,
  );
  add(
    'Quality control',
    s.qc_flag === null
      ? 'not evaluated yet'
      : `flag ${s.qc_flag} (${FLAG_WORDS[s.qc_flag] ?? '?'})${s.qc_reason ? `: ${reasonWords(s.qc_reason)}` : ''}`,
  );
  add(
    'Faults',
    s.faults.length === 0
      ? 'none'
      : s.faults
          .map(
            (f) =>
              `${FAULT_WORDS[f.fault] ?? f.fault} since ${app.clock.when(Date.parse(f.since), now)}${f.value !== null && f.fault !== 'stale' && f.fault !== 'spike' ? ` (${withUnit(f.value, f.unit, f.field ?? undefined)})` : ''}`,
          )
          .join('; '),
  );
  const battery = el('span', { class: 'battery' });
  if (s.battery_v !== null) {
    const trend =
      s.battery_trend_v_per_day === null
        ? ''
        : `, ${s.battery_trend_v_per_day < 0 ? 'falling' : 'rising'} ${withUnit(Math.abs(s.battery_trend_v_per_day), 'V', 'battery_v')} a day`;
    const lim = s.battery_limit_v;
    const left =
      lim !== null && s.battery_v < lim
        ? `; below its limit of ${withUnit(lim, 'V', 'battery_v')}`
        : s.battery_hours_left !== null
          ? `; at this rate it reaches its limit of ${withUnit(s.battery_limit_v, 'V', 'battery_v')} in about ${duration(s.battery_hours_left * 3_600_000)}`
          : s.battery_limit_v !== null
            ? `; limit ${withUnit(s.battery_limit_v, 'V', 'battery_v')}`
            : '';
    battery.append(
      `${withUnit(s.battery_v, 'V', 'battery_v')}${trend}${left}`,
      sparkline(s.battery_series, s.battery_limit_v),
    );
  } else battery.append('not reported');
  add('Battery', battery);
  add(
    'Calibration',
    s.calibrations.length === 0
      ? 'none in the calibration file'
      : s.calibrations
          .map(
            (c) =>
              `${c.field}: × ${c.slope} ${c.offset >= 0 ? '+' : '−'} ${Math.abs(c.offset)}${c.drift_per_day ? `, drift ${c.drift_per_day}/day` : ''}${c.from ? ` from ${c.from.slice(0, 10)}` : ''}${c.to ? ` to ${c.to.slice(0, 10)}` : ''}`,
          )
          .join('; '),
  );
  add(
    'Field log',
    s.logbook.length === 0
      ? 'no entries'
      : el(
          'ul',
          {},
          ...s.logbook
            .slice(-5)
            .reverse()
            .map((e) =>
              el('li', {
                text: `${app.clock.when(Date.parse(e.t), now)}: ${e.event}${e.sensor === null ? ' (whole station)' : ''}${e.text ? ` — ${e.text}` : ''}${e.exclude_from ? ` · data excluded ${app.clock.when(Date.parse(e.exclude_from), now)} to ${e.exclude_to ? app.clock.when(Date.parse(e.exclude_to), now) : 'open'}` : ''}`,
              }),
            ),
        ),
  );
  const d = el(
    'details',
    {
      class: 'sensor',
      'data-sensor': `${s.station}/${s.sensor}`,
      'data-state': s.state,
      id: `sensor-${s.station}-${s.sensor}`,
      open,
    },
    summary,
    facts,
  );
  return d;
}
