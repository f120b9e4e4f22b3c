// @ts-check
// What the plots draw besides their lines: the axes in site time, night shading, hatched invalid windows,
// field-log markers, the site's limits, flagged points and significance dots (uPlot draw hooks).
import { num, tickLabels } from './format.js';

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
export const FONT = '12px system-ui, sans-serif';

/** @param {SiteClock} clock */
export function timeAxis(clock) {
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

export function valueAxis() {
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
export function drawUnder(u, nights, logbook, invalid = []) {
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
export function drawOver(u, limits, marks) {
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
 * Room around the values, and the limit kept in view when it is near them (so "how far from the limit"
 * can be seen at a glance).
 * @param {number | null} min
 * @param {number | null} max
 * @param {SiteRule[]} limits
 * @returns {[number, number]}
 */
export function padRange(min, max, limits) {
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
 * @param {uPlot} u
 * @param {FluxColumns} cols
 * @param {string} ncpColor
 * @param {string} necColor
 */
export function drawSignificance(u, cols, ncpColor, necColor) {
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

const FORECAST = '#5a2d82';

/**
 * A station's forecast: its 80 % interval as a bar with caps at the expected time of the minimum, and the
 * expected minimum as a diamond, labelled.
 * @param {uPlot} u
 * @param {import('./series.js').ForecastMark | null | undefined} mark
 */
export function drawForecast(u, mark) {
  if (!mark) return;
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  const dpr = devicePixelRatio || 1;
  const x = u.valToPos(mark.tMinS, 'x', true);
  if (x < left || x > left + width) return;
  const yLo = u.valToPos(mark.loMgL, 'y', true);
  const yHi = u.valToPos(mark.hiMgL, 'y', true);
  const y = u.valToPos(mark.minMgL, 'y', true);
  const w = 5 * dpr;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.fillStyle = 'rgba(90, 45, 130, 0.16)';
  ctx.fillRect(x - w, yHi, 2 * w, yLo - yHi);
  ctx.strokeStyle = FORECAST;
  ctx.lineWidth = 1.5 * dpr;
  ctx.setLineDash([]);
  ctx.beginPath();
  ctx.moveTo(x, yLo);
  ctx.lineTo(x, yHi);
  ctx.moveTo(x - w, yLo);
  ctx.lineTo(x + w, yLo);
  ctx.moveTo(x - w, yHi);
  ctx.lineTo(x + w, yHi);
  ctx.stroke();
  const d = 5 * dpr;
  ctx.beginPath();
  ctx.moveTo(x, y - d);
  ctx.lineTo(x + d, y);
  ctx.lineTo(x, y + d);
  ctx.lineTo(x - d, y);
  ctx.closePath();
  ctx.fillStyle = FORECAST;
  ctx.fill();
  ctx.font = `${12 * dpr}px system-ui, sans-serif`;
  ctx.textBaseline = 'middle';
  const label = 'forecast';
  const tw = ctx.measureText(label).width;
  const right = x + w + 4 * dpr + tw < left + width;
  ctx.textAlign = right ? 'left' : 'right';
  ctx.fillText(label, right ? x + w + 4 * dpr : x - w - 4 * dpr, y);
  ctx.restore();
}
