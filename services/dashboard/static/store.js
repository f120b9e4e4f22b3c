// @ts-check
// The page's records: the history, live records and fetched ranges merged per series in time order, and the
// newest record of every series. DOM-free.

/** @typedef {import('./types.js').Rec} Rec */

/** The series a record belongs to (as the server keys it): type, station or transect, sensor. */
/** @param {Rec} r */
export function seriesKey(r) {
  const where = typeof r.transect === 'string' ? r.transect : String(r.station ?? '');
  const sensor = typeof r.sensor === 'string' && r.type !== 'alert' ? r.sensor : '';
  return `${r.type}|${where}|${sensor}`;
}

/**
 * Records per series, sorted by time, one per time, bounded per series; and the newest record of every series.
 * Whole series are kept only for what `keep` accepts (the station and transect shown, the light for the night
 * shading), so a site of a thousand stations does not fill the browser: the verdicts need only the newest.
 */
export class RecordStore {
  /**
   * @param {number} [maxPerSeries]
   * @param {(r: Rec) => boolean} [keep] whole series for these records; the newest only for the others
   */
  constructor(maxPerSeries = 20_000, keep = () => true) {
    this.maxPerSeries = maxPerSeries;
    this.keep = keep;
    /** @type {Map<string, {t: number[], r: Rec[]}>} */
    this.series = new Map();
    /** @type {Map<string, Rec>} */
    this.newest = new Map();
    this.latestMs = 0;
  }

  /** Forgets the whole series `keep` no longer accepts (their newest records stay). */
  prune() {
    for (const [key, s] of this.series) {
      const r = s.r[s.r.length - 1];
      if (r && !this.keep(r)) this.series.delete(key);
    }
  }

  /**
   * Adds records; returns the keys of the series that changed.
   * @param {readonly Rec[]} records
   */
  add(records) {
    /** @type {Set<string>} */
    const changed = new Set();
    for (const r of records) {
      if (r.type === 'alert') continue;
      const tMs = Date.parse(r.t);
      if (!Number.isFinite(tMs)) continue;
      const key = seriesKey(r);
      const have = this.newest.get(key);
      if (!have || have.t <= r.t) this.newest.set(key, r);
      if (tMs > this.latestMs) this.latestMs = tMs;
      changed.add(key);
      if (!this.keep(r)) continue;
      let s = this.series.get(key);
      if (!s) this.series.set(key, (s = { t: [], r: [] }));
      const n = s.t.length;
      if (n === 0 || /** @type {number} */ (s.t[n - 1]) < tMs) {
        s.t.push(tMs);
        s.r.push(r);
      } else {
        let lo = 0;
        let hi = n;
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          if (/** @type {number} */ (s.t[mid]) < tMs) lo = mid + 1;
          else hi = mid;
        }
        if (s.t[lo] === tMs) s.r[lo] = r;
        else {
          s.t.splice(lo, 0, tMs);
          s.r.splice(lo, 0, r);
        }
      }
      if (s.t.length > this.maxPerSeries) {
        const drop = s.t.length - this.maxPerSeries;
        s.t.splice(0, drop);
        s.r.splice(0, drop);
      }
    }
    return changed;
  }

  /**
   * Series of a type at a station or transect (every sensor).
   * @param {string} type
   * @param {string} where
   * @returns {{key: string, sensor: string, t: number[], r: Rec[]}[]}
   */
  seriesOf(type, where) {
    const out = [];
    const prefix = `${type}|${where}|`;
    for (const [key, s] of this.series)
      if (key.startsWith(prefix)) out.push({ key, sensor: key.slice(prefix.length), t: s.t, r: s.r });
    return out.sort((a, b) => (a.sensor < b.sensor ? -1 : 1));
  }

  /**
   * Newest record per `${type}|${where}` over its sensors.
   * @returns {Map<string, Rec>}
   */
  latestByPlace() {
    /** @type {Map<string, Rec>} */
    const out = new Map();
    for (const [key, r] of this.newest) {
      const place = key.slice(0, key.lastIndexOf('|'));
      const have = out.get(place);
      if (!have || have.t < r.t) out.set(place, r);
    }
    return out;
  }

  /**
   * The newest record of each series of a type.
   * @param {string} type
   */
  latestOfType(type) {
    /** @type {Rec[]} */
    const out = [];
    for (const [key, r] of this.newest) if (key.startsWith(`${type}|`)) out.push(r);
    return out;
  }
}
