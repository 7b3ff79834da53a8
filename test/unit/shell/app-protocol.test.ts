import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { APP_INDEX_URL, appProtocolHandler, isAppUrl } from '../../../app/shell/app-protocol.ts';
import { CONTENT_SECURITY_POLICY } from '../../../app/web/static-files.ts';
import { tempDir } from '../../helpers/tmp.ts';

/** The desktop shell's own scheme: the built interface, and nothing beside it. */
let tmp: ReturnType<typeof tempDir>;
let handle: (request: Request) => Promise<Response>;

beforeAll(() => {
  tmp = tempDir();
  const dist = path.join(tmp.dir, 'dist');
  fs.mkdirSync(path.join(dist, 'assets'), { recursive: true });
  fs.writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>app</title>');
  fs.writeFileSync(path.join(dist, 'assets', 'main.js'), 'export {};');
  fs.writeFileSync(path.join(tmp.dir, 'secret.txt'), 'not for the page');
  handle = appProtocolHandler(dist);
});
afterAll(() => tmp.cleanup());

async function get(url: string, method = 'GET'): Promise<{ status: number; body: string; headers: Headers }> {
  const response = await handle(new Request(url, { method }));
  return { status: response.status, body: await response.text(), headers: response.headers };
}

describe('the app scheme', () => {
  it('serves the interface with the strict content policy', async () => {
    const index = await get(APP_INDEX_URL);
    expect(index.status).toBe(200);
    expect(index.body).toContain('<title>app</title>');
    expect(index.headers.get('content-security-policy')).toBe(CONTENT_SECURITY_POLICY);
    expect(index.headers.get('content-type')).toBe('text/html; charset=utf-8');
    expect((await get('scalewright://app/assets/main.js')).headers.get('content-type')).toMatch(/javascript/);
    expect((await get('scalewright://app/')).status).toBe(200);
  });

  it('serves nothing outside the interface folder', async () => {
    for (const url of [
      'scalewright://app/../secret.txt',
      'scalewright://app/%2e%2e/secret.txt',
      'scalewright://app/..%2fsecret.txt',
      'scalewright://app/assets/..%2f..%2fsecret.txt',
      'scalewright://app/missing.js',
      'scalewright://elsewhere/index.html',
    ]) {
      const answer = await get(url);
      expect(answer.status, url).toBe(404);
      expect(answer.body, url).not.toContain('not for the page');
    }
  });

  it('answers paths that cannot name a file with 400, and other methods with 405', async () => {
    for (const url of ['scalewright://app/%ff', 'scalewright://app/%', 'scalewright://app/index.html%00']) {
      expect((await get(url)).status, url).toBe(400);
    }
    expect((await get(APP_INDEX_URL, 'POST')).status).toBe(405);
  });

  it('tells its own pages from others', () => {
    expect(isAppUrl(APP_INDEX_URL)).toBe(true);
    for (const url of [
      'file:///tmp/index.html',
      'https://app/index.html',
      'scalewright://other/',
      'nonsense',
    ]) {
      expect(isAppUrl(url), url).toBe(false);
    }
  });
});
