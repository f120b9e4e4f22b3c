// @ts-check
// The plots (uPlot): site-local time on the axis, UTC in the readout, night shading, the site's limits,
// flagged points marked by their flag, field-log markers, drag to zoom, cursors linked within a station.
import { FLAG_WORDS, num, unitText, withUnit } from './format.js';
import {
  drawForecast,
  drawOver,
  drawSignificance,
  drawUnder,
  FONT,
  padRange,
  timeAxis,
  valueAxis,
} from './plot-draw.js';
import { reasonWords } from './words.js';

/** @typedef {import('./series.js').PlotColumns} PlotColumns */
/** @typedef {import('./series.js').FluxColumns} FluxColumns */
/** @typedef {import('./format.js').SiteClock} SiteClock */
/** @typedef {import('./types.js').SiteRule} SiteRule */
/** @typedef {import('./types.js').LogbookEntry} LogbookEntry */
/** @typedef {import('./series.js').ForecastMark} ForecastMark */

/**
 * @typedef {{
 *   clock: SiteClock, syncKey: string, height: number,
 *   nights: [number, number][], logbook: LogbookEntry[], range: {fromMs: number, toMs: number},
 *   readout: HTMLElement, onZoom: (fromMs: number, toMs: number) => void, onReset: () => void
 * }} Common
 */

/**
 * Wires zoom by dragging (the page decides the range for the whole station) and reset by double-click.
 * @param {Common} c
 */
function zoomHooks(c) {
  return {
    setSelect: [
      (/** @type {uPlot} */ u) => {
        if (u.select.width < 4) return;
        const a = u.posToVal(u.select.left, 'x');
        const b = u.posToVal(u.select.left + u.select.width, 'x');
        u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
        c.onZoom(a * 1000, b * 1000);
      },
    ],
    ready: [
      (/** @type {uPlot} */ u) => {
        u.over.addEventListener('dblclick', () => c.onReset());
      },
    ],
  };
}

/** @type {number[][]} */
const LINE_DASH = [[], [6, 3], [2, 3]];

/**
 * One quantity at one station.
 * @param {HTMLElement} node
 * @param {Common & {
 *   field: string, label: string, unit: string, color: string, pointsOnly: boolean,
 *   data: PlotColumns, limits: SiteRule[], forecast?: ForecastMark | null
 * }} o
 */
export function quantityPlot(node, o) {
  let cols = o.data;
  let c = o;
  const readout = (/** @type {number | null | undefined} */ idx) => {
    let i = idx;
    let line = 0;
    if (i === null || i === undefined) {
      // No cursor: the newest value.
      for (let j = cols.xs.length - 1; j >= 0 && (i === null || i === undefined); j--)
        for (let k = 0; k < cols.recs.length; k++)
          if (cols.recs[k]?.[j]) {
            i = j;
            line = k;
            break;
          }
      if (i === null || i === undefined) {
        c.readout.textContent = 'no values in this range';
        return;
      }
    } else
      line = Math.max(
        0,
        cols.recs.findIndex((r) => r[/** @type {number} */ (i)]),
      );
    const r = cols.recs[line]?.[/** @type {number} */ (i)];
    if (!r) {
      c.readout.textContent = '';
      return;
    }
    const ms = Date.parse(r.t);
    const flag = typeof r.flag === 'number' ? r.flag : 1;
    const parts = [
      withUnit(r[o.field], o.unit, o.field),
      `${c.clock.dayTime(ms)} site time`,
      c.clock.utc(ms),
    ];
    if (cols.sensors.length > 1 && cols.sensors[line]) parts.push(/** @type {string} */ (cols.sensors[line]));
    if (flag !== 1 && flag !== 2)
      parts.push(
        `QC ${FLAG_WORDS[flag] ?? flag}${typeof r.reason === 'string' ? `: ${reasonWords(r.reason)}` : ''}`,
      );
    c.readout.textContent = parts.join(' · ');
    c.readout.dataset.flag = String(flag);
  };
  /** @type {uPlot.Options} */
  const opts = {
    width: Math.max(240, node.clientWidth),
    height: o.height,
    legend: { show: false },
    tzDate: (ts) => uPlot.tzDate(new Date(ts * 1000), o.clock.timeZone),
    scales: {
      x: { time: true },
      y: {
        // The forecast's interval stays in view beside the water's course.
        range: (_u, min, max) =>
          c.forecast
            ? padRange(
                Math.min(min ?? c.forecast.loMgL, c.forecast.loMgL),
                Math.max(max ?? c.forecast.hiMgL, c.forecast.hiMgL),
                c.limits,
              )
            : padRange(min, max, c.limits),
      },
    },
    axes: [timeAxis(o.clock), valueAxis()],
    cursor: {
      sync: { key: o.syncKey },
      drag: { x: true, y: false, setScale: false },
      points: { size: 8 },
    },
    series: [
      {},
      ...cols.sensors.map((sensor, i) => ({
        label: sensor,
        stroke: o.color,
        width: 2,
        dash: /** @type {number[]} */ (LINE_DASH[i % LINE_DASH.length]),
        spanGaps: false,
        ...(o.pointsOnly
          ? { paths: () => null, points: { show: true, size: 4, stroke: o.color, fill: o.color } }
          : { points: { show: false } }),
      })),
    ],
    hooks: {
      drawClear: [(u) => drawUnder(u, c.nights, c.logbook)],
      draw: [
        (u) => {
          drawOver(u, c.limits, cols.marks);
          drawForecast(u, c.forecast);
        },
      ],
      setCursor: [(u) => readout(u.cursor.idx)],
      ...zoomHooks(o),
    },
  };
  const u = new uPlot(opts, /** @type {uPlot.AlignedData} */ ([cols.xs, ...cols.lines]), node);
  u.setScale('x', { min: o.range.fromMs / 1000, max: o.range.toMs / 1000 });
  readout(null);
  const ro = new ResizeObserver(() =>
    u.setSize({ width: Math.max(240, node.clientWidth), height: c.height }),
  );
  ro.observe(node);
  return {
    /**
     * @param {PlotColumns} data
     * @param {Partial<Common> & {limits?: SiteRule[], forecast?: ForecastMark | null}} next
     */
    update(data, next) {
      c = { ...c, ...next };
      if (data.sensors.length !== cols.sensors.length) return false; // a new sensor: the caller rebuilds
      cols = data;
      u.setData(/** @type {uPlot.AlignedData} */ ([cols.xs, ...cols.lines]), false);
      u.setScale('x', { min: c.range.fromMs / 1000, max: c.range.toMs / 1000 });
      readout(null);
      return true;
    },
    destroy() {
      ro.disconnect();
      u.destroy();
    },
  };
}

