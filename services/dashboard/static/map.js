// The site schematic: stations placed by their lat/lon on a drawing of our own (open sea, reef platform,
// crest line, lagoon and channel, when the site has stations in those roles), with freshness as the ring
// colour and the QC state as the fill.

const NS = 'http://www.w3.org/2000/svg';
const W = 640;
const H = 380;
const PAD = 46;

function svg(tag, attrs = {}, text) {
  const e = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
  if (text !== undefined) e.textContent = text;
  return e;
}

export function roleOf(id, label = '') {
  const s = `${id} ${label}`.toLowerCase();
  for (const r of ['fore', 'crest', 'back', 'flat', 'lagoon', 'channel', 'mast', 'weather'])
    if (s.includes(r)) return r === 'weather' ? 'mast' : r;
  return 'other';
}

/** Projects positions into the view box, equal metres per pixel on both axes. */
export function projection(stations) {
  const pts = stations.filter((s) => s.position);
  if (pts.length === 0) return () => null;
  const lat0 = pts.reduce((a, s) => a + s.position.lat, 0) / pts.length;
  const k = Math.cos((lat0 * Math.PI) / 180);
  const xs = pts.map((s) => s.position.lon * k);
  const ys = pts.map((s) => s.position.lat);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const scale = Math.min((W - 2 * PAD) / Math.max(x1 - x0, 1e-9), (H - 2 * PAD) / Math.max(y1 - y0, 1e-9));
  const ox = (W - (x1 - x0) * scale) / 2;
  const oy = (H - (y1 - y0) * scale) / 2;
  return (p) => (p ? { x: ox + (p.lon * k - x0) * scale, y: H - (oy + (p.lat - y0) * scale) } : null);
}

export function drawMap(node, site) {
  node.setAttribute('viewBox', `0 0 ${W} ${H}`);
  node.replaceChildren();
  const defs = svg('defs');
  const marker = svg('marker', {
    id: 'arrow',
    viewBox: '0 0 10 10',
    refX: 8,
    refY: 5,
    markerWidth: 7,
    markerHeight: 7,
    orient: 'auto-start-reverse',
  });
  marker.append(svg('path', { d: 'M0,0 L10,5 L0,10 z', fill: '#00717f' }));
  defs.append(marker);
  node.append(defs, svg('rect', { class: 'ocean', x: 0, y: 0, width: W, height: H }));
  const proj = projection(site.stations);
  const at = {};
  for (const s of site.stations) {
    const p = proj(s.position);
    if (p) at[roleOf(s.id, s.label)] = p;
  }
  if (at.crest && (at.back || at.flat)) {
    const west = Math.min(...Object.values(at).map((p) => p.x)) - 34;
    const crestX = at.crest.x + 14;
    const reef = svg('path', {
      class: 'reef',
      d: `M${west - 20},${18} L${crestX},${18} Q${crestX + 16},${H / 2} ${crestX},${H - 18} L${west - 20},${H - 18} z`,
    });
    node.append(reef);
    const backX = (at.back ?? at.flat).x - 14;
    const chan = at.channel;
    const lagoon = svg('path', {
      class: 'lagoon',
      d: `M${west},${44} L${backX},${44} Q${backX + 10},${H / 2} ${backX},${H - 60} L${west},${H - 60} z`,
    });
    node.append(lagoon);
    if (chan)
      node.append(
        svg('rect', {
          class: 'ocean',
          x: chan.x - 16,
          y: chan.y - 6,
          width: 32,
          height: H - chan.y + 6,
          rx: 6,
        }),
      );
    node.append(
      svg('path', {
        class: 'crestline',
        d: `M${at.crest.x + 6},${26} Q${at.crest.x + 22},${H / 2} ${at.crest.x + 6},${H - 26}`,
      }),
    );
    const y = at.crest.y + 70;
    const bx = (at.back ?? at.flat).x;
    node.append(svg('path', { class: 'flow', d: `M${at.crest.x - 6},${y} L${bx + 6},${y}` }));
    node.append(
      svg(
        'text',
        { class: 'tag', x: (at.crest.x + bx) / 2, y: y + 18, 'text-anchor': 'middle' },
        'wave-driven flow',
      ),
    );
    if (chan)
      node.append(
        svg('path', {
          class: 'flow',
          d: `M${chan.x + 40},${chan.y - 70} Q${chan.x + 44},${chan.y - 20} ${chan.x + 40},${chan.y + 10}`,
        }),
      );
    node.append(
      svg(
        'text',
        { class: 'tag', x: W - 16, y: H - 16, 'text-anchor': 'end' },
        'open sea (waves from the east)',
      ),
    );
    node.append(
      svg('text', { class: 'tag', x: at.crest.x - 12, y: H - 30, 'text-anchor': 'end' }, 'reef flat'),
    );
    node.append(
      svg('text', { class: 'tag', x: (west + bx) / 2, y: H - 76, 'text-anchor': 'middle' }, 'lagoon'),
    );
  }
  const groups = {};
  // Labels centred on their station, alternating above and below along x so neighbours do not collide.
  const placed = site.stations
    .map((s) => ({ s, p: proj(s.position) }))
    .filter((x) => x.p)
    .sort((a, b) => a.p.x - b.p.x);
  let above = true;
  let prevX = -Infinity;
  for (const { s, p } of placed) {
    above = p.x - prevX < 110 ? !above : p.y > 60;
    prevX = p.x;
    const g = svg('g', { class: 'station', 'data-station': s.id, transform: `translate(${p.x},${p.y})` });
    g.append(svg('circle', { class: 'ring', r: 11 }), svg('circle', { class: 'core', r: 5.5 }));
    const name = s.label.replace(/\s*\(.*\)$/, '');
    const x = Math.min(Math.max(0, W - 60 - p.x), Math.max(0, 60 - p.x));
    g.append(svg('text', { x, y: above ? -32 : 28, 'text-anchor': 'middle' }, name));
    g.append(svg('text', { class: 'val', x, y: above ? -18 : 42, 'text-anchor': 'middle' }, ''));
    g.append(svg('title', {}, s.label));
    node.append(g);
    groups[s.id] = g;
  }
  return groups;
}

const FRESH = { ok: '#1b7b3a', late: '#a85600', stale: '#b0221b' };
const QC = { 1: '#1b7b3a', 2: '#8a969c', 3: '#a85600', 4: '#b0221b', 9: '#b0221b' };

export function paintStation(g, { fresh, qc, value }) {
  if (!g) return;
  g.querySelector('circle.ring').setAttribute('stroke', FRESH[fresh] ?? '#8a969c');
  g.querySelector('circle.core').setAttribute('fill', QC[qc] ?? '#8a969c');
  g.querySelector('text.val').textContent = value ?? '';
  g.setAttribute('data-fresh', fresh);
}
