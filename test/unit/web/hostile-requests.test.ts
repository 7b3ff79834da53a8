import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../../app/api/session.ts';
import { createRng, type Rng } from '../../../app/engine/rng.ts';
import { type BrowserServer, TOKEN_HEADER, startBrowserServer } from '../../../app/web/server.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import { rawRequest } from './raw-http.ts';

/**
 * Browser mode against requests nobody should send: every one is answered with a status, and the
 * server keeps serving. All traffic goes to a server this test starts on 127.0.0.1.
 */

/** Small body limits, so that oversized and over-budget bodies are cheap to send. */
const MAX_BODY = 64 * 1024;
const MAX_TOTAL = 160 * 1024;
/** Seed of the request fuzzer (test data only); the same requests every run. */
const FUZZ_SEED = 8_2026;
const FUZZ_REQUESTS = 300;
/** Requests in flight at once during the fuzz run. */
const FUZZ_PARALLEL = 4;

let tmp: ReturnType<typeof tempDir>;
let session: Session;
let server: BrowserServer;

beforeAll(async () => {
  tmp = tempDir();
  const staticDir = path.join(tmp.dir, 'dist');
  fs.mkdirSync(staticDir);
  fs.writeFileSync(path.join(staticDir, 'index.html'), '<!doctype html><title>t</title>');
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'Served');
  server = await startBrowserServer({
    session,
    staticDir,
    maxBodyBytes: MAX_BODY,
    maxTotalBodyBytes: MAX_TOTAL,
  });
});
afterAll(async () => {
  await server.close();
  session.close();
  tmp.cleanup();
});

function head(method: string, target: string, headers: Record<string, string | number>): string {
  const lines = Object.entries(headers).map(([k, v]) => `${k}: ${v}`);
  return `${method} ${target} HTTP/1.1\r\n${lines.join('\r\n')}\r\n\r\n`;
}

function goodHeaders(body: Buffer | string): Record<string, string | number> {
  return {
    host: `127.0.0.1:${server.port}`,
    [TOKEN_HEADER]: server.token,
    'content-type': 'application/json',
    'content-length': Buffer.byteLength(body),
    connection: 'close',
  };
}

async function goodCall(): Promise<void> {
  const body = JSON.stringify({ name: 'study.info', input: {} });
  const answer = await rawRequest(
    server.port,
    head('POST', '/api/call', goodHeaders(body)),
    Buffer.from(body),
  );
  expect(answer.status).toBe(200);
  expect(JSON.parse(answer.body)).toMatchObject({ ok: true, value: { title: 'Served' } });
}

describe('request paths that cannot name a file', () => {
  // Each of these stopped the server before: a throwing decodeURIComponent, a NUL in a file path.
  for (const target of ['/%ff', '/%', '/%E0%A4%A', '/index.html%00', '/%00', '/a%0d%0ab']) {
    it(`answers GET ${target} with 400 and keeps serving`, async () => {
      const answer = await rawRequest(
        server.port,
        head('GET', target, { host: `127.0.0.1:${server.port}`, connection: 'close' }),
      );
      expect(answer.status).toBe(400);
      await goodCall();
    });
  }

  it('still serves the interface itself', async () => {
    const answer = await rawRequest(
      server.port,
      head('GET', '/', { host: `127.0.0.1:${server.port}`, connection: 'close' }),
    );
    expect(answer.status).toBe(200);
    expect(answer.body).toContain('<title>t</title>');
  });
});