/**
 * NCP and NEC of a transect with 1-sigma bands; significant values as filled dots, the rest hollow; invalid
 * windows shaded, their reasons in the readout.
 * @param {HTMLElement} node
 * @param {Common & {data: FluxColumns, unit: string}} o
 */
export function fluxPlot(node, o) {
  let cols = o.data;
  let c = o;
  const NCP = '#0f7b6c';
  const NEC = '#b8562a';
  const readout = (/** @type {number | null | undefined} */ idx) => {
    let i = idx;
    if (i === null || i === undefined) i = cols.xs.length - 1;
    const r = cols.recs[i];
    if (!r) {
      c.readout.textContent = 'no windows in this range';
      return;
    }
    const ms = Date.parse(r.t);
    const when = `${c.clock.dayTime(ms)} site time · ${c.clock.utc(ms)}`;
    if (r.valid !== true) {
      const why =
        typeof r.invalid_reasons === 'string' && r.invalid_reasons
          ? reasonWords(r.invalid_reasons)
          : 'no reason given';
      c.readout.textContent = `${when} · window not valid: ${why}`;
      c.readout.dataset.flag = '4';
      return;
    }
    const part = (
      /** @type {string} */ name,
      /** @type {unknown} */ v,
      /** @type {unknown} */ s,
      /** @type {boolean} */ sig,
    ) =>
      `${name} ${withUnit(v, o.unit)}${typeof s === 'number' ? ` ± ${num(s)}` : ''}${sig ? '' : ' (not distinguishable from zero)'}`;
    c.readout.textContent = [
      when,
      part('NCP', r.ncp_mmol_m2_h, r.ncp_sigma_mmol_m2_h, r.ncp_significant === true),
      part('NEC', r.nec_mmol_m2_h, r.nec_sigma_mmol_m2_h, r.nec_significant === true),
    ].join(' · ');
    c.readout.dataset.flag = '1';
  };
  const band = (/** @type {string} */ label) => ({ label, stroke: 'transparent', points: { show: false } });
  const data = () =>
    /** @type {uPlot.AlignedData} */ ([
      cols.xs,
      cols.ncp,
      cols.ncpLo,
      cols.ncpHi,
      cols.nec,
      cols.necLo,
      cols.necHi,
    ]);
  /** @type {uPlot.Options} */
  const opts = {
    width: Math.max(240, node.clientWidth),
    height: o.height,
    legend: { show: false },
    tzDate: (ts) => uPlot.tzDate(new Date(ts * 1000), o.clock.timeZone),
    scales: { x: { time: true } },
    axes: [timeAxis(o.clock), { ...valueAxis(), label: unitText(o.unit), labelSize: 18, labelFont: FONT }],
    cursor: { sync: { key: o.syncKey }, drag: { x: true, y: false, setScale: false }, points: { size: 8 } },
    series: [
      {},
      { label: 'NCP', stroke: NCP, width: 2, spanGaps: false, points: { show: false } },
      band('NCP − σ'),
      band('NCP + σ'),
      { label: 'NEC', stroke: NEC, width: 2, spanGaps: false, points: { show: false } },
      band('NEC − σ'),
      band('NEC + σ'),
    ],
    bands: [
      { series: [3, 2], fill: 'rgba(15, 123, 108, 0.16)' },
      { series: [6, 5], fill: 'rgba(184, 86, 42, 0.14)' },
    ],
    hooks: {
      drawClear: [(u) => drawUnder(u, c.nights, c.logbook, cols.invalid)],
      draw: [(u) => drawSignificance(u, cols, NCP, NEC)],
      setCursor: [(u) => readout(u.cursor.idx)],
      ...zoomHooks(o),
    },
  };
  const u = new uPlot(opts, data(), node);
  u.setScale('x', { min: o.range.fromMs / 1000, max: o.range.toMs / 1000 });
  readout(null);
  const ro = new ResizeObserver(() =>
    u.setSize({ width: Math.max(240, node.clientWidth), height: c.height }),
  );
  ro.observe(node);
  return {
    /**
     * @param {FluxColumns} d
     * @param {Partial<Common>} next
     */
    update(d, next) {
      c = { ...c, ...next };
      cols = d;
      u.setData(data(), false);
      u.setScale('x', { min: c.range.fromMs / 1000, max: c.range.toMs / 1000 });
      readout(null);
      return true;
    },
    destroy() {
      ro.disconnect();
      u.destroy();
    },
  };
}
