// The dashboard in a real browser (Debian's Chromium through playwright-core), asked the field team's
// questions on the fictional demo reef: 16 hours of its messages through the real processor, fed to the
// dashboard as the daemon feeds it, with a real notifier for acknowledgements, the records in the durable
// record history (services/records) for /api/records, a field log and a calibration file; the daily budgets
// of the two days before from a processor run of those days. Screenshots go to test/artifacts/.
import { mkdirSync, writeFileSync } from 'node:fs';
import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import { run as alertsCli } from '../../services/cli/commands/alerts.js';
import {
  createDashboardServer,
  recordStoreQuery,
  type DashboardServer,
} from '../../services/dashboard/index.js';
import { createRecordStore, type RecordStore } from '../../services/records/index.js';
import type { AlertView } from '../../services/dashboard/api-schemas.js';
import { demoSiteConfig, runDemo } from '../../services/dashboard/demo-records.js';
import type { SensorHealthRow } from '../../services/dashboard/sensor-watch.js';
import {
  alertsStateDir,
  createDashboardChannel,
  createNotifier,
  watchAcks,
  type AckWatch,
  type Notifier,
} from '../../services/notifiers/index.js';
import { launchChromium } from './chromium.js';

const HOUR = 3_600_000;
const START = Date.UTC(2026, 2, 1); // 14:00 the day before at the site (UTC-10)
const HOURS = 16; // to 06:00 at the site: the lagoon's low-oxygen night has happened
const SPLIT = START + 15 * HOUR; // what the page loads with; the last hour arrives live
const ARTIFACTS = path.join(path.dirname(new URL(import.meta.url).pathname), '..', 'artifacts');
const quiet = { info() {}, warn() {}, error() {}, debug() {} };
const iso = (ms: number) => new Date(ms).toISOString();

let config: ReefdConfig;
let data: string;
let server: DashboardServer;
let notifier: Notifier;
let store: RecordStore;
let ackWatch: AckWatch;
let chrome: Awaited<ReturnType<typeof launchChromium>> | undefined;
let browser: BrowserContext;
let page: Page;
let live: { records: DerivedRecord[]; health?: SensorHealthRow[] }[];
let lastLagoonO2: number;
let health: SensorHealthRow[] = [];
let forecasts: DerivedRecord[] = [];
let dailies: DerivedRecord[] = [];
let fluxes: DerivedRecord[] = [];
const pageErrors: string[] = [];

async function newPage(viewport: { width: number; height: number }, url = server.url): Promise<Page> {
  const p = await browser.newPage();
  p.on('pageerror', (e) => pageErrors.push(String(e)));
  await p.setViewportSize(viewport);
  await p.goto(url);
  await p.waitForSelector('body[data-ready="true"]', { timeout: 20_000 });
  return p;
}

/** True when the element's box lies within the first screen. */
async function onFirstScreen(p: Page, selector: string): Promise<boolean> {
  const box = await p.locator(selector).boundingBox();
  const vh = (await p.viewportSize())!.height;
  return box !== null && box.y >= 0 && box.y + box.height <= vh;
}

