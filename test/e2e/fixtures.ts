import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { test as base } from '@playwright/test';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const SCREENSHOTS = path.join(ROOT, 'test', 'output', 'screenshots');

export interface AppUnderTest {
  url: string;
  dataDir: string;
  studyPath: string;
}

/**
 * Starts the app the way `npm start` does, forced into browser mode, with its own data folder
 * (so the demo study is created fresh, worked as far as `demoThrough` says), and stops it after the test.
 */
export const test = base.extend<{ app: AppUnderTest; demoThrough: 'purification' | 'validity' }>({
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
});

export { expect } from '@playwright/test';
