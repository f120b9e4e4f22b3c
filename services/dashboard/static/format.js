// @ts-check
// Units, numbers and times as the page writes them. DOM-free (unit-tested in node). Units arrive from the
// daemon in UDUNITS form ('mg L-1', from /api/site record_types); this only turns them into print.

const SUPERSCRIPT = /** @type {Record<string, string>} */ ({
  '-': '⁻',
  0: '⁰',
  1: '¹',
  2: '²',
  3: '³',
  4: '⁴',
  5: '⁵',
  6: '⁶',
  7: '⁷',
  8: '⁸',
  9: '⁹',
});
const NAMED = /** @type {Record<string, string>} */ ({
  1: '',
  '': '',
  degree_Celsius: '°C',
  degree: '°',
  percent: '%',
});

/**
 * A UDUNITS-style unit for print: 'mg L-1' -> 'mg/L', 'mmol m-2 h-1' -> 'mmol m⁻² h⁻¹', 'uatm' -> 'µatm'.
 * @param {string} unit
 */
export function unitText(unit) {
  if (unit in NAMED) return /** @type {string} */ (NAMED[unit]);
  const terms = unit.split(' ').map((t) => t.replace(/^u(?=mol|atm|m\b)/, 'µ'));
  const negOnes = terms.filter((t) => /^[A-Za-zµ]+-1$/.test(t));
  const rest = terms.filter((t) => /^[A-Za-zµ]+$/.test(t));
  // One unit over one other reads best as a fraction (mg/L, m/s); longer products keep the exponents.
  if (negOnes.length === 1 && rest.length === terms.length - 1)
    return `${rest.join(' ')}/${/** @type {string} */ (negOnes[0]).slice(0, -2)}`;
  return terms
    .map((t) => t.replace(/(-?\d+)$/, (e) => [...e].map((c) => SUPERSCRIPT[c] ?? c).join('')))
    .join(' ');
}

/**
 * Tick labels with the decimals their spacing needs, the same for every tick of an axis.
 * @param {number[]} vals
 */
export function tickLabels(vals) {
  if (vals.length < 2) return vals.map((v) => num(v));
  const step = Math.abs((vals[1] ?? 0) - (vals[0] ?? 0)) || 1;
  const dp = Math.max(0, Math.min(4, -Math.floor(Math.log10(step) + 1e-9)));
  return vals.map((v) => v.toFixed(dp).replace('-', '−'));
}

/** Decimals by field where the trade reads more (pH, saturation states), else by magnitude. */
const FIELD_DECIMALS = /** @type {Record<string, number>} */ ({
  ph_total: 3,
  omega_ar: 2,
  omega_ca: 2,
  sal: 2,
  temp_c: 2,
  o2_mg_l: 2,
  hm0_m: 2,
  depth_m: 2,
  dir_to_deg: 0,
  battery_v: 2,
});

/**
 * @param {number} v
 * @param {string} [field]
 */
export function decimals(v, field) {
  if (field !== undefined && field in FIELD_DECIMALS) return /** @type {number} */ (FIELD_DECIMALS[field]);
  const a = Math.abs(v);
  return a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : 3;
}

/**
 * A number for print ('—' when there is none).
 * @param {unknown} v
 * @param {string} [field]
 */
export function num(v, field) {
  return typeof v === 'number' && Number.isFinite(v) ? v.toFixed(decimals(v, field)).replace('-', '−') : '—';
}

/**
 * A value with its unit: '1.42 mg/L', '27.40 °C', '3.12' (dimensionless).
 * @param {unknown} v
 * @param {string} unit UDUNITS-style
 * @param {string} [field]
 */
export function withUnit(v, unit, field) {
  const u = unitText(unit);
  const n = num(v, field);
  if (n === '—' || u === '') return n;
  return u === '°C' || u === '°' || u === '%' ? `${n}${u === '°C' ? ' °C' : u}` : `${n} ${u}`;
}

/**
 * A length of time in words: '45 s', '12 min', '3 h 20 min', '2 d 4 h'.
 * @param {number} ms
 */
export function duration(ms) {
  if (!Number.isFinite(ms)) return '—';
  const s = Math.round(Math.abs(ms) / 1000);
  if (s < 90) return `${s} s`;
  const m = Math.round(s / 60);
  if (m < 90) return `${m} min`;
  const h = Math.floor(m / 60);
  if (h < 48) return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
  const d = Math.floor(h / 24);
  return h % 24 ? `${d} d ${h % 24} h` : `${d} d`;
}

/**
 * @param {number} ms
 */
export function ago(ms) {
  if (!Number.isFinite(ms)) return 'never';
  return ms < 45_000 ? 'just now' : `${duration(ms)} ago`;
}

/**
 * Site clock: local times of the site's IANA time zone (the plots, the words), UTC on request.
 * @param {string} timeZone
 */
export function siteClock(timeZone) {
  const hm = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  });
  const day = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'short',
    day: 'numeric',
    month: 'short',
  });
  const ymd = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
  });
  const off = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'shortOffset' });
  const utcHm = new Intl.DateTimeFormat('en-GB', {
    timeZone: 'UTC',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  });
  const utcDay = new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', day: 'numeric', month: 'short' });
  return {
    timeZone,
    /** '03:42' @param {number} ms */
    time: (ms) => hm.format(ms),
    /** 'Sun 1 Mar' @param {number} ms */
    day: (ms) => day.format(ms),
    /** '2026-03-01', the local date @param {number} ms */
    date: (ms) => ymd.format(ms),
    /** 'Sun 1 Mar 03:42' @param {number} ms */
    dayTime: (ms) => `${day.format(ms)} ${hm.format(ms)}`,
    /** '13:42 UTC 1 Mar' @param {number} ms */
    utc: (ms) => `${utcHm.format(ms)} UTC ${utcDay.format(ms)}`,
    /** 'UTC−10' (the offset at that moment) @param {number} ms */
    offset: (ms) => {
      const name = off.formatToParts(ms).find((p) => p.type === 'timeZoneName')?.value ?? 'GMT';
      const m = /GMT([+-]\d{1,2}(?::\d{2})?)?/.exec(name);
      return m && m[1] && !/^[+-]0(:00)?$/.test(m[1]) ? `UTC${m[1].replace('-', '−')}` : 'UTC';
    },
    /**
     * A moment relative to today at the site: '03:42' today, 'yesterday 21:10', else 'Sat 28 Feb 21:10'.
     * @param {number} ms
     * @param {number} nowMs
     */
    when: (ms, nowMs) => {
      const d = ymd.format(ms);
      if (d === ymd.format(nowMs)) return hm.format(ms);
      if (d === ymd.format(nowMs - 86_400_000)) return `yesterday ${hm.format(ms)}`;
      if (d === ymd.format(nowMs + 86_400_000)) return `tomorrow ${hm.format(ms)}`;
      return `${day.format(ms)} ${hm.format(ms)}`;
    },
  };
}

/** @typedef {ReturnType<typeof siteClock>} SiteClock */

/**
 * A phrase with its first letter in capitals, unless it starts with a name written in small letters (pH).
 * @param {string} s
 */
export function capitalise(s) {
  return s && !/^[a-z][A-Z]/.test(s) ? `${s[0]?.toUpperCase()}${s.slice(1)}` : s;
}

/** QARTOD flags in words. */
export const FLAG_WORDS = /** @type {Record<number, string>} */ ({
  1: 'pass',
  2: 'not evaluated',
  3: 'suspect',
  4: 'fail',
  9: 'missing',
});
