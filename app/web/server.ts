import crypto from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { dispatch } from '../api/dispatch.ts';
import type { Session } from '../api/session.ts';
import { CONTENT_SECURITY_POLICY, contentType, requestPath, staticFile } from './static-files.ts';

export const TOKEN_HEADER = 'x-scalewright-token';

/**
 * Largest body of one api call: 256 MiB, room for the largest upload the command table accepts
 * (128 MiB of data as base64, about 171 MiB) and its JSON around it.
 */
export const MAX_BODY_BYTES = 256 * 1024 * 1024;

/**
 * Bytes of request bodies held at once across all calls, from the first byte read until the answer is
 * sent: 320 MiB, one call of the largest size with room for the small calls beside it. A call that
 * would go past it is refused with 503 before its body is read, so several concurrent large calls
 * cannot together exhaust the memory.
 */
export const MAX_TOTAL_BODY_BYTES = 320 * 1024 * 1024;

export interface BrowserServer {
  url: string;
  port: number;
  token: string;
  /** Body bytes held by calls not yet answered (for tests of the total budget). */
  heldBodyBytes(): number;
  close(): Promise<void>;
}

/**
 * Serves the built renderer and the command table on loopback only. Every api call must carry
 * the per-launch token, and every request must name this server in its Host header (so a page
 * elsewhere cannot reach it through DNS rebinding). No request can stop the server: whatever a
 * handler throws becomes a 4xx or 5xx answer, and bodies are held within a total budget.
 */
