/**
 * Polls a condition by timer until it holds: the app re-renders on animation frames, which stall
 * Playwright's own waits in headless mode, so browser tests wait this way.
 */
export async function until(what: string, f: () => Promise<boolean>, ms = 20_000): Promise<void> {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    if (await f().catch(() => false)) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}
