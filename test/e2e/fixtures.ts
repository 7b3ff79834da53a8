import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { test as base, expect, type Locator, type Page } from '@playwright/test';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const SCREENSHOTS = path.join(ROOT, 'test', 'output', 'screenshots');

/** How long a test that runs purification rounds may take, starting the app included. */
const ROUNDS_TIMEOUT_MS = 180_000;

export interface AppUnderTest {
  url: string;
  dataDir: string;
  studyPath: string;
}

/**
 * Starts the app the way `npm start` does, forced into browser mode, with its own data folder
 * (so the demo study is created fresh, worked as far as `demoThrough` says), and stops it after the test.
 */
export const test = base.extend<{
  app: AppUnderTest;
  demoThrough: 'purification' | 'validity';
  purification: PurificationSteps;
}>({
  /** How far the demo is worked (see fillDemoStudy): `purification` leaves purification open. */
  demoThrough: ['validity', { option: true }],
  app: async ({ demoThrough }, use) => {
    const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'scalewright-e2e-'));
    const child: ChildProcess = spawn(
      process.execPath,
      [
        path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'),
        'app/launch/start.ts',
        '--browser',
        '--port',
        '0',
      ],
      {
        cwd: ROOT,
        env: {
          ...process.env,
          SCALEWRIGHT_DATA_DIR: dataDir,
          SCALEWRIGHT_NAME: 'E2E Researcher',
          SCALEWRIGHT_DEMO_THROUGH: demoThrough,
        },
      },
    );
    let output = '';
    const url = await new Promise<string>((resolve, reject) => {
      // Starting creates the demo study, whose purification rounds run a factor analysis each.
      const timer = setTimeout(() => reject(new Error(`the app did not start:\n${output}`)), 60_000);
      const onData = (chunk: Buffer) => {
        output += chunk.toString();
        const match = /open (http:\/\/127\.0\.0\.1:\d+\/#token=\S+)/.exec(output);
        if (match) {
          clearTimeout(timer);
          resolve(match[1]);
        }
      };
      child.stdout?.on('data', onData);
      child.stderr?.on('data', onData);
      child.on('exit', (code) => reject(new Error(`the app exited with ${code}:\n${output}`)));
    });
    await use({ url, dataDir, studyPath: path.join(dataDir, 'demo.scalewright') });
    child.kill('SIGTERM');
    await new Promise((resolve) => child.once('exit', resolve));
    fs.rmSync(dataDir, { recursive: true, force: true });
  },
  /** Steps on the purification workbench; a test that takes them gets the time its rounds need. */
  purification: async ({ page, app }, use, testInfo) => {
    // Each round runs its bootstrap and its factor analysis (with parallel analysis) in a worker.
    testInfo.setTimeout(ROUNDS_TIMEOUT_MS);
    await use(new PurificationSteps(page, app));
  },
});

/**
 * The steps on the purification workbench that several specs take, each waiting until the screen
 * shows its result: open the phase, show a round, restore a departed item, run the next round, and
 * drop an item with both reasons.
 */
export class PurificationSteps {
  constructor(
    private readonly page: Page,
    private readonly app: AppUnderTest,
  ) {}

  /** Opens the study and goes to purification. */
  async open(): Promise<void> {
    await this.page.goto(this.app.url);
    await this.page.locator('.sidebar a[href="#/phase/purification"]').click();
  }

  /** Shows round `number` and waits for its reliability panel. */
  async showRound(number: number): Promise<void> {
    await this.page.locator('.round-tab', { hasText: `Round ${number}` }).click();
    await this.reliabilityOf(number);
  }

  /** Reverses the drop of a departed item, with the domain reason the reversal asks for. */
  async restore(code: string, domainReason: string): Promise<void> {
    const departures = this.page.locator('.departures');
    await departures.locator('tbody tr', { hasText: code }).getByRole('button', { name: 'Restore…' }).click();
    await this.page.getByLabel(`Domain reason for reversing the drop of ${code}`).fill(domainReason);
    await departures.getByRole('button', { name: 'Restore', exact: true }).click();
  }

  /** Runs round `number` and waits until it is the round shown. */
  async runRound(number: number): Promise<void> {
    await this.page.getByRole('button', { name: `Run round ${number}` }).click();
    // A round runs its bootstrap and its factor analysis (with parallel analysis) in a worker: allow
    // it the time. The "Run round N" button also matches "Round N", so wait for the round's own tab.
    await expect(this.page.locator('.round-tab', { hasText: `Round ${number}` })).toBeVisible({
      timeout: 120_000,
    });
    await expect(this.page.locator('.round-tab.active')).toContainText(`Round ${number}`);
    await this.reliabilityOf(number);
  }

  /** Selects an item in the item table; its decision panel, once it shows that item. */
  async openItem(code: string): Promise<Locator> {
    await this.page.getByRole('button', { name: `Item ${code}` }).click();
    const panel = this.page.locator('.decision-panel');
    await expect(panel.locator('h2')).toContainText(`Item ${code}`);
    return panel;
  }

  /** Drops the selected item with both reasons, and waits until the item table shows it dropped. */
  async drop(code: string, reasons: { domain: string; statistics: string }): Promise<void> {
    const panel = this.page.locator('.decision-panel');
    await panel.locator('#rationale-domain').fill(reasons.domain);
    await panel.locator('#rationale-statistics').fill(reasons.statistics);
    await panel.getByRole('button', { name: 'Drop', exact: true }).click();
    await expect(panel.locator('.done-note')).toContainText(
      `Dropped ${code}. The next round starts from this decision.`,
    );
    await expect(this.page.locator('.item-table tbody tr.dropped')).toContainText(code);
  }

  private async reliabilityOf(number: number): Promise<void> {
    await expect(
      this.page.locator('.panel-head h2', { hasText: `Reliability, round ${number}` }),
    ).toBeVisible();
  }
}

export { expect };
