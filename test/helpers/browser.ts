// Debian's chromium for the browser tests, through playwright-core (never a downloaded browser): where it
// is, whether this machine has it, and one way to start it, so every browser test runs the same browser
// with the same switches.
import { existsSync } from 'node:fs';
import type { BrowserContext } from 'playwright-core';

export const CHROMIUM = '/usr/bin/chromium';
export const haveChromium = existsSync(CHROMIUM);

/** A headless chromium with a fresh profile in `profileDir` (playwright-core takes it as the --user-data-dir). */
export async function launchChromium(profileDir: string): Promise<BrowserContext> {
  const { chromium } = await import('playwright-core');
  return chromium.launchPersistentContext(profileDir, {
    executablePath: CHROMIUM,
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}