beforeAll(async () => {
  data = await mkdtemp(path.join(tmpdir(), 'reefd-dash-e2e-'));
  writeFileSync(
    path.join(data, 'logbook.yaml'),
    [
      `- { t: ${iso(START + 6 * HOUR)}, station: flat, sensor: o2-flat, event: cleaning, text: wiped the optode window }`,
      `- { t: ${iso(START + 2 * HOUR)}, station: lagoon, event: note, text: turbid water after rain }`,
    ].join('\n'),
  );
  writeFileSync(
    path.join(data, 'calibration.yaml'),
    `- { sensor: flat/co2-flat, field: pco2_uatm, from: ${iso(START - 24 * HOUR)}, offset: -12.0 }\n`,
  );
  config = { ...demoSiteConfig(), logbook_file: 'logbook.yaml', calibration_file: 'calibration.yaml' };
  const demo = runDemo({ config, startMs: START, hours: HOURS, seed: 8, health: true });
  const all = demo.batches.flatMap((b) => b.records);
  // The two local days before, from a processor run of those days (daily budgets close at local
  // midnight, so a run of the 16 hours alone has none); tonight's forecasts come from the run itself.
  const before = runDemo({ config, startMs: START - 72 * HOUR, hours: 72, seed: 9 });
  const days = before.batches.flatMap((b) => b.records).filter((r) => r.type === 'daily');
  forecasts = all.filter((r) => r.type === 'forecast' && r.station === 'lagoon');
  dailies = [...days, ...all.filter((r) => r.type === 'daily')];
  fluxes = all.filter((r) => r.type === 'flux');
  // The record history holds more than the dashboard's 48-h history: the lagoon's oxygen of a week earlier.
  const older = all
    .filter((r) => r.type === 'oxygen' && r.station === 'lagoon')
    .map((r) => ({ ...r, t: iso(Date.parse(r.t) - 5 * 24 * HOUR) }));
  store = await createRecordStore({
    dir: path.join(data, 'records'),
    retentionDays: 0,
    fsyncMs: 5,
    clock: () => START + HOURS * HOUR,
  });
  await store.append([...older, ...days, ...all]);
  lastLagoonO2 = (
    all.filter((r) => r.type === 'oxygen' && r.station === 'lagoon').at(-1) as { o2_mg_l: number }
  ).o2_mg_l;

  notifier = createNotifier({
    dir: alertsStateDir(data),
    site: config.site,
    channels: [createDashboardChannel('board', () => undefined)],
  });
  await notifier.start();
  // As the daemon wires it (services/daemon/http.ts): CLI acknowledgements reach the page within a second.
  ackWatch = watchAcks(alertsStateDir(data), () => void notifier.syncAcks());
  server = await createDashboardServer({
    config,
    baseDir: data,
    port: 0,
    logger: quiet,
    acks: notifier,
    health: () => health,
    healthPollMs: 0,
    activeAlerts: () => demo.processor.activeAlerts(),
    query: recordStoreQuery(store, 'record history'),
    historyDir: path.join(data, 'dashboard-history'),
  });
  // Fed batch by batch as the daemon's record bus would, the sensor rows of each moment alongside.
  const seeded = demo.batches.filter((b) => b.tMs < SPLIT);
  live = demo.batches.filter((b) => b.tMs >= SPLIT);
  for (const b of seeded) {
    if (b.health) health = b.health;
    server.publish(b.records);
    for (const r of b.records) if (r.type === 'alert') await notifier.enqueue(r as never);
  }
  chrome = await launchChromium();
  browser = chrome.browser;
  page = await newPage({ width: 1360, height: 900 });
  mkdirSync(ARTIFACTS, { recursive: true });
}, 120_000);

afterAll(async () => {
  await chrome?.close();
  ackWatch?.close();
  await server?.close();
  await notifier?.stop();
  await store?.close();
});

describe('the first screen answers: is the reef in trouble, and which instrument is failing', () => {
  it('names the reef trouble against the site limit and the failing sensor with its fault and since when', async () => {
    await page.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-first-screen.png') });
    expect(await page.locator('#reef-state').innerText()).toBe('In trouble');
    expect(await page.locator('#reef-headline').innerText()).toBe('Low oxygen at Lagoon patch reef');
    expect(await page.locator('#reef-detail').innerText()).toMatch(
      /^Dissolved oxygen \d\.\d\d mg\/L, below the site's limit of 2\.00 mg\/L since 03:30\.$/,
    );
    expect(await page.locator('#verdict-reef').getAttribute('data-level')).toBe('alarm');
    expect(await page.locator('#inst-state').innerText()).toBe('A sensor is failing');
    expect(await page.locator('#inst-headline').innerText()).toBe('co2-flat (pCO₂ sensor) at Mid flat');
    expect(await page.locator('#inst-detail').innerText()).toMatch(
      /^Battery below its limit since 0\d:\d\d\.$/,
    );
    for (const s of [
      '#reef-state',
      '#reef-headline',
      '#inst-state',
      '#inst-headline',
      '#reef-go',
      '#inst-go',
    ])
      expect(await onFirstScreen(page, s), s).toBe(true);
    // Times are the site's: its clock reads 05:xx local, not the 15:xx of UTC.
    expect(await page.locator('#site-time').innerText()).toMatch(/^0[45]:\d\d$/);
    expect(await page.locator('#site-zone').innerText()).toContain('UTC−10');
  });

  it('is one click from the reef verdict to the station, and from the instrument verdict to the sensor', async () => {
    await page.locator('#reef-go').click();
    await page.waitForFunction(
      `document.querySelector('#station-title')?.textContent === 'Lagoon patch reef'`,
      undefined,
      { timeout: 10_000 },
    );
    const o2 = page.locator('[data-plot="oxygen.o2_mg_l"]');
    await o2.waitFor();
    expect(await o2.getAttribute('data-beyond')).toBe('true');
    expect(await o2.getAttribute('data-limits')).toBe('2');
    expect(await onFirstScreen(page, '[data-plot="oxygen.o2_mg_l"] figcaption')).toBe(true);
    await page.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-station.png') });

    await page.locator('#inst-go').click();
    const sensor = page.locator('details[data-sensor="flat/co2-flat"]');
    await expect.poll(() => sensor.getAttribute('open'), { timeout: 10_000 }).toBe('');
    expect(await onFirstScreen(page, 'details[data-sensor="flat/co2-flat"] summary')).toBe(true);
    await page.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-sensor.png') });
  });
});

