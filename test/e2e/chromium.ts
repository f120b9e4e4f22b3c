// Debian's Chromium for the browser tests, driven by playwright-core (no browser download). The flags keep it
// off the network entirely: on this closed network its background services would only fail to connect.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

export const CHROMIUM = '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** A fresh profile per run (the persistent context takes the user-data-dir itself); close() removes it. */
export async function launchChromium(
  viewport = { width: 1360, height: 900 },
): Promise<{ browser: BrowserContext; close(): Promise<void> }> {
  const userDir = mkdtempSync(path.join(tmpdir(), 'reefd-chromium-'));
  const browser = await chromium.launchPersistentContext(userDir, {
    executablePath: CHROMIUM,
    args: CHROMIUM_ARGS,
    viewport,
  });
  return {
    browser,
    close: async () => {
      await browser.close();
      rmSync(userDir, { recursive: true, force: true });
    },
  };
}
