/**
 * A real Chromium for the UI tests and the review benchmark, driven by playwright-core (never
 * `playwright install`). Chosen at run time: MOVESIFT_CHROMIUM, then Debian's /usr/bin/chromium,
 * then the browser shipped inside the npm package @sparticuz/chromium. The flags are the
 * minimum for a headless root session on a closed network; web security stays on, so the
 * app's Content-Security-Policy is enforced as in a user's browser.
 */
import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

const FLAGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--autoplay-policy=no-user-gesture-required'];

export async function chromiumPath(): Promise<{ path: string; source: string }> {
  if (process.env.MOVESIFT_CHROMIUM) return { path: process.env.MOVESIFT_CHROMIUM, source: 'MOVESIFT_CHROMIUM' };
  if (existsSync('/usr/bin/chromium')) return { path: '/usr/bin/chromium', source: 'Debian chromium' };
  const sparticuz = (await import('@sparticuz/chromium')).default;
  return { path: await sparticuz.executablePath(), source: '@sparticuz/chromium' };
}

export async function launchChromium(): Promise<Browser> {
  const { path } = await chromiumPath();
  return chromium.launch({ executablePath: path, args: FLAGS, headless: true });
}
