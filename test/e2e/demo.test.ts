// The built-in demo in a real browser, as a newcomer meets it: `reefd run` with no configuration (embedded
// broker, simulated reef, pipeline, dashboard), run from the sources, then headless Chromium (Debian's, via
// playwright-core) asks the page its questions while the day of back-fill plays at 600x.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchChromium } from './chromium.js';
import { REPO_ROOT } from './helpers/reefd.js';

const CLI = path.join(REPO_ROOT, 'test', 'e2e', 'helpers', 'cli.ts');
const ARTIFACTS = path.join(REPO_ROOT, 'test', 'artifacts');
let daemon: ChildProcess;
let url: string;
let dataDir: string;
let chrome: Awaited<ReturnType<typeof launchChromium>> | undefined;
let browser: BrowserContext;
let page: Page;
let startedMs: number;
let stderr = '';

/** `reefd <args>` from the sources; resolves with the exit code and the output. */
function reefd(args: string[]): Promise<{ code: number | null; out: string }> {
  const child = spawn(process.execPath, ['--import', 'tsx', CLI, ...args], {
    cwd: REPO_ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NODE_OPTIONS: '' },
  });
  let out = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr.on('data', (d: Buffer) => (out += d.toString()));
  return new Promise((r) => child.once('exit', (code) => r({ code, out })));
}