describe('the per-sensor view', () => {
  it('shows last value with unit, intervals, QC with reason, faults, battery and trend, calibration and log', async () => {
    const text = await page.locator('details[data-sensor="flat/co2-flat"] .facts').innerText();
    expect(text).toMatch(/Partial pressure of CO2\s+\d{3,4} µatm/);
    expect(text).toMatch(/Reporting interval\s+expected 10 min \(its usual\); last gap 10 min/);
    expect(text).toMatch(/Quality control\s+flag 1 \(pass\)/);
    expect(text).toMatch(/Faults\s+Low battery since 0\d:\d\d \(11\.\d\d V\)/);
    expect(text).toMatch(/Battery\s+1\d\.\d\d V, falling \d\.\d\d V a day; below its limit of 11\.50 V/);
    expect(text).toMatch(/Calibration\s+pco2_uatm: × 1 − 12 from 2026-02-28/);
    // A sensor whose last readings failed QC says why.
    const adcp = page.locator('details[data-sensor="crest/adcp-crest"]');
    expect(await adcp.locator('summary').innerText()).toMatch(/to check[\s\S]*too few good current bins/);
    // The station's field-log entry shows on its sensors.
    await page.locator('details.working[data-station="lagoon"] > summary').click();
    await page.locator('details[data-sensor="lagoon/o2-lagoon"] > summary').click();
    expect(await page.locator('details[data-sensor="lagoon/o2-lagoon"] .facts').innerText()).toMatch(
      /Field log\s+(yesterday )?16:00: note \(whole station\) — turbid water after rain/,
    );
  });
});

