import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { safeUserName } from '../../db/lock.ts';
import type { Actor } from '../../db/decision-log.ts';

/**
 * The per-user folder where Scalewright keeps its settings and the demo study: never inside the
 * project checkout. SCALEWRIGHT_DATA_DIR overrides it (tests use that).
 */
export function userDataDir(): string {
  if (process.env.SCALEWRIGHT_DATA_DIR) return path.resolve(process.env.SCALEWRIGHT_DATA_DIR);
  const home = os.homedir();
  if (process.platform === 'win32')
    return path.join(process.env.APPDATA ?? path.join(home, 'AppData', 'Roaming'), 'Scalewright');
  if (process.platform === 'darwin') return path.join(home, 'Library', 'Application Support', 'Scalewright');
  return path.join(process.env.XDG_DATA_HOME ?? path.join(home, '.local', 'share'), 'scalewright');
}

export function demoStudyPath(): string {
  return path.join(userDataDir(), 'demo.scalewright');
}

interface Settings {
  displayName?: string;
  recentStudies?: string[];
}

function settingsPath(): string {
  return path.join(userDataDir(), 'settings.json');
}

export function readSettings(): Settings {
  try {
    return JSON.parse(fs.readFileSync(settingsPath(), 'utf8')) as Settings;
  } catch {
    return {};
  }
}

export function writeSettings(update: Partial<Settings>): void {
  const next = { ...readSettings(), ...update };
  fs.mkdirSync(userDataDir(), { recursive: true });
  const temp = `${settingsPath()}.${process.pid}.tmp`;
  fs.writeFileSync(temp, JSON.stringify(next, null, 2));
  fs.renameSync(temp, settingsPath());
}

/** Who is working: the OS user, shown under the display name they chose (or SCALEWRIGHT_NAME). */
export function currentActor(): Actor {
  const user = safeUserName();
  return { user, name: process.env.SCALEWRIGHT_NAME ?? readSettings().displayName ?? user };
}

export function rememberRecent(studyPath: string): void {
  const recent = [studyPath, ...(readSettings().recentStudies ?? []).filter((p) => p !== studyPath)].slice(
    0,
    10,
  );
  writeSettings({ recentStudies: recent });
}
