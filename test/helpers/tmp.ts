import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Actor } from '../../db/decision-log.ts';

export const TEST_ACTOR: Actor = { user: 'tester', name: 'Test Researcher' };

/** A fresh folder under the system temp dir, removed by the returned cleanup. */
export function tempDir(prefix = 'scalewright-'): { dir: string; cleanup(): void } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  return { dir, cleanup: () => fs.rmSync(dir, { recursive: true, force: true }) };
}

export function sha256File(file: string): string {
  return crypto.createHash('sha256').update(fs.readFileSync(file)).digest('hex');
}
