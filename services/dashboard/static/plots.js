// @ts-check
// The plots (uPlot): site-local time on the axis, UTC in the readout, night shading, the site's limits,
// flagged points marked by their flag, field-log markers, drag to zoom, cursors linked within a station.
import { FLAG_WORDS, num, tickLabels, unitText, withUnit } from './format.js';
import { reasonWords } from './verdicts.js';

/** @typedef {import('./series.js').PlotColumns} PlotColumns */
/** @typedef {import('./series.js').FluxColumns} FluxColumns */
/** @typedef {import('./format.js').SiteClock} SiteClock */
/** @typedef {import('./types.js').SiteRule} SiteRule */
/** @typedef {import('./types.js').LogbookEntry} LogbookEntry */

const INK = '#3d4b55';
const GRID = '#e3e8ea';
const NIGHT = 'rgba(23, 46, 84, 0.09)';
const SUSPECT = '#c77d00';
const FAIL = '#c62828';
const LIMIT = '#b42318';
const INVALID = 'rgba(102, 114, 123, 0.16)';
const FONT = '12px system-ui, sans-serif';

/**
 * @typedef {{
 *   clock: SiteClock, syncKey: string, height: number,
 *   nights: [number, number][], logbook: LogbookEntry[], range: {fromMs: number, toMs: number},
 *   readout: HTMLElement, onZoom: (fromMs: number, toMs: number) => void, onReset: () => void
 * }} Common
 */

/** @param {SiteClock} clock */
function timeAxis(clock) {
  return /** @type {uPlot.Axis} */ ({
    stroke: INK,
    grid: { stroke: GRID, width: 1 },
    ticks: { stroke: GRID, width: 1 },
    font: FONT,
    space: 64,
    size: 38,
    values: (/** @type {uPlot} */ _u, /** @type {number[]} */ splits) =>
      splits.map((s) => {
        const t = clock.time(s * 1000);
        return t === '00:00' ? `${clock.day(s * 1000)}` : t;
      }),
  });
}

function valueAxis() {
  return /** @type {uPlot.Axis} */ ({
    stroke: INK,
    grid: { stroke: GRID, width: 1 },
    ticks: { stroke: GRID, width: 1 },
    font: FONT,
    size: 52,
    space: 24,
    values: (/** @type {uPlot} */ _u, /** @type {number[]} */ vals) => tickLabels(vals),
  });
}

/** Diagonal hatching for windows that are not valid (distinct from the night's flat shade). */
let hatch = /** @type {CanvasPattern | null} */ (null);
/** @param {CanvasRenderingContext2D} ctx */
function invalidFill(ctx) {
  if (hatch) return hatch;
  const c = document.createElement('canvas');
  c.width = 10;
  c.height = 10;
  const g = /** @type {CanvasRenderingContext2D} */ (c.getContext('2d'));
  g.fillStyle = 'rgba(180, 35, 24, 0.06)';
  g.fillRect(0, 0, 10, 10);
  g.strokeStyle = 'rgba(180, 35, 24, 0.35)';
  g.lineWidth = 1.5;
  g.beginPath();
  g.moveTo(-2, 12);
  g.lineTo(12, -2);
  g.stroke();
  hatch = ctx.createPattern(c, 'repeat');
  return hatch ?? INVALID;
}

/**
 * Night shading, the field log's markers and (flux) the invalid windows, under the lines.
 * @param {uPlot} u
 * @param {[number, number][]} nights
 * @param {LogbookEntry[]} logbook
 * @param {{fromS: number, toS: number}[]} [invalid]
 */
function drawUnder(u, nights, logbook, invalid = []) {
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.fillStyle = NIGHT;
  for (const [a, b] of nights) {
    const x0 = u.valToPos(a / 1000, 'x', true);
    const x1 = u.valToPos(b / 1000, 'x', true);
    if (x1 > left && x0 < left + width) ctx.fillRect(x0, top, x1 - x0, height);
  }
  ctx.fillStyle = invalidFill(ctx);
  for (const w of invalid) {
    const x0 = u.valToPos(w.fromS, 'x', true);
    const x1 = u.valToPos(w.toS, 'x', true);
    if (x1 > left && x0 < left + width) ctx.fillRect(x0, top, Math.max(1, x1 - x0), height);
  }
  ctx.strokeStyle = '#5b3f8c';
  ctx.setLineDash([3, 3]);
  ctx.fillStyle = '#5b3f8c';
  ctx.font = FONT;
  // uPlot leaves its axis labels' alignment on the context.
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  for (const e of logbook) {
    const x = u.valToPos(Date.parse(e.t) / 1000, 'x', true);
    if (x < left || x > left + width) continue;
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, top + height);
    ctx.stroke();
    ctx.fillText(e.event, x + 3, top + 12);
  }
  ctx.restore();
}

