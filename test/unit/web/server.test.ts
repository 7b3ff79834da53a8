import http from 'node:http';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../../app/api/session.ts';
import { type BrowserServer, TOKEN_HEADER, startBrowserServer } from '../../../app/web/server.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
let server: BrowserServer;

beforeAll(async () => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'Served');
  server = await startBrowserServer({ session, staticDir: tmp.dir });
});
afterAll(async () => {
  await server.close();
  session.close();
  tmp.cleanup();
});

function request(options: {
  host?: string;
  token?: string;
  origin?: string;
  body?: string;
  method?: string;
  path?: string;
}) {
  return new Promise<{ status: number; body: string }>((resolve, reject) => {
    const headers: Record<string, string> = {
      host: options.host ?? `127.0.0.1:${server.port}`,
      'content-type': 'application/json',
    };
    if (options.token !== undefined) headers[TOKEN_HEADER] = options.token;
    if (options.origin) headers.origin = options.origin;
    const req = http.request(
      {
        host: '127.0.0.1',
        port: server.port,
        path: options.path ?? '/api/call',
        method: options.method ?? 'POST',
        headers,
      },
      (res) => {
        let body = '';
        res.on('data', (c) => {
          body += c;
        });
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      },
    );
    req.on('error', reject);
    req.end(
      options.method === 'GET'
        ? undefined
        : (options.body ?? JSON.stringify({ name: 'study.info', input: {} })),
    );
  });
}

describe('browser-mode server', () => {
  it('binds to loopback and prints an address carrying the token', () => {
    expect(server.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/#token=[A-Za-z0-9_-]{32}$/);
  });

  it('answers a call that carries the token', async () => {
    const res = await request({ token: server.token });
    expect(res.status).toBe(200);
    expect(JSON.parse(res.body)).toMatchObject({ ok: true, value: { title: 'Served' } });
  });

  it('refuses a call without the token or with a wrong one', async () => {
    expect((await request({})).status).toBe(401);
    expect((await request({ token: 'guess' })).status).toBe(401);
  });

  it('refuses a foreign Host header (DNS rebinding) and a foreign Origin', async () => {
    expect((await request({ token: server.token, host: `evil.example:${server.port}` })).status).toBe(421);
    expect((await request({ token: server.token, origin: 'http://evil.example' })).status).toBe(403);
  });

  it('reports a body that is not JSON', async () => {
    const res = await request({ token: server.token, body: '{nope' });
    expect(res.status).toBe(400);
    expect(JSON.parse(res.body).error.message).toBe('the request body is not JSON');
  });

  it('does not serve files outside its folder', async () => {
    for (const attempt of ['/../../etc/passwd', '/..%2f..%2f..%2fetc%2fpasswd']) {
      const res = await request({ method: 'GET', path: attempt });
      expect(res.status, attempt).toBe(404);
    }
  });
});
