// @ts-check
// The top of the page: the site clock, the two verdicts (reef, instruments) and the alerts with their
// acknowledgements.
import { el, byId } from './dom.js';
import { capitalise, withUnit } from './format.js';
import { instrumentVerdict, reefVerdict } from './verdicts.js';
import { alertWords, sensorProblem, stationLabel } from './words.js';

/** @typedef {import('./app.js').App} App */
/** @typedef {import('./types.js').AlertView} AlertView */

const LEVEL_WORDS = {
  reef: { alarm: 'In trouble', watch: 'Keep an eye on it', ok: 'Fine', unknown: 'Not known' },
  instruments: {
    alarm: 'Not all working',
    watch: 'A sensor to check',
    ok: 'All working',
    unknown: 'Not known',
  },
};

/** @param {App} app */
export function renderClock(app) {
  const now = app.nowMs();
  byId('site-time').textContent = app.clock.time(now);
  byId('site-zone').textContent = `site time (${app.clock.offset(now)}) · ${app.clock.day(now)}`;
}

/**
 * @param {App} app
 * @returns {ReturnType<typeof reefVerdict>}
 */
export function computeReef(app) {
  const raised = [...app.alerts.values()].filter((a) => a.state === 'raised');
  return reefVerdict(
    app.site,
    app.store.latestByPlace(),
    raised,
    app.store.latestOfType('forecast'),
    app.nowMs(),
    app.clock,
  );
}

/**
 * @param {App} app
 * @param {ReturnType<typeof reefVerdict>} reef
 */
export function renderVerdicts(app, reef) {
  const now = app.nowMs();
  const box = byId('verdict-reef');
  box.dataset.level = reef.level;
  byId('reef-state').textContent = LEVEL_WORDS.reef[reef.level];
  byId('reef-headline').textContent = reef.headline;
  byId('reef-detail').textContent = reef.detail;
  byId('reef-facts').replaceChildren(...reefFacts(app, reef));
  const go = /** @type {HTMLAnchorElement} */ (byId('reef-go'));
  const target = reef.station ?? app.selected.station;
  go.textContent = `Show ${stationLabel(app.site, target)} →`;
  go.dataset.station = target;

  const sensors = app.sensors?.sensors ?? [];
  const siteFaults = app.sensors?.site_faults ?? [];
  const v = instrumentVerdict(sensors, siteFaults, app.site, app.clock, now);
  const ib = byId('verdict-instruments');
  ib.dataset.level = v.level;
  const broken = v.counts.failing + v.counts.silent;
  byId('inst-state').textContent =
    v.level === 'alarm' && siteFaults.length === 0
      ? broken === 1
        ? 'A sensor is failing'
        : `${broken} sensors failing`
      : LEVEL_WORDS.instruments[v.level];
  byId('inst-headline').textContent = v.headline;
  byId('inst-detail').textContent = v.detail;
  byId('inst-summary').textContent = v.summary;
  byId('inst-more').replaceChildren(
    ...v.ranked.slice(1, 4).map((s) =>
      el('li', {
        text: `${s.label} at ${stationLabel(app.site, s.station)}: ${sensorProblem(s, app.clock, now)}`,
      }),
    ),
  );
  const igo = /** @type {HTMLAnchorElement} */ (byId('inst-go'));
  igo.textContent = v.worst ? `Show ${v.worst.label} →` : 'Show every sensor →';
  igo.dataset.sensor = v.worst ? `${v.worst.station}/${v.worst.sensor}` : '';
}

/**
 * The lowest oxygen and saturation state, the temperature span, and tonight's forecast, each with its place.
 * @param {App} app
 * @param {ReturnType<typeof reefVerdict>} reef
 */
function reefFacts(app, reef) {
  const now = app.nowMs();
  const out = [];
  /** @type {Map<string, import('./verdicts.js').Finding>} */
  const worstByRule = new Map();
  for (const f of reef.findings) {
    if (f.level === 'unknown') continue;
    const have = worstByRule.get(f.rule.id);
    if (!have || f.margin > have.margin) worstByRule.set(f.rule.id, f);
  }
  for (const f of worstByRule.values()) {
    const field = f.rule.metric.split('.')[1];
    const word = f.rule.dir === 'below' ? 'lowest' : 'highest';
    out.push(
      el(
        'li',
        { 'data-level': f.level },
        el('span', { class: 'k', text: capitalise(f.rule.label) }),
        el('span', { class: 'v', text: `${word} ${withUnit(f.value, f.rule.unit, field)}` }),
        el('span', {
          class: 'at',
          text: `${stationLabel(app.site, f.station)} · limit ${withUnit(f.rule.limit, f.rule.unit, field)}`,
        }),
      ),
    );
  }
  // Temperature: judged only where the site has a rule; otherwise its span, said to be unjudged.
  if (![...worstByRule.values()].some((f) => f.rule.metric.endsWith('temp_c'))) {
    const temps = app.store
      .latestOfType('carbonate')
      .filter((r) => now - Date.parse(r.t) < 2 * 3_600_000)
      .map((r) => r.temp_c)
      .filter((x) => typeof x === 'number');
    if (temps.length) {
      const unit = app.site.record_types.carbonate?.fields.temp_c?.unit ?? '';
      out.push(
        el(
          'li',
          { 'data-level': 'none' },
          el('span', { class: 'k', text: 'Water temperature' }),
          el('span', {
            class: 'v',
            text: `${withUnit(Math.min(...temps), unit, 'temp_c')} – ${withUnit(Math.max(...temps), unit, 'temp_c')}`,
          }),
          el('span', { class: 'at', text: 'no limit set for this site' }),
        ),
      );
    }
  }
  for (const w of reef.warnings.slice(0, 2))
    out.push(
      el(
        'li',
        { 'data-level': w.below ? 'watch' : 'ok' },
        el('span', { class: 'k', text: 'Tonight' }),
        el('span', { class: 'v', text: `lowest ${withUnit(w.rec.o2_min_mg_l, 'mg L-1', 'o2_mg_l')}` }),
        el('span', {
          class: 'at',
          text: `${stationLabel(app.site, w.station)} · around ${typeof w.rec.t_min === 'string' ? app.clock.when(Date.parse(w.rec.t_min), now) : '?'} (80 %: ${withUnit(w.rec.o2_min_lo_mg_l, 'mg L-1', 'o2_mg_l')} to ${withUnit(w.rec.o2_min_hi_mg_l, 'mg L-1', 'o2_mg_l')})`,
        }),
      ),
    );
  return out;
}