/**
 * The site's limits as dashed lines, and the flagged points: a ring for suspect, a cross for fail.
 * @param {uPlot} u
 * @param {SiteRule[]} limits
 * @param {PlotColumns['marks']} marks
 */
function drawOver(u, limits, marks) {
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  const dpr = devicePixelRatio || 1;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.font = `${12 * dpr}px system-ui, sans-serif`;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  for (const r of limits) {
    const y = u.valToPos(r.limit, 'y', true);
    if (y < top || y > top + height) continue;
    ctx.strokeStyle = LIMIT;
    ctx.lineWidth = 1.5 * dpr;
    ctx.setLineDash([6 * dpr, 4 * dpr]);
    ctx.beginPath();
    ctx.moveTo(left, y);
    ctx.lineTo(left + width, y);
    ctx.stroke();
    ctx.fillStyle = LIMIT;
    ctx.fillText(
      `limit ${num(r.limit, r.metric.split('.')[1])}`,
      left + 4 * dpr,
      y + (r.dir === 'below' ? 14 : -5) * dpr,
    );
  }
  ctx.setLineDash([]);
  ctx.lineWidth = 2 * dpr;
  const s = 4.5 * dpr;
  for (const m of marks) {
    const x = u.valToPos(m.x, 'x', true);
    const y = u.valToPos(m.y, 'y', true);
    if (x < left || x > left + width) continue;
    const yy = Math.min(Math.max(y, top + s), top + height - s);
    ctx.beginPath();
    if (m.flag === 4) {
      ctx.strokeStyle = FAIL;
      ctx.moveTo(x - s, yy - s);
      ctx.lineTo(x + s, yy + s);
      ctx.moveTo(x - s, yy + s);
      ctx.lineTo(x + s, yy - s);
    } else {
      ctx.strokeStyle = SUSPECT;
      ctx.arc(x, yy, s, 0, 2 * Math.PI);
    }
    ctx.stroke();
  }
  ctx.restore();
}

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
 *   data: PlotColumns, limits: SiteRule[]
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
    scales: { x: { time: true }, y: { range: (_u, min, max) => padRange(min, max, c.limits) } },
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
      draw: [(u) => drawOver(u, c.limits, cols.marks)],
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
     * @param {Partial<Common> & {limits?: SiteRule[]}} next
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
 * Room around the values, and the limit kept in view when it is near them (so "how far from the limit"
 * can be seen at a glance).
 * @param {number | null} min
 * @param {number | null} max
 * @param {SiteRule[]} limits
 * @returns {[number, number]}
 */
function padRange(min, max, limits) {
  let lo = min ?? 0;
  let hi = max ?? 1;
  for (const r of limits) {
    const span = Math.max(hi - lo, Math.abs(r.limit) * 0.2);
    if (r.limit > lo - span && r.limit < hi + span) {
      lo = Math.min(lo, r.limit);
      hi = Math.max(hi, r.limit);
    }
  }
  const pad = (hi - lo) * 0.08 || Math.abs(hi) * 0.05 || 1;
  return [lo - pad, hi + pad];
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

/**
 * @param {uPlot} u
 * @param {FluxColumns} cols
 * @param {string} ncpColor
 * @param {string} necColor
 */
function drawSignificance(u, cols, ncpColor, necColor) {
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  const dpr = devicePixelRatio || 1;
  const r = 3 * dpr;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.lineWidth = 1.5 * dpr;
  const dot = (
    /** @type {number} */ x,
    /** @type {number | null | undefined} */ v,
    /** @type {boolean | undefined} */ sig,
    /** @type {string} */ color,
  ) => {
    if (v === null || v === undefined) return;
    const px = u.valToPos(x, 'x', true);
    const py = u.valToPos(v, 'y', true);
    ctx.beginPath();
    ctx.arc(px, py, r, 0, 2 * Math.PI);
    ctx.strokeStyle = color;
    ctx.fillStyle = sig ? color : '#ffffff';
    ctx.fill();
    ctx.stroke();
  };
  cols.xs.forEach((x, i) => {
    dot(x, cols.ncp[i], cols.ncpSig[i], ncpColor);
    dot(x, cols.nec[i], cols.necSig[i], necColor);
  });
  ctx.restore();
}
