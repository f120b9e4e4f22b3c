// @ts-check
// The site schematic: stations placed by their positions on a drawing of our own (open sea, reef platform,
// crest line, lagoon and channel where the site has stations in those roles). Each station's disc is coloured
// by the reef's condition there and its ring by the state of its instruments; a click selects the station.
import { svg } from './dom.js';

/** @typedef {import('./types.js').SiteInfo} SiteInfo */
/** @typedef {import('./types.js').SiteStation} SiteStation */
/** @typedef {import('./verdicts.js').Level} Level */

const W = 640;
const H = 300;
const PAD = 50;

/**
 * @param {string} id
 * @param {string} label
 */
export function roleOf(id, label = '') {
  const s = `${id} ${label}`.toLowerCase();
  for (const r of ['fore', 'crest', 'back', 'flat', 'lagoon', 'channel', 'mast', 'weather'])
    if (s.includes(r)) return r === 'weather' ? 'mast' : r;
  return 'other';
}

/**
 * Projects positions into the view box, equal metres per pixel on both axes.
 * @param {SiteStation[]} stations
 * @returns {(p: {lat: number, lon: number} | null) => {x: number, y: number} | null}
 */
export function projection(stations) {
  const pts = /** @type {{lat: number, lon: number}[]} */ (stations.map((s) => s.position).filter(Boolean));
  if (pts.length === 0) return () => null;
  const lat0 = pts.reduce((a, p) => a + p.lat, 0) / pts.length;
  const k = Math.cos((lat0 * Math.PI) / 180);
  const xs = pts.map((p) => p.lon * k);
  const ys = pts.map((p) => p.lat);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const scale = Math.min((W - 2 * PAD) / Math.max(x1 - x0, 1e-9), (H - 2 * PAD) / Math.max(y1 - y0, 1e-9));
  const ox = (W - (x1 - x0) * scale) / 2;
  const oy = (H - (y1 - y0) * scale) / 2;
  return (p) => (p ? { x: ox + (p.lon * k - x0) * scale, y: H - (oy + (p.lat - y0) * scale) } : null);
}

/**
 * Draws the schematic; returns each station's group and the function that colours them.
 * @param {SVGSVGElement} node
 * @param {SiteInfo} site
 * @param {(id: string) => void} onPick
 * @param {boolean} narrow a phone: larger type, as the drawing is scaled down
 */