describe('request bodies', () => {
  it('refuses a body sent as another content type (415)', async () => {
    const body = JSON.stringify({ name: 'study.info', input: {} });
    const answer = await rawRequest(
      server.port,
      head('POST', '/api/call', { ...goodHeaders(body), 'content-type': 'text/plain' }),
      Buffer.from(body),
    );
    expect(answer.status).toBe(415);
  });

  it('refuses JSON that is not an object with 400', async () => {
    for (const body of ['null', '[1,2]', '"study.info"', '7']) {
      const answer = await rawRequest(
        server.port,
        head('POST', '/api/call', goodHeaders(body)),
        Buffer.from(body),
      );
      expect(answer.status, body).toBe(400);
    }
  });

  it('refuses a declared length past the per-call limit with 413 before reading it', async () => {
    const answer = await rawRequest(
      server.port,
      head('POST', '/api/call', { ...goodHeaders(''), 'content-length': MAX_BODY + 1 }),
    );
    expect(answer.status).toBe(413);
  });

  it('refuses a chunked body that grows past the per-call limit with 413', async () => {
    const chunk = Buffer.alloc(16 * 1024, 0x20);
    const chunks = Array.from({ length: 6 }, () =>
      Buffer.concat([Buffer.from(`${chunk.length.toString(16)}\r\n`), chunk, Buffer.from('\r\n')]),
    );
    const headers = { ...goodHeaders(''), 'transfer-encoding': 'chunked' };
    delete (headers as Record<string, unknown>)['content-length'];
    const answer = await rawRequest(server.port, head('POST', '/api/call', headers), Buffer.concat(chunks));
    expect(answer.status).toBe(413);
    await goodCall();
  });

  it('holds bodies within a total budget across concurrent calls: past it, 503', async () => {
    // Two calls each declare 60 KiB and send part of it, then wait: 120 KiB of the 160 KiB budget.
    const size = 60 * 1024;
    const open = [0, 1].map(() => {
      const req = http.request({
        host: '127.0.0.1',
        port: server.port,
        path: '/api/call',
        method: 'POST',
        headers: { ...goodHeaders(''), 'content-length': size },
      });
      const answered = new Promise<number>((resolve, reject) => {
        req.on('response', (res) => {
          res.resume();
          resolve(res.statusCode ?? 0);
        });
        req.on('error', reject);
      });
      req.write(Buffer.alloc(1024, 0x20));
      return { req, answered };
    });
    await expect.poll(() => server.heldBodyBytes()).toBe(2 * size);
    // A third 60 KiB call would pass the budget: refused before its body is read.
    const third = await rawRequest(
      server.port,
      head('POST', '/api/call', { ...goodHeaders(''), 'content-length': size }),
    );
    expect(third.status).toBe(503);
    expect(JSON.parse(third.body).error.code).toBe('busy');
    // A small call still fits beside them.
    await goodCall();
    // The two finish (as bodies that are not JSON); their bytes are given back.
    for (const { req } of open) req.end(Buffer.alloc(size - 1024, 0x20));
    expect(await Promise.all(open.map((o) => o.answered))).toEqual([400, 400]);
    await expect.poll(() => server.heldBodyBytes()).toBe(0);
    const again = JSON.stringify({ name: 'study.info', input: {}, pad: ' '.repeat(size) });
    const answer = await rawRequest(
      server.port,
      head('POST', '/api/call', goodHeaders(again)),
      Buffer.from(again),
    );
    expect(answer.status).toBe(200);
  });
});