describe('the plots', () => {
  it('read out the value in site time with UTC, with cursors linked within the station', async () => {
    await page.locator('#reef-go').click();
    const plot = page.locator('[data-plot="oxygen.o2_mg_l"] .u-over');
    const box = (await plot.boundingBox())!;
    await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2);
    const readout = page.locator('[data-plot="oxygen.o2_mg_l"] .readout');
    await expect
      .poll(() => readout.innerText())
      .toMatch(/^\d\.\d\d mg\/L · \w{3} \d{1,2} \w{3} \d\d:\d\d site time · \d\d:\d\d UTC/);
    const [local, utc] = /(\d\d:\d\d) site time · (\d\d:\d\d) UTC/.exec(await readout.innerText())!.slice(1);
    const hours = (s: string) => Number(s.slice(0, 2)) * 60 + Number(s.slice(3));
    expect((hours(utc!) - hours(local!) + 1440) % 1440).toBe(600); // UTC-10
    // The saturation plot of the same station follows the cursor to the same moment.
    expect(await page.locator('[data-plot="oxygen.o2_sat_pct"] .readout').innerText()).toContain(
      `${local} site time`,
    );
  });

  it('shade the night, mark flagged points by their flag, and draw the site limit', async () => {
    const nights = (await page.locator('#station-groups').getAttribute('data-nights'))!
      .split(' ')
      .map((n) => n.split('/').map((s) => Date.parse(s)) as [number, number]);
    // The night of the run (the one around 22:00 at the site, 08:00 UTC).
    const night = nights.find(([a, b]) => a < START + 8 * HOUR && b > START + 8 * HOUR);
    expect(night).toBeDefined();
    const [from, to] = night!;
    // The night from the light sensor: dark from about 18:00 to about 06:00 at the site (04:00 to 16:00 UTC).
    expect(Math.abs(from! - (START + 4 * HOUR))).toBeLessThan(1.2 * HOUR);
    expect(to! - from!).toBeGreaterThan(10 * HOUR);
    const suspect = await page.locator('[data-plot][data-suspect]:not([data-suspect="0"])').count();
    expect(suspect).toBeGreaterThan(0);
    expect(await page.locator('[data-plot="carbonate.omega_ar"]').getAttribute('data-limits')).toBe('3');
  });

  it('zoom by dragging, come back by double-click, and reach any range the daemon kept', async () => {
    const over = page.locator('[data-plot="oxygen.o2_mg_l"] .u-over');
    const box = (await over.boundingBox())!;
    const before = Number(await page.locator('[data-plot="oxygen.o2_mg_l"]').getAttribute('data-points'));
    // The last 24 h end near 05:00 at the site; 55 % of the way across is about 18:00 the evening before.
    await page.mouse.move(box.x + box.width * 0.55, box.y + 20);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.8, box.y + 20, { steps: 6 });
    await page.mouse.up();
    await expect.poll(() => page.locator('#range-label').innerText()).not.toMatch(/^last 24 h/);
    const zoomed = page.locator('[data-plot="oxygen.o2_mg_l"]');
    const zoomFrom = Date.parse((await zoomed.getAttribute('data-first'))!);
    expect(zoomFrom).toBeGreaterThan(START + 3 * HOUR);
    expect(Number(await zoomed.getAttribute('data-points'))).toBeLessThan(before / 2);
    // Every plot of the station follows the zoom.
    expect(
      Date.parse((await page.locator('[data-plot="carbonate.pco2_uatm"]').getAttribute('data-first'))!),
    ).toBeGreaterThan(START + 3 * HOUR);
    await over.dblclick();
    await expect.poll(() => page.locator('#range-label').innerText()).toMatch(/^last 24 h/);
    // A week: beyond the dashboard's own 48 h, answered by /api/records from the record history.
    await page.locator('#range button[data-preset="168"]').click();
    await expect
      .poll(() => page.locator('#range-status').innerText(), { timeout: 15_000 })
      .toMatch(/records from record history/);
    await expect
      .poll(async () =>
        Date.parse((await page.locator('[data-plot="oxygen.o2_mg_l"]').getAttribute('data-first')) ?? ''),
      )
      .toBeLessThan(START - 3 * 24 * HOUR);
    await page.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-week.png') });
    await page.locator('#range button[data-preset="24"]').click();
  });

  it('show every measured quantity of a station, and a card for the weather mast', async () => {
    await page.locator('#station-chips button[data-station="flat"]').click();
    // A function, not a string: the page's CSP (script-src 'self') refuses eval, which a string predicate needs.
    await page.waitForFunction(
      () =>
        (
          globalThis as unknown as {
            document: { querySelector(s: string): { textContent: string | null } | null };
          }
        ).document.querySelector('#station-title')?.textContent === 'Mid flat',
    );
    for (const q of [
      'light.par_umol_m2_s',
      'carbonate.sal',
      'carbonate.temp_c',
      'waves.depth_m',
      'waves.hm0_m',
      'waves.tp_s',
      'oxygen.o2_sat_pct',
      'current.dir_to_deg',
      'current.speed_m_s',
      'carbonate.ph_total',
    ]) {
      const card = page.locator(`[data-plot="${q}"]`);
      await card.waitFor({ state: 'attached' });
      expect(Number(await card.getAttribute('data-points')), q).toBeGreaterThan(10);
    }
    const mast = await page.locator('#mast').innerText();
    expect(mast).toMatch(/met at Weather mast\s+working/);
    expect(mast).toMatch(/supply 1\d\.\d\d V/);
  });
});

