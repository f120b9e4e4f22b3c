// @ts-check
// Small DOM helpers shared by the page's modules.

/**
 * Creates an element: attributes (class, text, data-*, aria-*, others) and children.
 * @template {keyof HTMLElementTagNameMap} K
 * @param {K} tag
 * @param {Record<string, string | number | boolean | null | undefined>} [attrs]
 * @param {...(Node | string | null | undefined | false)} children
 * @returns {HTMLElementTagNameMap[K]}
 */
export function el(tag, attrs = {}, ...children) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === null || v === false) continue;
    if (k === 'class') e.className = String(v);
    else if (k === 'text') e.textContent = String(v);
    else e.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children) if (c !== null && c !== undefined && c !== false) e.append(c);
  return e;
}

/**
 * The element with this id (the page's skeleton is fixed: a missing one is a bug worth failing on).
 * @template {HTMLElement} T
 * @param {string} id
 * @returns {T}
 */
export function byId(id) {
  const e = document.getElementById(id);
  if (!e) throw new Error(`the page has no #${id}`);
  return /** @type {T} */ (e);
}

const SVG = 'http://www.w3.org/2000/svg';

/**
 * @param {string} tag
 * @param {Record<string, string | number>} [attrs]
 * @param {string} [text]
 */
export function svg(tag, attrs = {}, text) {
  const e = document.createElementNS(SVG, tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
  if (text !== undefined) e.textContent = text;
  return e;
}

/**
 * A small line of values (battery history) as an inline SVG, with the limit as a dashed line.
 * @param {[string, number][]} points
 * @param {number | null} limit
 */
export function sparkline(points, limit) {
  const w = 160;
  const h = 36;
  const box = svg('svg', { viewBox: `0 0 ${w} ${h}`, class: 'spark', role: 'img' });
  if (points.length < 2) return box;
  const ts = points.map((p) => Date.parse(p[0]));
  const vs = points.map((p) => p[1]);
  const lo = Math.min(...vs, limit ?? Infinity) - 0.05;
  const hi = Math.max(...vs, limit ?? -Infinity) + 0.05;
  const t0 = /** @type {number} */ (ts[0]);
  const t1 = /** @type {number} */ (ts[ts.length - 1]);
  const x = (/** @type {number} */ t) => ((t - t0) / Math.max(1, t1 - t0)) * (w - 2) + 1;
  const y = (/** @type {number} */ v) => h - 2 - ((v - lo) / (hi - lo)) * (h - 4);
  if (limit !== null)
    box.append(svg('line', { x1: 0, x2: w, y1: y(limit), y2: y(limit), class: 'spark-limit' }));
  box.append(
    svg('polyline', {
      points: ts.map((t, i) => `${x(t).toFixed(1)},${y(/** @type {number} */ (vs[i])).toFixed(1)}`).join(' '),
      class: 'spark-line',
    }),
  );
  return box;
}
