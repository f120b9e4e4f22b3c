// uPlot wrappers: small time-series plots that resize with their container.

const plots = new Set();

// Times on the axes in UTC, 24 h, with the date under midnight (the dashboard states "UTC" everywhere).
const pad = (n) => String(n).padStart(2, '0');
function utcTicks(u, splits) {
  return splits.map((s) => {
    const d = new Date(s * 1000);
    const hm = `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}`;
    return d.getUTCHours() === 0 && d.getUTCMinutes() === 0
      ? `${hm}\n${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`
      : hm;
  });
}
const xAxis = {
  stroke: '#4a5a64',
  grid: { stroke: '#e3e9eb' },
  ticks: { stroke: '#c9d3d6' },
  font: '11px system-ui',
  space: 56,
  values: utcTicks,
};
// Mini plots: one line of hour ticks, the date only at midnight, on one line.
const miniAxis = {
  ...xAxis,
  size: 24,
  values: (u, splits) =>
    splits.map((s) => {
      const d = new Date(s * 1000);
      return d.getUTCHours() === 0
        ? `${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`
        : `${pad(d.getUTCHours())}h`;
    }),
};
const tzDate = (ts) => uPlot.tzDate(new Date(ts * 1000), 'Etc/UTC');

function widthOf(node) {
  return Math.max(220, Math.floor(node.clientWidth || node.parentElement?.clientWidth || 300));
}

/** A line plot of one metric. data = [xs (s), ys]. */
export function linePlot(node, { label, unit, color, dp }, data, height = 110) {
  const opts = {
    width: widthOf(node),
    height,
    legend: { show: false },
    cursor: { y: false, points: { size: 6 } },
    tzDate,
    scales: { x: { time: true } },
    axes: [
      miniAxis,
      {
        stroke: '#4a5a64',
        grid: { stroke: '#e3e9eb' },
        ticks: { stroke: '#c9d3d6' },
        font: '11px system-ui',
        size: 46,
        space: 18,
        values: (u, v) => v.map((x) => x.toFixed(dp > 2 ? 2 : dp)),
      },
    ],
    series: [
      {},
      { label: `${label}${unit ? ` (${unit})` : ''}`, stroke: color, width: 2, points: { show: false } },
    ],
  };
  const u = new uPlot(opts, data, node);
  plots.add({ u, node });
  return u;
}

/** NCP and NEC with +-1 sigma bands; invalid windows drawn as points only. */
export function fluxPlot(node, data, height = 170) {
  // data: [xs, ncp, ncpLo, ncpHi, nec, necLo, necHi]
  const band = (c) => ({ stroke: 'transparent', fill: c, points: { show: false } });
  const opts = {
    width: widthOf(node),
    height,
    legend: { show: true, live: false },
    cursor: { y: false },
    tzDate,
    scales: { x: { time: true } },
    axes: [
      xAxis,
      {
        stroke: '#4a5a64',
        grid: { stroke: '#e3e9eb' },
        font: '11px system-ui',
        size: 44,
        label: 'mmol m⁻² h⁻¹',
        labelSize: 16,
        labelFont: '11px system-ui',
      },
    ],
    series: [
      {},
      { label: 'NCP ±σ', stroke: '#00717f', width: 2, points: { show: false } },
      { ...band('rgba(0,113,127,0.18)'), label: 'σ NCP lo', show: true },
      { ...band('rgba(0,113,127,0.18)'), label: 'σ NCP hi', show: true },
      { label: 'NEC ±σ', stroke: '#c4421a', width: 2, points: { show: false } },
      { ...band('rgba(196,66,26,0.16)'), label: 'σ NEC lo', show: true },
      { ...band('rgba(196,66,26,0.16)'), label: 'σ NEC hi', show: true },
    ],
    bands: [
      { series: [3, 2], fill: 'rgba(0,113,127,0.18)' },
      { series: [6, 5], fill: 'rgba(196,66,26,0.16)' },
    ],
  };
  const u = new uPlot(opts, data, node);
  // Hide the band edge series from the legend: they are drawn as the band only.
  node.querySelectorAll('.u-legend tr.u-series').forEach((tr) => {
    if (tr.textContent.trim().startsWith('σ')) tr.style.display = 'none';
  });
  plots.add({ u, node });
  return u;
}

export function resizeAll() {
  for (const p of plots) {
    if (!p.node.isConnected) {
      plots.delete(p);
      continue;
    }
    p.u.setSize({ width: widthOf(p.node), height: p.u.height });
  }
}

let pending = 0;
window.addEventListener('resize', () => {
  if (pending) return;
  pending = requestAnimationFrame(() => {
    pending = 0;
    resizeAll();
  });
});
