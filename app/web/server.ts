import crypto from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { dispatch } from '../api/dispatch.ts';
import type { Session } from '../api/session.ts';

export const TOKEN_HEADER = 'x-scalewright-token';
const MAX_BODY_BYTES = 256 * 1024 * 1024;

const CONTENT_TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.json': 'application/json',
  '.woff2': 'font/woff2',
};

/** The same policy the desktop shell sets: nothing loads from anywhere but this origin. */
export const CONTENT_SECURITY_POLICY =
  "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; font-src 'self'; connect-src 'self'; form-action 'none'; frame-ancestors 'none'; base-uri 'none'";

export interface BrowserServer {
  url: string;
  port: number;
  token: string;
  close(): Promise<void>;
}

/**
 * Serves the built renderer and the command table on loopback only. Every api call must carry
 * the per-launch token, and every request must name this server in its Host header (so a page
 * elsewhere cannot reach it through DNS rebinding).
 */
export async function startBrowserServer(options: {
  session: Session;
  staticDir: string;
  port?: number;
  token?: string;
}): Promise<BrowserServer> {
  const token = options.token ?? crypto.randomBytes(24).toString('base64url');
  const staticRoot = path.resolve(options.staticDir);
  let port = 0;

  const server = http.createServer((req, res) => {
    const host = req.headers.host ?? '';
    if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) {
      sendText(res, 421, 'this server answers only to 127.0.0.1');
    } else if (new URL(req.url ?? '/', `http://${host}`).pathname === '/api/call') {
      handleApi(req, res);
    } else if (req.method !== 'GET' && req.method !== 'HEAD') {
      sendText(res, 405, 'method not allowed');
    } else {
      serveStatic(new URL(req.url ?? '/', `http://${host}`).pathname, res);
    }
  });

  function handleApi(req: http.IncomingMessage, res: http.ServerResponse): void {
    const origin = req.headers.origin;
    if (req.method !== 'POST') {
      sendText(res, 405, 'method not allowed');
      return;
    }
    if (
      origin !== undefined &&
      origin !== `http://127.0.0.1:${port}` &&
      origin !== `http://localhost:${port}`
    ) {
      sendError(res, 403, 'forbidden', 'cross-origin call refused');
      return;
    }
    if (!safeEqual(String(req.headers[TOKEN_HEADER] ?? ''), token)) {
      sendError(
        res,
        401,
        'unauthorized',
        'missing or wrong session token; open the address printed by npm start',
      );
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    req.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > MAX_BODY_BYTES) {
        sendError(res, 413, 'too-large', `request larger than ${MAX_BODY_BYTES} bytes`);
        req.destroy();
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', async () => {
      if (res.writableEnded) return;
      let body: { name?: unknown; input?: unknown };
      try {
        body = JSON.parse(Buffer.concat(chunks).toString('utf8'));
      } catch {
        sendError(res, 400, 'invalid-input', 'the request body is not JSON');
        return;
      }
      const result = await dispatch(options.session, body?.name, body?.input);
      send(res, 200, 'application/json', JSON.stringify(result));
    });
  }

  function serveStatic(pathname: string, res: http.ServerResponse): void {
    const relative = decodeURIComponent(pathname === '/' ? '/index.html' : pathname);
    const file = path.resolve(staticRoot, `.${relative}`);
    if (!file.startsWith(staticRoot + path.sep)) {
      sendText(res, 404, 'not found');
      return;
    }
    fs.readFile(file, (error, data) => {
      if (error) sendText(res, 404, 'not found');
      else send(res, 200, CONTENT_TYPES[path.extname(file)] ?? 'application/octet-stream', data);
    });
  }

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 0, '127.0.0.1', () => resolve());
  });
  port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}/#token=${token}`,
    port,
    token,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

function send(res: http.ServerResponse, status: number, type: string, body: string | Buffer): void {
  res.writeHead(status, {
    'content-type': type,
    'content-security-policy': CONTENT_SECURITY_POLICY,
    'x-content-type-options': 'nosniff',
    'referrer-policy': 'no-referrer',
    'cache-control': 'no-store',
  });
  res.end(body);
}

function sendText(res: http.ServerResponse, status: number, text: string): void {
  send(res, status, 'text/plain; charset=utf-8', text);
}

function sendError(res: http.ServerResponse, status: number, code: string, message: string): void {
  send(res, status, 'application/json', JSON.stringify({ ok: false, error: { code, message } }));
}

function safeEqual(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && crypto.timingSafeEqual(x, y);
}