export async function startBrowserServer(options: {
  session: Session;
  staticDir: string;
  port?: number;
  token?: string;
  /** Largest body of one call (default MAX_BODY_BYTES). */
  maxBodyBytes?: number;
  /** Bytes of bodies held at once across calls (default MAX_TOTAL_BODY_BYTES). */
  maxTotalBodyBytes?: number;
}): Promise<BrowserServer> {
  const token = options.token ?? crypto.randomBytes(24).toString('base64url');
  const staticRoot = path.resolve(options.staticDir);
  const maxBody = options.maxBodyBytes ?? MAX_BODY_BYTES;
  const maxTotal = options.maxTotalBodyBytes ?? MAX_TOTAL_BODY_BYTES;
  /** Body bytes held by calls not yet answered. */
  let held = 0;
  let port = 0;

  const server = http.createServer((req, res) => {
    req.on('error', () => req.destroy());
    res.on('error', () => res.destroy());
    try {
      route(req, res);
    } catch (error) {
      fail(res, error);
    }
  });
  // A request line or header Node cannot parse: a plain 400, never an exception.
  server.on('clientError', (error: NodeJS.ErrnoException, socket) => {
    if (!socket.writable) {
      socket.destroy();
      return;
    }
    const status =
      error.code === 'HPE_HEADER_OVERFLOW'
        ? '431 Request Header Fields Too Large'
        : error.code === 'ERR_HTTP_REQUEST_TIMEOUT'
          ? '408 Request Timeout'
          : '400 Bad Request';
    socket.end(`HTTP/1.1 ${status}\r\nConnection: close\r\nContent-Length: 0\r\n\r\n`);
  });

  function route(req: http.IncomingMessage, res: http.ServerResponse): void {
    const host = req.headers.host ?? '';
    if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) {
      sendText(res, 421, 'this server answers only to 127.0.0.1');
      return;
    }
    const pathname = requestPath(req.url ?? '/');
    if (pathname === undefined) {
      sendText(res, 400, 'the request path is not a valid address');
    } else if (pathname === '/api/call') {
      handleApi(req, res);
    } else if (req.method !== 'GET' && req.method !== 'HEAD') {
      sendText(res, 405, 'method not allowed');
    } else {
      serveStatic(pathname, res);
    }
  }

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
    const type = String(req.headers['content-type'] ?? '');
    if (!/^application\/json\s*(;|$)/i.test(type)) {
      sendError(res, 415, 'invalid-input', 'the request body must be sent as application/json');
      return;
    }
    const length = Number(req.headers['content-length'] ?? 0);
    const declared = Number.isSafeInteger(length) && length > 0 ? length : 0;
    if (declared > maxBody) {
      sendError(res, 413, 'too-large', `request larger than ${maxBody} bytes`);
      return;
    }
    // Bytes this call holds from the total budget: reserved up front when the length is declared,
    // else as they arrive; given back when the answer has gone out (or the connection is lost).
    let reserved = 0;
    const reserve = (bytes: number): boolean => {
      if (held + bytes > maxTotal) return false;
      held += bytes;
      reserved += bytes;
      return true;
    };
    const giveBack = () => {
      held -= reserved;
      reserved = 0;
    };
    res.once('close', giveBack);
    if (!reserve(declared)) {
      busy(res);
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    req.on(
      'data',
      guarded(res, (chunk: Buffer) => {
        if (res.headersSent) return;
        size += chunk.length;
        if (size > maxBody) {
          refuseMidway(req, res, 413, 'too-large', `request larger than ${maxBody} bytes`);
          return;
        }
        if (size > reserved && !reserve(size - reserved)) {
          chunks.length = 0;
          res.setHeader('retry-after', '5');
          refuseMidway(req, res, 503, 'busy', BUSY_MESSAGE);
          return;
        }
        chunks.push(chunk);
      }),
    );
    req.on(
      'end',
      guarded(res, () => {
        if (res.headersSent) return;
        let body: { name?: unknown; input?: unknown } | null;
        try {
          body = JSON.parse(Buffer.concat(chunks, size).toString('utf8'));
        } catch {
          sendError(res, 400, 'invalid-input', 'the request body is not JSON');
          return;
        }
        chunks.length = 0;
        if (typeof body !== 'object' || body === null || Array.isArray(body)) {
          sendError(res, 400, 'invalid-input', 'the request body must be a JSON object {"name", "input"}');
          return;
        }
        dispatch(options.session, body.name, body.input)
          .then((result) => send(res, 200, 'application/json', JSON.stringify(result)))
          .catch((error: unknown) => fail(res, error));
      }),
    );
  }

  function serveStatic(pathname: string, res: http.ServerResponse): void {
    const file = staticFile(staticRoot, pathname);
    if (file === undefined) {
      sendText(res, 404, 'not found');
      return;
    }
    fs.readFile(file, (error, data) => {
      if (error) sendText(res, 404, 'not found');
      else send(res, 200, contentType(file), data);
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
    heldBodyBytes: () => held,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

/** `handler` with whatever it throws answered as a failure of the request, never left uncaught. */
function guarded<A extends unknown[]>(
  res: http.ServerResponse,
  handler: (...args: A) => void,
): (...args: A) => void {
  return (...args) => {
    try {
      handler(...args);
    } catch (error) {
      fail(res, error);
    }
  };
}

/** Answers a call that fails unexpectedly with 500, or drops the connection if an answer has begun. */
function fail(res: http.ServerResponse, error: unknown): void {
  console.error('browser-mode request failed:', error);
  if (res.headersSent) res.destroy();
  else sendError(res, 500, 'internal', 'the request could not be handled');
}

const BUSY_MESSAGE = 'other large requests are being handled; try again when they have finished';

function busy(res: http.ServerResponse): void {
  res.setHeader('retry-after', '5');
  res.setHeader('connection', 'close');
  sendError(res, 503, 'busy', BUSY_MESSAGE);
}

/** Answers before the body has been read, then closes the connection once the answer is out. */
function refuseMidway(
  req: http.IncomingMessage,
  res: http.ServerResponse,
  status: number,
  code: string,
  message: string,
): void {
  res.setHeader('connection', 'close');
  res.once('finish', () => req.destroy());
  sendError(res, status, code, message);
}

function send(res: http.ServerResponse, status: number, type: string, body: string | Buffer): void {
  res.writeHead(status, {
    'content-type': type,
    'content-length': Buffer.byteLength(body),
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
