import path from 'node:path';

/**
 * The built interface as files under one folder, served by browser mode over HTTP and by the
 * desktop shell over its own scheme: the same path checks and the same content policy in both.
 */

export const CONTENT_TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.json': 'application/json',
  '.woff2': 'font/woff2',
};

/** Nothing loads from anywhere but the interface's own origin. */
export const CONTENT_SECURITY_POLICY =
  "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; font-src 'self'; connect-src 'self'; form-action 'none'; frame-ancestors 'none'; base-uri 'none'";

/** Longest request path served; the interface's files have short names. */
const MAX_PATH_LENGTH = 2048;

/**
 * The decoded path of a request target, or undefined when it cannot name a file: a malformed
 * percent-encoding, a NUL or other control character, or a path longer than MAX_PATH_LENGTH.
 */
export function requestPath(target: string): string | undefined {
  if (target.length > MAX_PATH_LENGTH) return undefined;
  let pathname: string;
  try {
    pathname = decodeURIComponent(new URL(target, 'http://127.0.0.1').pathname);
  } catch {
    return undefined;
  }
  // biome-ignore lint/suspicious/noControlCharactersInRegex: control characters are what is refused
  if (/[\u0000-\u001f\u007f]/.test(pathname)) return undefined;
  return pathname;
}

/**
 * The file under `root` that a decoded request path names ("/" is the index page), or undefined
 * when the path leads outside `root`.
 */
export function staticFile(root: string, pathname: string): string | undefined {
  const base = path.resolve(root);
  const file = path.resolve(base, `.${pathname === '/' ? '/index.html' : pathname}`);
  return file.startsWith(base + path.sep) ? file : undefined;
}

export function contentType(file: string): string {
  return CONTENT_TYPES[path.extname(file)] ?? 'application/octet-stream';
}
