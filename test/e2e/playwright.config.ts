import fs from 'node:fs';
import { defineConfig } from '@playwright/test';

/** Debian's Chromium; Playwright's own browser download cannot work on these machines. */
export const CHROMIUM = process.env.SCALEWRIGHT_CHROMIUM ?? '/usr/bin/chromium';

if (!fs.existsSync(CHROMIUM)) {
  const message = `Chromium not found at ${CHROMIUM}; install it (apt-get install -y chromium) or set SCALEWRIGHT_CHROMIUM`;
  if (process.env.CI) throw new Error(message);
  console.warn(`warning: ${message}; browser tests will fail`);
}

export default defineConfig({
  testDir: '.',
  outputDir: '../output/playwright',
  timeout: 60_000,
  workers: 1,
  reporter: [['list']],
  use: {
    viewport: { width: 1400, height: 900 },
    launchOptions: {
      executablePath: CHROMIUM,
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run',
      ],
    },
  },
});
