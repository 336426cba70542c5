import fs from 'node:fs';
import { type Browser, chromium } from 'playwright-core';

export const CHROMIUM_PATH = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';

/** Debian's Chromium, headless, with no outside connections. Never downloads a browser. */
export async function launchChromium(): Promise<Browser> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `Chromium not found at ${CHROMIUM_PATH}: apt-get install -y chromium (or set CHROMIUM_PATH).`,
    );
  }
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      // Headless Chromium opens the address bar's popup (two browser-UI pages, each in a renderer of its
      // own) for every new window: about 0.5 s of CPU beside each fresh context's first page, which on a
      // 2-core machine slowed the page under test. A person's browser opens it once, not per page.
      '--disable-features=WebUIOmniboxPopup,WebUIOmniboxAimPopup',
    ],
  });
}
