// @ts-check
// The two answers at the top of the page: is the reef within the site's own limits, and is every instrument
// working; and the plain words for alerts and sensor states. DOM-free: everything here is a function of the
// daemon's answers (site rules, latest records, alerts, sensor states) and a clock, unit-tested in node.
import { capitalise, withUnit } from './format.js';
import { alertWords, forecastSentence, KIND_WORDS, ruleWords, sensorProblem, stationLabel } from './words.js';

/** @typedef {import('./types.js').SiteInfo} SiteInfo */
/** @typedef {import('./types.js').SiteRule} SiteRule */
/** @typedef {import('./types.js').AlertView} AlertView */
/** @typedef {import('./types.js').SensorView} SensorView */
/** @typedef {import('./types.js').Rec} Rec */
/** @typedef {import('./format.js').SiteClock} SiteClock */

/** @typedef {'alarm' | 'watch' | 'ok' | 'unknown'} Level */
export const LEVEL_RANK = /** @type {Record<Level, number>} */ ({ unknown: 0, ok: 1, watch: 2, alarm: 3 });

const SEVERITY_RANK = /** @type {Record<'info' | 'warning' | 'critical', number>} */ ({
  info: 0,
  warning: 1,
  critical: 2,
});

/** Older than this, a value no longer speaks for the reef now. */
export const STALE_VALUE_MS = 2 * 3_600_000;

/**
 * Raw message metrics a rule may name, and the record field that carries the same quantity to the page.
 * @type {Record<string, string>}
 */
const RAW_TO_RECORD = {
  'ctd.temp_c': 'carbonate.temp_c',
  'ctd.sal': 'carbonate.sal',
  'par.par_umol_m2_s': 'light.par_umol_m2_s',
};

/** @param {string} metric */
export function recordMetric(metric) {
  return RAW_TO_RECORD[metric] ?? metric;
}

/**
 * @param {SiteRule} rule
 * @param {string} station
 */
const inScope = (rule, station) => rule.stations === null || rule.stations.includes(station);

/**
 * @typedef {{
 *   level: Level, station: string, rule: SiteRule, value: number, tMs: number,
 *   alert: AlertView | null, margin: number
 * }} Finding
 */

/**
 * Every threshold rule of the site against the newest value of its metric at each station it covers.
 * @param {SiteInfo} site
 * @param {Map<string, Rec>} latest newest record per `${type}|${station}` (any sensor)
 * @param {AlertView[]} raised
 * @param {number} nowMs
 * @returns {Finding[]}
 */
export function reefFindings(site, latest, raised, nowMs) {
  /** @type {Finding[]} */
  const out = [];
  for (const rule of site.rules) {
    if (rule.class !== 'threshold') continue;
    const [type, field] = recordMetric(rule.metric).split('.');
    for (const st of site.stations) {
      if (!inScope(rule, st.id)) continue;
      const rec = latest.get(`${type}|${st.id}`);
      const alert =
        raised.find((a) => a.rule === rule.id && a.station === st.id && a.state === 'raised') ?? null;
      const v = rec ? rec[/** @type {string} */ (field)] : undefined;
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        if (alert)
          out.push({
            level: 'alarm',
            station: st.id,
            rule,
            value: alert.value ?? NaN,
            tMs: Date.parse(alert.t),
            alert,
            margin: 1,
          });
        continue;
      }
      const tMs = Date.parse(/** @type {Rec} */ (rec).t);
      const below = rule.dir === 'below';
      const beyond = below ? v < rule.limit : v > rule.limit;
      const inBand = below ? v < rule.clear : v > rule.clear;
      const span = Math.abs(rule.clear - rule.limit) || Math.abs(rule.limit) * 0.1 || 1;
      // How far past the limit, in units of the hysteresis band (comparable between quantities).
      const margin = (below ? rule.limit - v : v - rule.limit) / span;
      /** @type {Level} */
      let level = alert ? 'alarm' : beyond || inBand ? 'watch' : 'ok';
      if (!alert && nowMs - tMs > STALE_VALUE_MS) level = 'unknown';
      out.push({ level, station: st.id, rule, value: v, tMs, alert, margin });
    }
  }
  return out;
}

/**
 * Forecasts of the night's lowest oxygen that fall below the site's low-oxygen limit.
 * @param {SiteInfo} site
 * @param {Rec[]} forecasts newest forecast per station
 * @param {number} nowMs
 */
export function forecastWarnings(site, forecasts, nowMs) {
  const rule = site.rules.find((r) => r.id === 'low_oxygen');
  /** @type {{station: string, rec: Rec, below: boolean, limit: number | null}[]} */
  const out = [];
  for (const f of forecasts) {
    const tMin = typeof f.t_min === 'string' ? Date.parse(f.t_min) : NaN;
    // A forecast speaks until its expected minimum has passed (and for at most a night).
    if (!(tMin >= nowMs - 3_600_000) || nowMs - Date.parse(f.t) > 14 * 3_600_000) continue;
    const v = f.o2_min_mg_l;
    const station = /** @type {string} */ (f.station);
    const below = rule !== undefined && inScope(rule, station) && typeof v === 'number' && v < rule.limit;
    out.push({ station, rec: f, below, limit: rule ? rule.limit : null });
  }
  return out.sort((a, b) => Number(b.below) - Number(a.below));
}

/**
 * The reef's condition: the worst finding, named.
 * @param {SiteInfo} site
 * @param {Map<string, Rec>} latest
 * @param {AlertView[]} raised
 * @param {Rec[]} forecasts
 * @param {number} nowMs
 * @param {SiteClock} clock
 */