describe('metabolism, daily budgets and tonight', () => {
  it('shows invalid windows with their reason, significance, the daily budgets and the forecast', async () => {
    const plot = page.locator('#flux-plot');
    expect(Number(await plot.getAttribute('data-invalid'))).toBeGreaterThan(0);
    // The demo's scripted spikes (one optode sample at crest, one CTD sample on the flat; libs/simulator
    // faults.ts) make their windows invalid, each named in words with its sensor.
    expect(await page.locator('#flux-invalid').innerText()).toMatch(
      /not valid \(.*o2-crest at crest: (spikes|a reading failed quality control)/,
    );
    expect(await page.locator('#flux-invalid').innerText()).not.toMatch(/input_|qc failed:/);
    expect(await page.locator('#flux-now [data-field="NCP"] .sig').innerText()).toMatch(
      /^(clearly different from zero|not distinguishable from zero)$/,
    );
    // Hovering an invalid window says why it is not valid.
    await plot.scrollIntoViewIfNeeded();
    const over = (await page.locator('#flux-plot .u-over').boundingBox())!;
    let found = '';
    for (let f = 0.05; f < 1 && !found; f += 0.01) {
      await page.mouse.move(over.x + over.width * f, over.y + over.height / 2);
      const t = await page.locator('#flux-readout').innerText();
      if (t.includes('window not valid')) found = t;
    }
    expect(found).toMatch(
      /window not valid: (change in the water dominates the budget \(dawn or dusk\)|an input|[\w-]+ at [\w-]+: )/,
    );
    // One row per local day of the transect: the two days before the run.
    // One row per local day of the transect, newest first: the part of the 28th the run saw, the two whole
    // days before it with every budget, and the part of the 25th that run began in; part days are not valid.
    const rows = page.locator('#daily-body tr');
    expect(await rows.count()).toBe(4);
    expect(await rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-valid')))).toEqual([
      'false',
      'true',
      'true',
      'false',
    ]);
    expect(await rows.nth(0).innerText()).toMatch(/^2026-02-28\s.*not valid$/);
    for (const [i, day] of [
      [1, '2026-02-27'],
      [2, '2026-02-26'],
    ] as const)
      expect(await rows.nth(i).innerText()).toMatch(new RegExp(`^${day}(\\s+−?\\d+ ± \\d+){4}\\s+\\d+ %`));
    // Tonight's lowest oxygen at the lagoon as the processor last forecast it, in site time (UTC-10).
    const tonight = await page.locator('#tonight').innerText();
    const m =
      /Lagoon patch reef Lowest oxygen before sunrise expected (\d\.\d\d) mg\/L around (\d\d:\d\d) \(80 % between (\d\.\d\d) mg\/L and (\d\.\d\d) mg\/L\)\./.exec(
        tonight,
      );
    expect(m, tonight).not.toBeNull();
    const shown = forecasts.find(
      (f) => (f as unknown as { o2_min_mg_l: number }).o2_min_mg_l.toFixed(2) === m?.[1],
    ) as unknown as { o2_min_lo_mg_l: number; o2_min_hi_mg_l: number; t_min: string } | undefined;
    expect(shown, `a lagoon forecast of ${m?.[1]} mg/L`).toBeDefined();
    expect(m?.[3]).toBe(shown?.o2_min_lo_mg_l.toFixed(2));
    expect(m?.[4]).toBe(shown?.o2_min_hi_mg_l.toFixed(2));
    expect(m?.[2]).toBe(new Date(Date.parse(shown?.t_min ?? '') - 10 * HOUR).toISOString().slice(11, 16));
    expect(tonight).toContain("The site's limit is 2.00 mg/L.");
    await page
      .locator('#metabolism')
      .screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-metabolism.png') });
  });
});