/**
 * @param {App} app
 */
export function renderAlerts(app) {
  const now = app.nowMs();
  const all = [...app.alerts.values()].sort((a, b) => Date.parse(b.t) - Date.parse(a.t));
  // Raised ones by severity (the critical first), then the newest; cleared ones newest first.
  const rank = (/** @type {AlertView} */ a) => SEVERITY_ORDER[a.severity] ?? 1;
  const open = all.filter((a) => a.state === 'raised').sort((a, b) => rank(b) - rank(a));
  const cleared = all.filter((a) => a.state === 'cleared');
  const waiting = open.filter((a) => a.ack === null).length;
  const count = byId('alert-count');
  count.textContent = waiting
    ? `${waiting} to acknowledge`
    : open.length
      ? `${open.length} raised`
      : 'none raised';
  count.dataset.zero = String(waiting === 0);
  const list = byId('alert-list');
  list.replaceChildren(
    ...(open.length
      ? open.map((a) => alertItem(app, a, now))
      : [el('li', { class: 'empty', text: 'No alert is raised.' })]),
  );
  byId('cleared-count').textContent =
    `Cleared in the last ${app.site.history.window_h} h (${cleared.length})`;
  byId('cleared-list').replaceChildren(...cleared.map((a) => alertItem(app, a, now)));
}

/**
 * @param {App} app
 * @param {AlertView} a
 * @param {number} now
 */
function alertItem(app, a, now) {
  const w = alertWords(a, app.site, app.clock, now);
  const li = el(
    'li',
    {
      class: `alert ${a.class} ${a.state}`,
      'data-alert-id': a.id,
      'data-severity': a.severity,
      'data-acked': String(a.ack !== null),
    },
    el('div', { class: 'title' }, el('strong', { text: w.title })),
    el('div', { class: 'detail', text: w.detail }),
    el('div', { class: 'when', text: `Raised ${w.when}` }),
  );
  if (a.ack) {
    li.append(
      el('div', {
        class: 'ack',
        // An acknowledgement is a person's act on the wall clock, not a time of the data.
        text: `Acknowledged by ${a.ack.by}, ${app.clock.when(Date.parse(a.ack.t), Date.now())}${a.ack.comment ? `: “${a.ack.comment}”` : ''}`,
      }),
    );
  } else if (a.can_ack) {
    li.append(ackForm(app, a));
  }
  return li;
}

const NAME_KEY = 'reefd.ack.name';
const SEVERITY_ORDER = /** @type {Record<string, number>} */ ({ info: 0, warning: 1, critical: 2 });

/**
 * The acknowledgement: a named person and a comment, sent to the daemon (the same journal as the CLI).
 * @param {App} app
 * @param {AlertView} a
 */
function ackForm(app, a) {
  const name = el('input', {
    name: 'by',
    required: true,
    maxlength: 64,
    autocomplete: 'name',
    placeholder: 'your name',
    'aria-label': 'Your name',
  });
  name.value = localStorage.getItem(NAME_KEY) ?? '';
  const comment = el('input', {
    name: 'comment',
    maxlength: 500,
    placeholder: 'what you saw or will do (optional)',
    'aria-label': 'Comment',
  });
  const send = el('button', { type: 'submit', text: 'Acknowledge' });
  const status = el('span', { class: 'ack-status', role: 'status' });
  const form = el('form', { class: 'ack-form' }, name, comment, send, status);
  form.addEventListener('submit', (e) => {
    e.preventDefault();
    const by = name.value.trim();
    if (!by) {
      status.textContent = 'Say who you are.';
      name.focus();
      return;
    }
    localStorage.setItem(NAME_KEY, by);
    send.disabled = true;
    status.textContent = 'Sending…';
    app
      .api(`/api/alerts/${encodeURIComponent(a.id)}/ack`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ by, ...(comment.value.trim() ? { comment: comment.value.trim() } : {}) }),
      })
      .then((r) => {
        const body = /** @type {{alert: AlertView}} */ (r);
        app.alerts.set(body.alert.id, body.alert);
        app.changed('alerts');
      })
      .catch((/** @type {Error} */ err) => {
        send.disabled = false;
        status.textContent = err.message;
      });
  });
  return form;
}