export function reefVerdict(site, latest, raised, forecasts, nowMs, clock) {
  const findings = reefFindings(site, latest, raised, nowMs);
  const warnings = forecastWarnings(site, forecasts, nowMs);
  const known = findings.filter((f) => f.level !== 'unknown');
  const worst = [...findings].sort(
    // The worst level first; among equals the rule the site ranks more severe (low oxygen is critical by
    // default), then the one furthest past its limit.
    (a, b) =>
      LEVEL_RANK[b.level] - LEVEL_RANK[a.level] ||
      SEVERITY_RANK[b.rule.severity] - SEVERITY_RANK[a.rule.severity] ||
      b.margin - a.margin,
  )[0];
  /** @type {Level} */
  let level = known.length === 0 ? 'unknown' : /** @type {Finding} */ (worst).level;
  const tonight = warnings.find((w) => w.below);
  if (level === 'ok' && tonight) level = 'watch';
  const byStation = new Map(/** @type {[string, Level][]} */ ([]));
  for (const f of findings) {
    const have = byStation.get(f.station);
    if (have === undefined || LEVEL_RANK[f.level] > LEVEL_RANK[have]) byStation.set(f.station, f.level);
  }
  for (const w of warnings)
    if (w.below && byStation.get(w.station) === 'ok') byStation.set(w.station, 'watch');
  let headline;
  let detail;
  let station = null;
  if (level === 'unknown') {
    headline = 'No recent values';
    detail = findings.length
      ? 'No station has reported its oxygen or carbonate values in the last 2 h.'
      : 'The site has no limits to judge by.';
  } else if (worst && (worst.level === 'alarm' || worst.level === 'watch')) {
    station = worst.station;
    const what = ruleWords(worst.rule);
    const v = withUnit(worst.value, worst.rule.unit, worst.rule.metric.split('.')[1]);
    const lim = withUnit(worst.rule.limit, worst.rule.unit, worst.rule.metric.split('.')[1]);
    headline = `${what.title} at ${stationLabel(site, worst.station)}`;
    detail =
      worst.level === 'alarm'
        ? `${capitalise(worst.rule.label)} ${v}, ${worst.rule.dir} the site's limit of ${lim}${worst.alert ? ` since ${clock.when(Date.parse(worst.alert.raised_t), nowMs)}` : ''}.`
        : `${capitalise(worst.rule.label)} ${v}: close to the site's limit of ${lim}.`;
  } else if (tonight) {
    station = tonight.station;
    headline = `Low oxygen expected tonight at ${stationLabel(site, tonight.station)}`;
    detail = forecastSentence(tonight.rec, clock, nowMs);
  } else {
    // All within limits: the place closest to a limit is the one to look at.
    station = worst ? worst.station : null;
    headline = "Within the site's limits";
    const n = new Set(known.map((f) => f.station)).size;
    detail = `Every value checked is inside the site's limits at the ${n} station${n === 1 ? '' : 's'} reporting.`;
  }
  return { level, headline, detail, station, findings, warnings, byStation };
}

/** Sensor states from bad to good, for sorting and the instrument verdict. */
export const STATE_RANK = /** @type {Record<import('./types.js').SensorState, number>} */ ({
  failing: 5,
  silent: 4,
  suspect: 3,
  unknown: 2,
  ok: 1,
  disabled: 0,
});

/**
 * The instruments' health: sensors by state, the worst one named.
 * @param {SensorView[]} sensors
 * @param {AlertView[]} siteFaults raised faults of the whole site
 * @param {SiteInfo} site
 * @param {SiteClock} clock
 * @param {number} nowMs
 */
export function instrumentVerdict(sensors, siteFaults, site, clock, nowMs) {
  const counts = { failing: 0, silent: 0, suspect: 0, unknown: 0, ok: 0, disabled: 0 };
  for (const s of sensors) counts[s.state]++;
  const ranked = sensors
    .filter((s) => s.state === 'failing' || s.state === 'silent' || s.state === 'suspect')
    .sort((a, b) => STATE_RANK[b.state] - STATE_RANK[a.state] || firstSince(a) - firstSince(b));
  const worst = ranked[0] ?? null;
  const broken = counts.failing + counts.silent;
  /** @type {Level} */
  const level =
    siteFaults.length > 0 || broken > 0
      ? 'alarm'
      : counts.suspect > 0
        ? 'watch'
        : counts.ok > 0
          ? 'ok'
          : 'unknown';
  const parts = [];
  if (counts.failing) parts.push(`${counts.failing} failing`);
  if (counts.silent) parts.push(`${counts.silent} silent`);
  if (counts.suspect) parts.push(`${counts.suspect} to check`);
  parts.push(`${counts.ok} working`);
  if (counts.unknown) parts.push(`${counts.unknown} not heard yet`);
  let headline;
  let detail;
  const siteFault = siteFaults[0];
  if (siteFault) {
    const w = alertWords(siteFault, site, clock, nowMs);
    headline = w.title;
    detail = `${w.detail} ${w.when}.`;
  } else if (worst) {
    headline = `${worst.label} (${(KIND_WORDS[worst.kind] ?? worst.kind).split(':')[0]}) at ${stationLabel(site, worst.station)}`;
    detail = `${capitalise(sensorProblem(worst, clock, nowMs))}.`;
  } else if (level === 'ok') {
    headline = `All ${counts.ok} sensors working`;
    detail = 'Every sensor reports on time and passes its quality checks.';
  } else {
    headline = 'No sensor heard yet';
    detail = 'Waiting for the first messages.';
  }
  return { level, counts, summary: parts.join(' · '), headline, detail, worst, ranked };
}

/** @param {SensorView} s */
function firstSince(s) {
  const t = s.faults.map((f) => Date.parse(f.since)).filter(Number.isFinite);
  return t.length ? Math.min(...t) : Number.POSITIVE_INFINITY;
}
