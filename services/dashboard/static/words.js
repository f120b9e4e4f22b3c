// @ts-check
// Words for people: the site's names, alerts in plain language with their units, QC reasons, faults and
// kinds of sensor, and what is wrong with a sensor. DOM-free, unit-tested in node with the verdicts.
import { capitalise, duration, withUnit } from './format.js';

/** @typedef {import('./types.js').SiteInfo} SiteInfo */
/** @typedef {import('./types.js').SiteRule} SiteRule */
/** @typedef {import('./types.js').AlertView} AlertView */
/** @typedef {import('./types.js').SensorView} SensorView */
/** @typedef {import('./types.js').Rec} Rec */
/** @typedef {import('./format.js').SiteClock} SiteClock */

/**
 * @param {SiteInfo} site
 * @param {string} id
 */
export function stationLabel(site, id) {
  return site.stations.find((s) => s.id === id)?.label ?? id;
}

/**
 * @param {Rec} f a forecast record
 * @param {SiteClock} clock
 * @param {number} nowMs
 */
export function forecastSentence(f, clock, nowMs) {
  const v = withUnit(f.o2_min_mg_l, 'mg L-1', 'o2_mg_l');
  const lo = withUnit(f.o2_min_lo_mg_l, 'mg L-1', 'o2_mg_l');
  const hi = withUnit(f.o2_min_hi_mg_l, 'mg L-1', 'o2_mg_l');
  const at = typeof f.t_min === 'string' ? ` around ${clock.when(Date.parse(f.t_min), nowMs)}` : '';
  return `Lowest oxygen before sunrise expected ${v}${at} (80 % between ${lo} and ${hi}).`;
}

/**
 * The readout line of a station's forecast on its oxygen plot: the forecast, and what the water did then.
 * @param {import('./series.js').ForecastMark} mark
 * @param {{value: number, tMs: number} | null} observed the oxygen observed nearest the expected minimum
 * @param {string} unit the unit of the forecast's fields (/api/site)
 * @param {SiteClock} clock
 * @param {number} nowMs
 */
export function forecastLine(mark, observed, unit, clock, nowMs) {
  const tMinMs = mark.tMinS * 1000;
  const v = (/** @type {number} */ x) => withUnit(x, unit, 'o2_mg_l');
  const head =
    `Forecast issued ${clock.when(mark.issuedMs, nowMs)}: lowest ${v(mark.minMgL)} around ` +
    `${clock.when(tMinMs, nowMs)}, 80 % between ${v(mark.loMgL)} and ${v(mark.hiMgL)}`;
  if (tMinMs > nowMs) return `${head} · still ahead`;
  if (!observed) return `${head} · no reading near that time`;
  const inside = observed.value >= mark.loMgL && observed.value <= mark.hiMgL;
  return `${head} · observed ${v(observed.value)} at ${clock.time(observed.tMs)}, ${inside ? 'within' : 'outside'} the interval`;
}

/** Words for the built-in rules; user rules are worded from their metric. */
const RULE_TITLES = /** @type {Record<string, string>} */ ({
  low_oxygen: 'Low oxygen',
  low_omega_ar: 'Low aragonite saturation',
  low_oxygen_expected: 'Low oxygen expected',
});

/**
 * @param {Pick<SiteRule, 'id' | 'label' | 'dir'>} rule
 */
export function ruleWords(rule) {
  const title = RULE_TITLES[rule.id] ?? `${capitalise(rule.label)} ${rule.dir === 'below' ? 'low' : 'high'}`;
  return { title };
}

/** Faults in words: what a technician would say. */
export const FAULT_WORDS = /** @type {Record<string, string>} */ ({
  battery_trend: 'Battery running down',
  stale: 'No messages',
  silent: 'Site silent',
  flatline: 'Value frozen (flat line)',
  range: 'Outside the sensor’s range',
  spike: 'Spikes',
  battery: 'Low battery',
});

/** QC reasons and sensor-state codes in words. */
export const REASON_WORDS = /** @type {Record<string, string>} */ ({
  ok: 'working',
  stale: 'no messages',
  silent: 'no messages from the site',
  flatline: 'value frozen (flat line)',
  range: 'outside the sensor’s range',
  spike: 'spikes',
  battery: 'battery below its limit',
  battery_trend: 'battery running down towards its cut-off',
  qc_fail: 'readings fail quality control',
  qc_suspect: 'readings suspect in quality control',
  too_few_bins: 'too few good current bins',
  tilt: 'instrument tilted',
  shape: 'profile not the shape configured',
  no_attitude: 'no heading, pitch or roll',
  no_depth: 'no water depth for the profile',
  head_dry: 'profiler out of the water',
  speed_below_min: 'flow too slow for a budget',
  reverse_flow: 'flow running backwards',
  angle_off_transect: 'flow not along the transect',
  residence_above_max: 'water stays too long over the transect',
  depth_below_min: 'water too shallow',
  storage_dominates: 'change in the water dominates the budget (dawn or dusk)',
  input_qc_failed: 'an input failed quality control',
  input_missing: 'an input was missing',
  logbook_exclusion: 'excluded in the field log',
  REEFD_WAVES_DRY: 'sensor out of the water',
});

/**
 * A QC reason or a list of them ('a,b' or 'input_fault:back/co2-back/flatline') in words.
 * @param {string | null | undefined} codes
 */