beforeAll(async () => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'reefd-demo-'));
  mkdirSync(ARTIFACTS, { recursive: true });
  startedMs = Date.now();
  // 600x: the day of back-fill plays in ~2.4 min; the first windows and faults arrive within a minute.
  daemon = spawn(
    process.execPath,
    ['--import', 'tsx', CLI, 'run', '--data', dataDir, '--port', '0', '--speed', '600'],
    { cwd: REPO_ROOT, stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, NODE_OPTIONS: '' } },
  );
  url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`no "dashboard listening" line in 45 s:\n${stderr}`)),
      45_000,
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
}, 90_000);

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
  it('answers "is the reef all right" and "is every instrument all right" within a minute of start', async () => {
    await expect
      .poll(async () => (await page.locator('#verdict-reef').getAttribute('data-level')) !== 'unknown', {
        timeout: 60_000,
        interval: 500,
      })
      .toBe(true);
    await expect
      .poll(
        async () => (await page.locator('#verdict-instruments').getAttribute('data-level')) !== 'unknown',
        {
          timeout: 30_000,
          interval: 500,
        },
      )
      .toBe(true);
    expect(await page.locator('#reef-state').innerText()).toMatch(/^(In trouble|Keep an eye on it|Fine)$/);
    expect(await page.locator('#reef-headline').innerText()).not.toBe('');
    expect(await page.locator('#inst-headline').innerText()).not.toBe('');
    // The flux panel fills once the first windows close.
    const ncp = page.locator('#flux-now [data-field="NCP"] .v');
    await expect
      .poll(async () => (await ncp.count()) > 0 && /^−?\d+(\.\d+)? ± \d/.test(await ncp.innerText()), {
        timeout: 60_000,
        interval: 500,
      })
      .toBe(true);
    const seconds = (Date.now() - startedMs) / 1000;
    console.log(
      `demo: both verdicts and the first flux on the page ${seconds.toFixed(0)} s after reefd run started`,
    );
    expect(seconds).toBeLessThan(90);
    await page.screenshot({ path: path.join(ARTIFACTS, 'demo-first-screen.png') });
  }, 100_000);

  it('plots what the pipeline derives at the mid flat, in the site time', async () => {
    await page.locator('#station-chips button[data-station="flat"]').click();
    for (const q of [
      'oxygen.o2_mg_l',
      'oxygen.o2_sat_pct',
      'carbonate.pco2_uatm',
      'carbonate.sal',
      'waves.depth_m',
      'current.dir_to_deg',
      'light.par_umol_m2_s',
    ]) {
      const card = page.locator(`[data-plot="${q}"]`);
      await expect
        .poll(async () => Number((await card.getAttribute('data-points')) ?? 0), {
          timeout: 45_000,
          interval: 500,
        })
        .toBeGreaterThan(0);
    }
    // The site lives at UTC-10 (deploy/demo/ornen-reef.yaml): the readout gives both clocks.
    const readout = await page.locator('[data-plot="oxygen.o2_mg_l"] .readout').innerText();
    const [local, utc] = /(\d\d:\d\d) site time · (\d\d:\d\d) UTC/.exec(readout)!.slice(1);
    const m = (s: string) => Number(s.slice(0, 2)) * 60 + Number(s.slice(3));
    expect((m(utc!) - m(local!) + 1440) % 1440).toBe(600);
    expect((await fetch(`${url}/readyz`)).status).toBe(200);
    expect(await (await fetch(`${url}/metrics`)).text()).toMatch(
      /reefd_records_out_total\{type="flux"\} [1-9]/,
    );
  }, 60_000);

  it('answers /api/records from the record history for a range, and documents every endpoint', async () => {
    type Page = { source: string; records: { t: string; station: string }[] };
    const get = async (q: string) => (await (await fetch(`${url}/api/records?${q}`)).json()) as Page;
    // The simulation starts a day back: the default range (the 48 h before the newest record) holds it all.
    const all = await get('type=oxygen&station=lagoon');
    expect(all.source).toBe('record history');
    expect(all.records.length).toBeGreaterThan(4);
    const from = all.records[1]!.t;
    const to = all.records[Math.floor(all.records.length / 2)]!.t;
    const part = await get(`type=oxygen&station=lagoon&from=${from}&to=${to}`);
    expect(part.records.length).toBeGreaterThan(0);
    expect(part.records.length).toBeLessThan(all.records.length);
    expect(part.records.every((r) => r.station === 'lagoon' && r.t >= from && r.t < to)).toBe(true);
    const doc = (await (await fetch(`${url}/openapi.json`)).json()) as { openapi: string; paths: object };
    expect(doc.openapi).toBe('3.1.0');
    expect(Object.keys(doc.paths)).toContain('/api/records');
  });

  it('raises a scripted fault and acknowledges it by name from the page; the CLI shows the same', async () => {
    const form = page.locator('#alert-list li.alert form').first();
    await form.waitFor({ timeout: 120_000 });
    const li = page.locator('#alert-list li.alert', { has: page.locator('form') }).first();
    const id = (await li.getAttribute('data-alert-id'))!;
    expect(id).toMatch(/^[0-9a-f]{8}$/);
    expect(await li.locator('.detail').innerText()).toMatch(/\d/);
    await li.locator('input[name="by"]').fill('Demo Visitor');
    await li.locator('input[name="comment"]').fill('looking at it');
    await li.locator('button[type="submit"]').click();
    await page.waitForSelector(`#alert-list li[data-alert-id="${id}"][data-acked="true"]`, {
      timeout: 10_000,
    });
    const acks = readFileSync(path.join(dataDir, 'alerts', 'acks.jsonl'), 'utf8');
    expect(acks).toContain(`"id":"${id}"`);
    expect(acks).toContain('"comment":"looking at it"');
    const list = await reefd(['alerts', 'list', '--data', dataDir, '--all']);
    expect(list.code).toBe(0);
    expect(list.out).toMatch(new RegExp(`${id} .* acked by Demo Visitor .* "looking at it"`));
  }, 140_000);

  it('stops cleanly on SIGTERM, leaving a checkpoint and the dashboard history in small segments', async () => {
    const exited = new Promise<number | null>((r) => daemon.once('exit', (code) => r(code)));
    const t0 = Date.now();
    daemon.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(Date.now() - t0).toBeLessThan(10_000);
    const cp = JSON.parse(readFileSync(path.join(dataDir, 'checkpoint.json'), 'utf8')) as {
      state: { counters: { accepted: number } };
    };
    expect(cp.state.counters.accepted).toBeGreaterThan(100);
    const segments = readdirSync(path.join(dataDir, 'dashboard-history')).filter((f) =>
      f.endsWith('.ndjson'),
    );
    expect(segments.length).toBeGreaterThan(1);
    expect(existsSync(path.join(dataDir, 'dashboard-history.ndjson'))).toBe(false);
  }, 15_000);
});
