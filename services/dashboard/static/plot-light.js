// @ts-check
// The light-response plot (uPlot on a PAR axis): the windows of the fitted day as filled dots, other windows
// of the range shown as hollow ones, the day's fitted curve as a line, zero and Ik as guides; the readout
// names the window under the cursor, or the curve's value at that light.
import { num, tickLabels, unitText, withUnit } from './format.js';
import { nearestPoint, curveValue } from './light.js';
import { FONT, valueAxis } from './plot-draw.js';

/** @typedef {import('./light.js').LightColumns} LightColumns */
/** @typedef {import('./light.js').LightPoint} LightPoint */
/** @typedef {import('./format.js').SiteClock} SiteClock */

const INK = '#3d4b55';
const OTHER = '#7d8b95';
const CURVE = '#22313f';

/**
 * @typedef {{
 *   data: LightColumns, name: string, color: string, parUnit: string, rateUnit: string, dayLabel: string,
 *   height: number, clock: SiteClock, nowMs: number, readout: HTMLElement
 * }} LightOptions
 */

/**
 * @param {HTMLElement} node
 * @param {LightOptions} o
 */
export function lightPlot(node, o) {
  let c = o;
  const idle = () => {
    const d = c.data;
    c.readout.textContent = d.points.length
      ? `${d.dayCount} window${d.dayCount === 1 ? '' : 's'} of ${c.dayLabel} (filled), ${d.otherCount} other${d.otherCount === 1 ? '' : 's'} (hollow) · point at a window to read it`
      : 'no valid window with a light reading in this range';
    c.readout.dataset.flag = '1';
  };
  /** @param {uPlot} u */
  const readout = (u) => {
    const { left, top } = u.cursor;
    if (left === undefined || top === undefined || left < 0) return idle();
    const p = nearestPoint(
      c.data.points,
      (q) => ({ x: u.valToPos(q.par, 'x'), y: u.valToPos(q.rate, 'y') }),
      { x: left, y: top },
      12,
    );
    const par = p ? p.par : u.posToVal(left, 'x');
    const light = `PAR ${withUnit(par, c.parUnit)}`;
    if (!p) {
      const curve = c.data.curveParams;
      c.readout.textContent = curve
        ? `${light} · fitted ${c.name} ${withUnit(curveValue(curve, par), c.rateUnit)}`
        : light;
      return;
    }
    c.readout.textContent = [
      light,
      `${c.name} ${withUnit(p.rate, c.rateUnit)}${p.sigma !== null ? ` ± ${num(p.sigma)}` : ''}`,
      `${c.clock.dayTime(p.tMs)} site time`,
      c.clock.utc(p.tMs),
      p.ofDay ? `a window of ${c.dayLabel}` : 'a window of another day',
    ].join(' · ');
  };
  const data = () => /** @type {uPlot.AlignedData} */ ([c.data.xs, c.data.day, c.data.other, c.data.curve]);
  /** @type {uPlot.Options} */
  const opts = {
    width: Math.max(240, node.clientWidth),
    height: o.height,
    legend: { show: false },
    scales: {
      x: { time: false, range: (_u, _min, max) => [0, Math.max(1, max ?? 1) * 1.02] },
    },
    axes: [
      {
        ...valueAxis(),
        size: 44,
        space: 56,
        label: `PAR, ${unitText(o.parUnit)}`,
        labelSize: 18,
        labelFont: FONT,
        values: (/** @type {uPlot} */ _u, /** @type {number[]} */ vals) => tickLabels(vals),
      },
      { ...valueAxis(), label: `${o.name}, ${unitText(o.rateUnit)}`, labelSize: 18, labelFont: FONT },
    ],
    cursor: { drag: { x: false, y: false }, points: { show: false } },
    series: [
      {},
      {
        label: `${o.name}, fitted day`,
        stroke: o.color,
        paths: () => null,
        points: { show: true, size: 7, width: 1.5, stroke: o.color, fill: o.color },
      },
      {
        label: `${o.name}, other days`,
        stroke: OTHER,
        paths: () => null,
        points: { show: true, size: 7, width: 1.5, stroke: OTHER, fill: '#ffffff' },
      },
      { label: 'fitted curve', stroke: CURVE, width: 2, spanGaps: true, points: { show: false } },
    ],
    hooks: {
      draw: [(u) => drawGuides(u, c.data)],
      setCursor: [(u) => readout(u)],
    },
  };
  const u = new uPlot(opts, data(), node);
  idle();
  const ro = new ResizeObserver(() =>
    u.setSize({ width: Math.max(240, node.clientWidth), height: c.height }),
  );
  ro.observe(node);
  return {
    /**
     * @param {LightColumns} d
     * @param {Partial<LightOptions>} next
     */
    update(d, next) {
      c = { ...c, ...next, data: d };
      u.setData(data(), true);
      idle();
      return true;
    },
    destroy() {
      ro.disconnect();
      u.destroy();
    },
  };
}

/**
 * Zero (production balances respiration where the curve crosses it) and Ik, dotted, under the points.
 * @param {uPlot} u
 * @param {LightColumns} d
 */
function drawGuides(u, d) {
  const ctx = u.ctx;
  const { left, top, width, height } = u.bbox;
  const dpr = devicePixelRatio || 1;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.strokeStyle = INK;
  ctx.fillStyle = INK;
  ctx.lineWidth = 1 * dpr;
  ctx.setLineDash([2 * dpr, 3 * dpr]);
  ctx.font = `${12 * dpr}px system-ui, sans-serif`;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  const y0 = u.valToPos(0, 'y', true);
  if (y0 > top && y0 < top + height) {
    ctx.beginPath();
    ctx.moveTo(left, y0);
    ctx.lineTo(left + width, y0);
    ctx.stroke();
  }
  if (d.curveParams) {
    const x = u.valToPos(d.curveParams.ik, 'x', true);
    if (x > left && x < left + width) {
      ctx.beginPath();
      ctx.moveTo(x, top);
      ctx.lineTo(x, top + height);
      ctx.stroke();
      ctx.fillText('Ik', x + 4 * dpr, top + 14 * dpr);
    }
  }
  ctx.restore();
}