describe('light responses', () => {
  type Row = Record<string, unknown> & { t: string };
  const num = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

  it("draws the newest fitted day's curve from its daily record, with its windows apart from the others", async () => {
    const transect = (await page
      .locator('#transect-chips button[aria-pressed="true"]')
      .getAttribute('data-transect'))!;
    // The newest day of the transect with a production curve: the part of the 28th the run saw.
    const fitted = (dailies as unknown as Row[])
      .filter((d) => d.transect === transect && num(d.pmax_mmol_m2_h) && num(d.r_fit_mmol_m2_h))
      .sort((a, b) => (a.t < b.t ? -1 : 1))
      .at(-1)!;
    expect(fitted.day).toBe('2026-02-28');
    const plot = page.locator('#light-plot');
    await plot.scrollIntoViewIfNeeded();
    expect(await plot.getAttribute('data-kind')).toBe('ncp');
    expect(await plot.getAttribute('data-day')).toBe('2026-02-28');
    expect(Number(await plot.getAttribute('data-amp'))).toBe(fitted.pmax_mmol_m2_h);
    expect(Number(await plot.getAttribute('data-ik'))).toBe(fitted.ik_umol_m2_s);
    expect(Number(await plot.getAttribute('data-intercept'))).toBe(fitted.r_fit_mmol_m2_h);
    const fit = await page.locator('#light-fit').innerText();
    expect(fit).toContain(`Pmax ${(fitted.pmax_mmol_m2_h as number).toFixed(1)}`);
    expect(fit).toMatch(/Ik \d+( ± \d+)? µmol m⁻² s⁻¹, R \d+\.\d( ± \d+\.\d)? mmol m⁻² h⁻¹\.$/);
    // The windows: every valid window of the transect with a PAR and an NCP, those of the fitted local day
    // (from the record's start for its hours) apart from the rest up to the newest the page holds.
    const dayFrom = Date.parse(fitted.t);
    const dayTo = dayFrom + (fitted.day_hours as number) * HOUR;
    const usable = (field: string) =>
      (fluxes as unknown as Row[]).filter(
        (f) => f.transect === transect && f.valid === true && num(f.par_umol_m2_s) && num(f[field]),
      );
    const ofDay = (f: Row) => Date.parse(f.t) >= dayFrom && Date.parse(f.t) < dayTo;
    const last = Date.parse((await plot.getAttribute('data-last'))!);
    const ncp = usable('ncp_mmol_m2_h');
    expect(Number(await plot.getAttribute('data-day-windows'))).toBe(ncp.filter(ofDay).length);
    expect(ncp.filter(ofDay).length).toBeGreaterThan(20);
    expect(Number(await plot.getAttribute('data-other-windows'))).toBe(
      ncp.filter((f) => !ofDay(f) && Date.parse(f.t) <= last).length,
    );
    // The curve as drawn: the readout between the windows gives the fitted NCP at the cursor's light.
    const over = (await page.locator('#light-plot .u-over').boundingBox())!;
    let seen: RegExpExecArray | null = null;
    for (let i = 0; i < 40 && !seen; i++) {
      await page.mouse.move(
        over.x + over.width * (0.3 + (i % 8) * 0.08),
        over.y + over.height * (0.05 + 0.12 * Math.floor(i / 8)),
      );
      seen = /^PAR (\d+) µmol m⁻² s⁻¹ · fitted NCP (−?\d+\.\d) mmol m⁻² h⁻¹$/.exec(
        await page.locator('#light-readout').innerText(),
      );
    }
    expect(seen).not.toBeNull();
    const par = Number(seen![1]);
    const want =
      (fitted.pmax_mmol_m2_h as number) * Math.tanh(par / (fitted.ik_umol_m2_s as number)) -
      (fitted.r_fit_mmol_m2_h as number);
    // PAR is printed to 1 umol m-2 s-1 (half of it moves the curve by at most 0.5 Pmax/Ik), NCP to 0.1.
    const slope = (fitted.pmax_mmol_m2_h as number) / (fitted.ik_umol_m2_s as number);
    expect(Math.abs(Number(seen![2]!.replace('−', '-')) - want)).toBeLessThanOrEqual(
      0.05 + 0.5 * slope + 1e-9,
    );
    await page.locator('#light').screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-light.png') });

    // Calcification the same way, from the day's calcification curve.
    expect(num(fitted.gmax_mmol_m2_h)).toBe(true);
    await page.locator('#light-kinds button[data-kind="nec"]').click();
    await expect.poll(() => plot.getAttribute('data-kind')).toBe('nec');
    expect(Number(await plot.getAttribute('data-amp'))).toBe(fitted.gmax_mmol_m2_h);
    expect(Number(await plot.getAttribute('data-ik'))).toBe(fitted.ik_nec_umol_m2_s);
    expect(Number(await plot.getAttribute('data-intercept'))).toBe(fitted.g0_mmol_m2_h);
    expect(Number(await plot.getAttribute('data-day-windows'))).toBe(
      usable('nec_mmol_m2_h').filter(ofDay).length,
    );
    expect(await page.locator('#light-fit').innerText()).toMatch(/^NEC = Gmax tanh\(I\/Ik\) \+ G0, fitted/);
    await page
      .locator('#light')
      .screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-light-nec.png') });
    await page.locator('#light-kinds button[data-kind="ncp"]').click();
  });
});