export function reasonWords(codes) {
  if (!codes) return '';
  return codes
    .split(',')
    .filter(Boolean)
    .map((c) => {
      const m = /^input_fault:([^/]+)\/([^/]+)\/(.+)$/.exec(c);
      if (m) return `${m[2]} at ${m[1]}: ${REASON_WORDS[/** @type {string} */ (m[3])] ?? m[3]}`;
      const q = /^input_qc_failed:([^/]+)\/(.+)$/.exec(c);
      if (q) return `${q[2]} at ${q[1]}: a reading failed quality control`;
      return REASON_WORDS[c] ?? c.replace(/_/g, ' ');
    })
    .join('; ');
}

/**
 * An alert in plain words with units.
 * @param {AlertView} a
 * @param {SiteInfo} site
 * @param {SiteClock} clock
 * @param {number} nowMs
 */
export function alertWords(a, site, clock, nowMs) {
  const rule = site.rules.find((r) => r.id === a.rule && (a.metric === null || r.metric === a.metric));
  const field = a.metric ? a.metric.split('.')[1] : undefined;
  const v = (/** @type {number | null} */ x) => withUnit(x, a.unit, field);
  const where = a.station ? stationLabel(site, a.station) : 'the site';
  let title;
  let detail;
  if (a.class === 'fault') {
    const words =
      FAULT_WORDS[a.rule] ??
      FAULT_WORDS[a.fault ?? ''] ??
      capitalise(a.rule.replace(/^reefd\./, '').replace(/_/g, ' '));
    // A sensor's fault names the sensor and its station; a fault of the whole site (site_silent) stands alone.
    title = a.sensor ? `${words}: ${a.sensor} at ${where}` : a.station ? `${words} at ${where}` : words;
    if (a.fault === 'silent') {
      detail =
        a.state === 'raised'
          ? `No message from the site for longer than ${duration((a.limit ?? 0) * 1000)}: the uplink, the broker or the power.`
          : `Messages again after ${duration((a.value ?? 0) * 1000)} of silence.`;
    } else if (a.fault === 'stale') {
      detail =
        a.state === 'raised'
          ? `No message for longer than ${duration((a.limit ?? 0) * 1000)} (about 3 usual intervals).`
          : `Messages again after ${duration((a.value ?? 0) * 1000)} of silence.`;
    } else if (a.rule === 'battery_trend') {
      // value: hours to the cut-off at the recent slope; limit: the warning horizon, hours.
      detail =
        a.state === 'raised'
          ? `At its recent rate the supply reaches its cut-off in about ${duration((a.value ?? 0) * 3_600_000)}.`
          : 'The supply no longer falls towards its cut-off.';
    } else if (a.fault === 'battery') {
      detail =
        a.state === 'raised'
          ? `Supply ${v(a.value)}, below the limit of ${v(a.limit)}.`
          : `Supply back to ${v(a.value)}.`;
    } else if (a.fault === 'flatline') {
      detail =
        a.state === 'raised'
          ? `${capitalise(a.label)} stuck at ${v(a.value)}.`
          : `${capitalise(a.label)} moving again.`;
    } else if (a.fault === 'spike') {
      detail =
        a.state === 'raised'
          ? `${a.value ?? ''} spikes in ${a.label || 'the readings'} within the hour.`
          : 'No more spikes.';
    } else if (a.fault === 'range') {
      detail = `${capitalise(a.label)} ${v(a.value)}: outside the sensor's range, or stuck at one end of it (${v(a.limit)}).`;
    } else {
      detail = a.value !== null ? `${v(a.value)} (limit ${v(a.limit)}).` : '';
    }
  } else {
    const dir = rule?.dir ?? (a.value !== null && a.limit !== null && a.value < a.limit ? 'below' : 'above');
    title = `${ruleWords({ id: a.rule, label: a.label, dir }).title} at ${where}`;
    detail =
      a.state === 'raised'
        ? `${capitalise(a.label)} ${v(a.value)} when raised, ${dir} the site's limit of ${v(a.limit)}.`
        : `Back to ${v(a.value)} (clears ${dir === 'below' ? 'above' : 'below'} ${v(a.limit)}).`;
  }
  const raised = Date.parse(a.raised_t);
  const cleared = Date.parse(a.cleared_t ?? a.t);
  const when =
    a.state === 'raised'
      ? `${clock.when(raised, nowMs)}, ${duration(nowMs - raised)} ago`
      : `${clock.when(raised, nowMs)}, cleared ${clock.when(cleared, nowMs)} (after ${duration(cleared - raised)})`;
  return { title, detail, when };
}

/** Kinds of sensor in words. */
export const KIND_WORDS = /** @type {Record<string, string>} */ ({
  ctd: 'CTD: temperature and salinity',
  oxygen: 'oxygen optode',
  pco2: 'pCO₂ sensor',
  pressure: 'pressure logger: depth and waves',
  adcp: 'current profiler',
  par: 'light sensor (PAR)',
  met: 'weather station',
  sample: 'water samples',
});

/**
 * What is wrong with a sensor, in words ('value frozen (flat line) since 09:29').
 * @param {SensorView} s
 * @param {SiteClock} clock
 * @param {number} nowMs
 */
export function sensorProblem(s, clock, nowMs) {
  const f = s.faults.find((x) => x.fault === s.state_reason) ?? s.faults[0];
  const words = REASON_WORDS[s.state_reason] ?? reasonWords(s.state_reason);
  if (s.state === 'silent' && s.last_seen)
    return `${words}: last heard ${clock.when(Date.parse(s.last_seen), nowMs)}`;
  if (s.state_reason === 'battery_trend' && s.battery_hours_left !== null)
    return `battery ${withUnit(s.battery_v, 'V', 'battery_v')}, reaches ${withUnit(s.battery_limit_v, 'V', 'battery_v')} in about ${duration(s.battery_hours_left * 3_600_000)}`;
  if (f) return `${words} since ${clock.when(Date.parse(f.since), nowMs)}`;
  return words;
}
