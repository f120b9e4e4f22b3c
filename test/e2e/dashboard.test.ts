// The dashboard in a real browser: headless Chromium (playwright-core) against createDashboardServer,
// seeded with records made from the simulator's truth, then fed live records over server-sent events.
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { launchChromium } from './chromium.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord, type ReefdConfig } from '../../libs/contract/index.js';
import { createDashboardServer, type DashboardServer } from '../../services/dashboard/index.js';
import { runDemo } from '../../services/dashboard/demo-records.js';

const HOUR = 3_600_000;
const START = Date.UTC(2026, 2, 1, 0, 0);
const DURATION = 30 * HOUR;
const SPLIT = START + 29 * HOUR; // seeded up to here; the last hour arrives live
const quiet = { info() {}, warn() {}, error() {}, debug() {} };

let config: ReefdConfig;
let server: DashboardServer;
let browser: BrowserContext;
let page: Page;
let chrome: Awaited<ReturnType<typeof launchChromium>> | undefined;
let live: DerivedRecord[];
const acks: { id: string; by: string }[] = [];

beforeAll(async () => {
  const r = parseConfigText(
    readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
  );
  if (!r.ok) throw new Error('demo config invalid');
  config = r.config;
  const demo = runDemo({ config, startMs: START, hours: DURATION / HOUR, seed: 8 });
  const records = demo.batches.flatMap((b) => b.records);
  const seeded = records.filter((x) => Date.parse(x.t) < SPLIT);
  live = records.filter((x) => Date.parse(x.t) >= SPLIT);
  void acks;
  server = await createDashboardServer({
    config,
    seed: seeded,
    port: 0,
    logger: quiet,
    metrics: () => '# HELP reefd_up 1\nreefd_up 1\n',
    health: () => demo.processor.sensorHealth(),
  });
  chrome = await launchChromium();
  browser = chrome.browser;
  page = await browser.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  await page.goto(server.url);
  await page.waitForSelector('body[data-ready="true"]', { timeout: 20_000 });
  await page.waitForSelector('#live[data-state="live"]', { timeout: 10_000 });
  expect(errors).toEqual([]);
});

afterAll(async () => {
  await chrome?.close();
  await server?.close();
});

const tileText = (station: string, metric: string) =>
  page.locator(`#station-cards [data-station="${station}"] [data-metric="${metric}"] .v`).innerText();

describe('dashboard in the browser', () => {
  it('serves health, readiness and metrics', async () => {
    expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
    expect((await fetch(`${server.url}/readyz`)).status).toBe(200);
    expect(await (await fetch(`${server.url}/metrics`)).text()).toContain('reefd_up 1');
    expect((await fetch(`${server.url}/vendor/uplot.min.js`)).status).toBe(200);
  });

  it('shows live records published after load', async () => {
    const lastFlat = [...live].reverse().find((x) => x.type === 'carbonate' && x.station === 'flat');
    if (!lastFlat || lastFlat.type !== 'carbonate') throw new Error('no live carbonate record');
    const before = await tileText('flat', 'pco2_uatm');
    server.publish(live);
    const want = (lastFlat.pco2_uatm as number).toFixed(0);
    // Evaluated in the page (a string, so the test's own type check needs no DOM types).
    await page.waitForFunction(
      `document.querySelector('#station-cards [data-station="flat"] [data-metric="pco2_uatm"] .v')?.textContent === ${JSON.stringify(want)}`,
      undefined,
      { timeout: 10_000 },
    );
    expect(await tileText('flat', 'pco2_uatm')).toBe(want);
    expect(want).not.toBe(before);
    const liveText = await page.locator('#live-text').innerText();
    expect(liveText).toContain(new Date(Date.parse(live.at(-1)!.t)).toISOString().slice(11, 16));
  });

  it('every panel shows values', async () => {
    // Overview: every station placed on the schematic and listed with its freshness.
    expect(await page.locator('#map g.station').count()).toBe(Object.keys(config.stations).length);
    expect(await page.locator('#station-list li[data-fresh="ok"]').count()).toBeGreaterThanOrEqual(5);
    for (const k of ['Lowest O₂', 'Lowest Ω arag', 'Highest pCO₂', 'Biggest waves']) {
      expect(await page.locator(`#site-now [data-now="${k}"] .v`).innerText()).toMatch(
        /^\d+(\.\d+)?( \S+)*$/,
      );
    }
    // Station panels: each metric tile has a number and a plot.
    for (const [station, metrics] of Object.entries({
      crest: ['pco2_uatm', 'o2_mg_l', 'omega_ar', 'ph_total', 'temp_c', 'hm0_m', 'speed_m_s'],
      flat: ['pco2_uatm', 'o2_mg_l', 'omega_ar', 'ph_total', 'temp_c', 'hm0_m', 'speed_m_s'],
      lagoon: ['pco2_uatm', 'o2_mg_l', 'omega_ar', 'ph_total', 'temp_c', 'hm0_m'],
      channel: ['hm0_m', 'speed_m_s'],
    })) {
      for (const m of metrics) expect(await tileText(station, m)).toMatch(/^-?\d+(\.\d+)?$/);
      expect(await page.locator(`#station-cards [data-station="${station}"] .plot canvas`).count()).toBe(
        metrics.length,
      );
    }
    // Fluxes: numbers, validity and a plot for each transect.
    for (const t of Object.keys(config.transects)) {
      const card = page.locator(`#fluxes [data-transect="${t}"]`);
      expect(await card.locator('[data-field="NCP"] .v').innerText()).toMatch(/^-?\d+\.\d ±\d+\.\d mmol/);
      expect(await card.locator('.valid').innerText()).toMatch(/valid/);
      expect(await card.locator('canvas').count()).toBe(1);
    }
    // Alerts and sensor health.
    expect(await page.locator('#alert-list li.alert').count()).toBeGreaterThanOrEqual(4);
    const battery = await page.locator('#health-rows tr[data-sensor="co2-flat"] td').nth(4).innerText();
    expect(battery).toMatch(/^\d+\.\d\d V$/);
    expect(await page.locator('#health-rows tr').count()).toBe(
      Object.values(config.stations).reduce((n, s) => n + Object.keys(s.sensors).length, 0),
    );
  });

  it('acknowledges an alert: the callback fires and the UI shows it', async () => {
    const li = page.locator('#alert-list li.alert.raised:not(.acked)').first();
    const id = await li.getAttribute('data-alert-id');
    expect(id).toBeTruthy();
    await li.locator('button').click();
    await page.waitForSelector(`#alert-list li[data-alert-id="${id}"].acked`, { timeout: 10_000 });
    expect(acks).toEqual([{ id, by: 'dashboard' }]);
    expect(await page.locator(`#alert-list li[data-alert-id="${id}"] button`).innerText()).toBe(
      'Acknowledged by dashboard',
    );
  });

  it('saves a screenshot artefact', async () => {
    const dir = path.join(path.dirname(new URL(import.meta.url).pathname), '..', 'artifacts');
    mkdirSync(dir, { recursive: true });
    await page.screenshot({ path: path.join(dir, 'dashboard.png'), fullPage: true });
    const phone = await browser.newPage();
    await phone.setViewportSize({ width: 390, height: 844 });
    await phone.goto(server.url);
    await phone.waitForSelector('body[data-ready="true"]');
    await phone.screenshot({ path: path.join(dir, 'dashboard-phone.png'), fullPage: true });
    // On a phone the page is one column: nothing wider than the screen.
    expect(await phone.evaluate<number>('document.documentElement.scrollWidth')).toBeLessThanOrEqual(392);
    await phone.close();
  });
});