describe('alerts', () => {
  it('say what happened in plain words with units, and offer no acknowledgement for a cleared alert', async () => {
    const low = page.locator('#alert-list li.alert[data-severity="critical"]').first();
    expect(await low.locator('.title').innerText()).toBe('Low oxygen at Lagoon patch reef');
    expect(await low.locator('.detail').innerText()).toMatch(
      /^Dissolved oxygen 1\.\d\d mg\/L when raised, below the site's limit of 2\.00 mg\/L\.$/,
    );
    const battery = page.locator('#alert-list li.alert', { hasText: 'Low battery' });
    expect(await battery.locator('.detail').innerText()).toMatch(
      /^Supply 11\.\d\d V, below the limit of 11\.50 V\.$/,
    );
    await page.locator('details.cleared > summary').click();
    const stale = page.locator('#cleared-list li', { hasText: 'No messages: ctd-lagoon' });
    expect(await stale.locator('.detail').innerText()).toMatch(/^Messages again after \d+ min of silence\.$/);
    expect(await page.locator('#cleared-list form').count()).toBe(0);
    expect(await page.locator('#cleared-list li').count()).toBeGreaterThanOrEqual(3);
  });

  it('are acknowledged by a named person with a comment, and show one state from the page, the CLI and the API', async () => {
    const alerts = ((await (await fetch(`${server.url}/api/alerts`)).json()) as { alerts: AlertView[] })
      .alerts;
    const raised = alerts.filter((a) => a.can_ack);
    expect(raised.length).toBeGreaterThanOrEqual(3);
    const [first, second, third] = raised as [AlertView, AlertView, AlertView];
    // From the page.
    const li = page.locator(`#alert-list li[data-alert-id="${first.id}"]`);
    await li.locator('input[name="by"]').fill('Mika Aro');
    await li.locator('input[name="comment"]').fill('divers check the lagoon at dawn');
    await li.locator('button[type="submit"]').click();
    await expect.poll(() => li.getAttribute('data-acked')).toBe('true');
    expect(await li.locator('.ack').innerText()).toMatch(
      /^Acknowledged by Mika Aro, .*: “divers check the lagoon at dawn”$/,
    );
    expect(notifier.status().episodes.find((e) => e.id === first.id)?.ack).toMatchObject({
      by: 'Mika Aro',
      comment: 'divers check the lagoon at dawn',
    });
    // From the command line: the page shows it without a reload.
    const io = {
      out: '',
      err: '',
      env: {},
      isTty: false,
      stdout: (t: string) => void (io.out += t),
      stderr: (t: string) => void (io.err += t),
    };
    expect(
      await alertsCli(
        ['ack', second.id, '--data', data, '--by', 'Ana', '--comment', 'battery swap tomorrow'],
        io,
      ),
    ).toBe(0);
    const li2 = page.locator(`#alert-list li[data-alert-id="${second.id}"]`);
    await expect.poll(() => li2.locator('.ack').count(), { timeout: 15_000 }).toBe(1);
    expect(await li2.locator('.ack').innerText()).toMatch(
      /^Acknowledged by Ana, .*: “battery swap tomorrow”$/,
    );
    // From the HTTP API.
    const r = await fetch(`${server.url}/api/alerts/${third.id}/ack`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ by: 'Noa' }),
    });
    expect(r.status).toBe(200);
    const li3 = page.locator(`#alert-list li[data-alert-id="${third.id}"]`);
    await expect.poll(() => li3.getAttribute('data-acked'), { timeout: 10_000 }).toBe('true');
    // And the CLI lists the page's acknowledgement.
    const list = { ...io, out: '' };
    list.stdout = (t: string) => void (list.out += t);
    await alertsCli(['list', '--data', data], list);
    expect(list.out).toContain(`acked by Mika Aro`);
    // A cleared alert cannot be acknowledged from any path.
    const cleared = alerts.find((a) => a.state === 'cleared')!;
    const refused = await fetch(`${server.url}/api/alerts/${cleared.id}/ack`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ by: 'Noa' }),
    });
    expect(refused.status).toBe(409);
    await page.locator('#alerts').screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-alerts.png') });
  });
});

describe('live records', () => {
  it('update the numbers as the daemon derives them', async () => {
    await page.locator('#station-chips button[data-station="lagoon"]').click();
    for (const b of live) {
      if (b.health) health = b.health;
      server.publish(b.records);
    }
    const want = `${lastLagoonO2.toFixed(2)} mg/L`;
    await expect
      .poll(() => page.locator('[data-plot="oxygen.o2_mg_l"] .now').innerText(), { timeout: 10_000 })
      .toBe(want);
    expect(await page.locator('#site-time').innerText()).toMatch(/^0[56]:\d\d$/);
    await page.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop.png'), fullPage: true });
    expect(pageErrors).toEqual([]);
  });
});

