// The built-in demo in a real browser, as a newcomer meets it: `reefd run` with no configuration (embedded
// broker, simulated reef, pipeline, dashboard), then headless Chromium (Debian's, via playwright-core) waits
// for live data on every panel and acknowledges an alert through the daemon's outbox.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { launchChromium } from './chromium.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

let daemon: ChildProcess;
let url: string;
let dataDir: string;
let chrome: Awaited<ReturnType<typeof launchChromium>> | undefined;
let browser: BrowserContext;
let page: Page;
let startedMs: number;
let stderr = '';

beforeAll(async () => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'reefd-demo-'));
  startedMs = Date.now();
  // 600x: the day of back-fill plays in ~2.4 min; the first windows and faults arrive within a minute.
  daemon = spawn(
    process.execPath,
    ['bin/reefd.js', 'run', '--data', dataDir, '--port', '0', '--speed', '600'],
    {
      stdio: ['ignore', 'ignore', 'pipe'],
    },
  );
  url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`no "dashboard listening" line in 30 s:\n${stderr}`)),
      30_000,
    );
    daemon.stderr!.on('data', (d: Buffer) => {
      stderr += d.toString();
      const m = /"url":"(http:\/\/127\.0\.0\.1:\d+)","msg":"dashboard listening"/.exec(stderr);
      if (m) {
        clearTimeout(timer);
        resolve(m[1]!);
      }
    });
    daemon.once('exit', (code) => reject(new Error(`reefd run exited ${code}:\n${stderr}`)));
  });
  chrome = await launchChromium();
  browser = chrome.browser;
  page = await browser.newPage();
  await page.goto(url);
  await page.waitForSelector('body[data-ready="true"]', { timeout: 20_000 });
}, 60_000);

afterAll(async () => {
  await chrome?.close();
  if (daemon && daemon.exitCode === null) {
    const exited = new Promise((r) => daemon.once('exit', r));
    daemon.kill('SIGTERM');
    await exited;
  }
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

describe('the demo', () => {
  it('shows live fluxes within 60 s of start', async () => {
    // Polled through locators: the page's content-security policy forbids evaluating strings in it.
    const ncp = page.locator('#fluxes [data-transect="outer"] [data-field="NCP"] .v');
    await expect
      .poll(async () => (await ncp.count()) > 0 && /-?\d+\.\d ±/.test(await ncp.innerText()), {
        timeout: 60_000,
        interval: 500,
      })
      .toBe(true);
    const seconds = (Date.now() - startedMs) / 1000;
    console.log(`demo: first flux on the dashboard ${seconds.toFixed(0)} s after reefd run started`);
    expect(seconds).toBeLessThan(60);
  }, 70_000);

  it('fills every station panel with values from the pipeline', async () => {
    const omega = page.locator('#station-cards [data-station="flat"] [data-metric="omega_ar"] .v');
    await expect
      .poll(async () => /^\d/.test(await omega.innerText()), { timeout: 30_000, interval: 500 })
      .toBe(true);
    for (const m of ['pco2_uatm', 'o2_mg_l', 'omega_ar', 'ph_total', 'temp_c', 'hm0_m', 'speed_m_s']) {
      const tile = page.locator(`#station-cards [data-station="flat"] [data-metric="${m}"] .v`);
      await expect
        .poll(async () => await tile.innerText(), { timeout: 30_000, interval: 500 })
        .toMatch(/^-?\d+(\.\d+)?$/);
    }
    expect(await (await fetch(`${url}/readyz`)).status).toBe(200);
    expect(await (await fetch(`${url}/metrics`)).text()).toMatch(
      /reefd_records_out_total\{type="flux"\} [1-9]/,
    );
  }, 40_000);

  it('raises a scripted sensor fault and acknowledges it through the outbox', async () => {
    const li = page.locator('#alert-list li.alert.raised:not(.acked)').first();
    await li.waitFor({ timeout: 90_000 });
    const id = await li.getAttribute('data-alert-id');
    expect(id).toMatch(/^[0-9a-f]{8}$/);
    await li.locator('button').click();
    await page.waitForSelector(`#alert-list li[data-alert-id="${id}"].acked`, { timeout: 10_000 });
    const acks = readFileSync(path.join(dataDir, 'alerts', 'acks.jsonl'), 'utf8');
    expect(acks).toContain(id!);
  }, 100_000);

  it('stops cleanly on SIGTERM and leaves a checkpoint', async () => {
    const exited = new Promise<number | null>((r) => daemon.once('exit', (code) => r(code)));
    const t0 = Date.now();
    daemon.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(Date.now() - t0).toBeLessThan(10_000);
    const cp = JSON.parse(readFileSync(path.join(dataDir, 'checkpoint.json'), 'utf8')) as {
      state: { counters: { accepted: number } };
    };
    expect(cp.state.counters.accepted).toBeGreaterThan(100);
  }, 15_000);
});