export function drawMap(node, site, onPick, narrow) {
  node.setAttribute('viewBox', `0 0 ${W} ${H}`);
  node.replaceChildren(svg('rect', { class: 'ocean', x: 0, y: 0, width: W, height: H }));
  const proj = projection(site.stations);
  /** @type {Record<string, {x: number, y: number}>} */
  const at = {};
  for (const s of site.stations) {
    const p = proj(s.position);
    if (p) at[roleOf(s.id, s.label)] = p;
  }
  const crest = at.crest;
  const inner = at.back ?? at.flat;
  if (crest && inner) {
    const west = Math.min(...Object.values(at).map((p) => p.x)) - 40;
    node.append(
      svg('path', {
        class: 'reef',
        d: `M${west - 30},14 L${crest.x + 16},14 Q${crest.x + 34},${H / 2} ${crest.x + 16},${H - 14} L${west - 30},${H - 14} z`,
      }),
      svg('path', {
        class: 'lagoon',
        d: `M${west - 10},36 L${inner.x - 16},36 Q${inner.x - 4},${H / 2} ${inner.x - 16},${H - 48} L${west - 10},${H - 48} z`,
      }),
      svg('path', {
        class: 'crestline',
        d: `M${crest.x + 8},22 Q${crest.x + 24},${H / 2} ${crest.x + 8},${H - 22}`,
      }),
    );
    if (at.channel)
      node.append(
        svg('rect', {
          class: 'ocean',
          x: at.channel.x - 14,
          y: at.channel.y - 4,
          width: 28,
          height: H - at.channel.y + 4,
          rx: 6,
        }),
      );
    node.append(
      svg('text', { class: 'tag', x: W - 12, y: H - 12, 'text-anchor': 'end' }, 'open sea'),
      svg('text', { class: 'tag', x: west + 6, y: H - 56, 'text-anchor': 'start' }, 'lagoon'),
    );
  }
  /** @type {Record<string, SVGGElement>} */
  const groups = {};
  const placed = site.stations
    .map((s) => ({ s, p: proj(s.position) }))
    .filter((x) => x.p !== null)
    .sort((a, b) => /** @type {{x: number}} */ (a.p).x - /** @type {{x: number}} */ (b.p).x);
  // Labels go where they overlap neither a marker nor another label: above, below, then further out with a
  // leader line (estimated text widths; the font is larger on a phone, where the drawing is scaled down).
  const fontPx = narrow ? 26 : 17;
  /** @type {{x: number, y: number, w: number, h: number}[]} */
  const taken = placed.map(({ p }) => ({
    x: /** @type {{x: number}} */ (p).x - 14,
    y: /** @type {{y: number}} */ (p).y - 14,
    w: 28,
    h: 28,
  }));
  const hits = (/** @type {{x: number, y: number, w: number, h: number}} */ b) =>
    b.x < 2 ||
    b.x + b.w > W - 2 ||
    b.y < 2 ||
    b.y + b.h > H - 2 ||
    taken.some((t) => b.x < t.x + t.w && t.x < b.x + b.w && b.y < t.y + t.h && t.y < b.y + b.h);
  for (const { s, p } of placed) {
    const q = /** @type {{x: number, y: number}} */ (p);
    const g = /** @type {SVGGElement} */ (
      svg('g', {
        class: 'station',
        'data-station': s.id,
        transform: `translate(${q.x},${q.y})`,
        tabindex: 0,
        role: 'button',
      })
    );
    const name = s.label.replace(/\s*\(.*\)$/, '');
    const w = name.length * fontPx * 0.58;
    const h = fontPx;
    let spot = { dx: 0, dy: -18, box: { x: q.x - w / 2, y: q.y - 18 - h, w, h } };
    search: for (const ring of [0, 1, 2, 3, 4]) {
      for (const side of [-1, 1]) {
        for (const shift of [0, -0.6, 0.6, -1.1, 1.1]) {
          const dy = side < 0 ? -18 - ring * (h + 4) : 18 + h * 0.8 + ring * (h + 4);
          const dx = shift * w;
          const box = { x: q.x + dx - w / 2, y: q.y + dy - h * 0.8, w, h };
          if (!hits(box)) {
            spot = { dx, dy, box };
            break search;
          }
        }
      }
    }
    taken.push(spot.box);
    if (Math.abs(spot.dy) > 18 + h || spot.dx !== 0)
      g.append(
        svg('line', {
          class: 'leader',
          x1: 0,
          y1: 0,
          x2: spot.dx,
          y2: spot.dy + (spot.dy < 0 ? 2 : -h * 0.8),
        }),
      );
    g.append(
      svg('circle', { class: 'ring', r: 13 }),
      svg('circle', { class: 'core', r: 8 }),
      svg('text', { x: spot.dx, y: spot.dy, 'text-anchor': 'middle', 'font-size': fontPx }, name),
      svg('title', {}, s.label),
    );
    g.addEventListener('click', () => onPick(s.id));
    g.addEventListener('keydown', (e) => {
      if (e.key === 'Enter' || e.key === ' ') onPick(s.id);
    });
    node.append(g);
    groups[s.id] = g;
  }
  return {
    /**
     * @param {string} id
     * @param {Level} reef
     * @param {string} instruments worst sensor state at the station
     * @param {boolean} selected
     */
    paint(id, reef, instruments, selected) {
      const g = groups[id];
      if (!g) return;
      g.dataset.reef = reef;
      g.dataset.instruments = instruments;
      g.classList.toggle('selected', selected);
    },
  };
}