describe("tonight's forecast", () => {
  it("stands on the station's oxygen plot with its interval, the latest forecast's values in its line", async () => {
    // All batches are in (the live test): the lagoon's latest forecast is the run's last.
    const latest = [...forecasts].sort((a, b) => (a.t < b.t ? -1 : 1)).at(-1) as unknown as {
      o2_min_mg_l: number;
      o2_min_lo_mg_l: number;
      o2_min_hi_mg_l: number;
      t_min: string;
      t: string;
    };
    await page.locator('#station-chips button[data-station="lagoon"]').click();
    const card = page.locator('[data-plot="oxygen.o2_mg_l"]');
    const line = card.locator('.forecast-line');
    await expect.poll(() => line.getAttribute('data-issued'), { timeout: 10_000 }).toBe(latest.t);
    expect(Number(await line.getAttribute('data-min'))).toBe(latest.o2_min_mg_l);
    expect(Number(await line.getAttribute('data-lo'))).toBe(latest.o2_min_lo_mg_l);
    expect(Number(await line.getAttribute('data-hi'))).toBe(latest.o2_min_hi_mg_l);
    expect(await line.getAttribute('data-t-min')).toBe(latest.t_min);
    const m =
      /^Forecast issued (\d\d:\d\d): lowest (\d\.\d\d) mg\/L around (\d\d:\d\d), 80 % between (\d\.\d\d) mg\/L and (\d\.\d\d) mg\/L · observed (\d\.\d\d) mg\/L at \d\d:\d\d, (within|outside) the interval$/.exec(
        await line.innerText(),
      );
    expect(m, await line.innerText()).not.toBeNull();
    const local = (iso: string) => new Date(Date.parse(iso) - 10 * HOUR).toISOString().slice(11, 16);
    expect(m!.slice(1, 6)).toEqual([
      local(latest.t),
      latest.o2_min_mg_l.toFixed(2),
      local(latest.t_min),
      latest.o2_min_lo_mg_l.toFixed(2),
      latest.o2_min_hi_mg_l.toFixed(2),
    ]);
    const inside =
      Number(m![6]) >= latest.o2_min_lo_mg_l && Number(m![6]) <= latest.o2_min_hi_mg_l ? 'within' : 'outside';
    expect(m![7]).toBe(inside);
    await card.screenshot({ path: path.join(ARTIFACTS, 'dashboard-desktop-forecast.png') });
  });
});

describe('on a phone', () => {
  it('answers both questions on the first screen, fits the width, and stays short', async () => {
    const phone = await newPage({ width: 390, height: 844 });
    await phone.screenshot({ path: path.join(ARTIFACTS, 'dashboard-phone-first-screen.png') });
    for (const s of ['#reef-state', '#reef-headline', '#inst-state', '#inst-headline'])
      expect(await onFirstScreen(phone, s), s).toBe(true);
    expect(await phone.evaluate<number>('document.documentElement.scrollWidth')).toBeLessThanOrEqual(390);
    const height = await phone.evaluate<number>('document.documentElement.scrollHeight');
    expect(height).toBeLessThan(8000);
    // Map labels readable: at least 11 px on the screen.
    const sizes = await phone.evaluate<number[]>(
      `[...document.querySelectorAll('#map .station text')].map((t) => t.getBoundingClientRect().height)`,
    );
    expect(sizes.length).toBe(7);
    expect(Math.min(...sizes)).toBeGreaterThanOrEqual(11);
    // The sensor view opens in one column.
    await phone.locator('#inst-go').click();
    const facts = phone.locator('details[data-sensor="flat/co2-flat"] .facts');
    await facts.waitFor();
    const fb = (await facts.boundingBox())!;
    expect(fb.x + fb.width).toBeLessThanOrEqual(390);
    await phone.screenshot({ path: path.join(ARTIFACTS, 'dashboard-phone-sensor.png') });
    await phone.locator('#reef-go').click();
    await phone.screenshot({ path: path.join(ARTIFACTS, 'dashboard-phone-station.png') });
    await phone.screenshot({ path: path.join(ARTIFACTS, 'dashboard-phone.png'), fullPage: true });
    console.log(`phone page height ${height} px`);
    await phone.close();
  });
});

describe('limits come from the site', () => {
  it("draws and judges a stricter site's own oxygen limit", async () => {
    const strict = await createDashboardServer({
      config: {
        ...config,
        alerts: {
          ...(await import('../../libs/alerts/index.js')).alertsConfigSchema.parse({
            low_oxygen: { below: 3.5, clear: 4 },
          }),
        },
      },
      port: 0,
      logger: quiet,
      seed: live.flatMap((b) => b.records),
    });
    try {
      const p = await newPage({ width: 1360, height: 900 }, strict.url);
      await p.locator('#station-chips button[data-station="lagoon"]').click();
      expect(await p.locator('[data-plot="oxygen.o2_mg_l"]').getAttribute('data-limits')).toBe('3.5');
      expect(await p.locator('#reef-facts').innerText()).toContain('limit 3.50 mg/L');
      await p.close();
    } finally {
      await strict.close();
    }
  });
});