/** One random request: a path, a method, headers and a body, any of which may be hostile. */
function fuzzRequest(rng: Rng, port: number): { head: Buffer; body: Buffer; what: string } {
  const pick = <T>(xs: readonly T[]): T => xs[rng.int(xs.length)];
  const pieces = [
    'index.html',
    'api',
    'call',
    '%',
    '%f',
    '%ff',
    '%E0%A4%A',
    '%00',
    '%2e%2e',
    '..',
    '%2f',
    '%c0%af',
    'assets',
    '%u0041',
    '%%%',
    '\u00e9',
    '%0d%0a',
    '~',
  ];
  let target = '/';
  const segments = rng.int(6);
  for (let i = 0; i < segments; i++) target += `${pick(pieces)}${rng.int(3) === 0 ? '/' : ''}`;
  const shape = rng.int(10);
  if (shape === 0) target = `/${'a%'.repeat(500 + rng.int(5000))}`;
  else if (shape === 1) target = `/${'x'.repeat(20_000)}`;
  else if (shape === 2) target = `/api/call?${pick(pieces)}`;
  else if (shape <= 6) target = '/api/call';
  const methods = ['GET', 'POST', 'HEAD', 'PUT', 'DELETE', 'OPTIONS', 'BREW', 'G\u0000T'];
  const method = target.startsWith('/api/call') && rng.int(4) > 0 ? 'POST' : pick(methods);
  const headers: string[] = [];
  const hostChoice = rng.int(8);
  if (hostChoice === 0) headers.push(`host: evil.example:${port}`);
  else if (hostChoice === 1) headers.push('host: 127.0.0.1');
  else if (hostChoice !== 2) headers.push(`host: ${pick(['127.0.0.1', 'localhost'])}:${port}`);
  const tokenChoice = rng.int(6);
  if (tokenChoice === 0) headers.push(`${TOKEN_HEADER}: wrong`);
  else if (tokenChoice !== 1) headers.push(`${TOKEN_HEADER}: ${server.token}`);
  if (rng.int(4) === 0)
    headers.push(`origin: ${pick(['http://evil.example', 'null', `http://127.0.0.1:${port}`])}`);
  headers.push(
    `content-type: ${pick(['application/json', 'application/json; charset=utf-8', 'text/plain', 'multipart/form-data; boundary=x', ''])}`,
  );
  const bodies = [
    () => JSON.stringify({ name: 'study.info', input: {} }),
    () =>
      JSON.stringify({ name: pick(['nope', 'facet.add', '__proto__', 'constructor']), input: { name: 3 } }),
    () => '{nope',
    () => 'null',
    () => '[]',
    () => `${'['.repeat(5000)}${']'.repeat(5000)}`,
    () => JSON.stringify({ name: 'study.info', input: { x: 'y'.repeat(rng.int(MAX_BODY)) } }),
    () => Buffer.from(Array.from({ length: 1 + rng.int(2000) }, () => rng.int(256))).toString('latin1'),
    () => '',
  ];
  let body = Buffer.from(pick(bodies)(), 'latin1');
  const lengthChoice = rng.int(12);
  if (lengthChoice === 0) {
    // Oversized: declared past the per-call limit (the body is not sent; the answer comes first).
    headers.push(`content-length: ${MAX_BODY + 1 + rng.int(1_000_000)}`);
    body = Buffer.alloc(0);
  } else if (lengthChoice === 1) {
    headers.push(`content-length: ${pick(['-1', 'abc', '1e3', ''])}`);
  } else {
    headers.push(`content-length: ${body.length}`);
  }
  headers.push('connection: close');
  const text = `${method} ${target} HTTP/1.1\r\n${headers.join('\r\n')}\r\n\r\n`;
  return {
    head: Buffer.from(text, 'latin1'),
    body,
    what: `${method} ${target.slice(0, 60)} (${headers.slice(0, 3).join(' | ').slice(0, 80)})`,
  };
}

describe('fuzzed requests', () => {
  it(`answers each of ${FUZZ_REQUESTS} seeded hostile requests and still serves a good one`, async () => {
    const rng = createRng(FUZZ_SEED);
    const requests = Array.from({ length: FUZZ_REQUESTS }, () => fuzzRequest(rng, server.port));
    const statuses = new Map<number, number>();
    let next = 0;
    const unanswered: string[] = [];
    async function worker(): Promise<void> {
      while (next < requests.length) {
        const r = requests[next++];
        const answer = await rawRequest(server.port, r.head, r.body, 10_000);
        if (answer.status < 200 || answer.status > 599) unanswered.push(r.what);
        statuses.set(answer.status, (statuses.get(answer.status) ?? 0) + 1);
      }
    }
    await Promise.all(Array.from({ length: FUZZ_PARALLEL }, worker));
    expect(unanswered).toEqual([]);
    // The mix reached the api and each of the refusals, not only one of them.
    for (const status of [200, 400, 401, 403, 405, 413, 415, 421])
      expect(statuses.get(status), `status ${status}`).toBeGreaterThan(0);
    await goodCall();
    await expect.poll(() => server.heldBodyBytes()).toBe(0);
  }, 60_000);
});
