import { readFile } from 'node:fs/promises';
import { CONTENT_SECURITY_POLICY, contentType, requestPath, staticFile } from '../web/static-files.ts';

/**
 * The desktop shell's own scheme: the window loads `scalewright://app/index.html`, so the
 * interface has an origin of its own (not every `file://` page on the disk), and only the built
 * interface's folder can be read through it.
 */
export const APP_SCHEME = 'scalewright';
export const APP_HOST = 'app';
export const APP_ORIGIN = `${APP_SCHEME}://${APP_HOST}`;
export const APP_INDEX_URL = `${APP_ORIGIN}/index.html`;

/** True for a URL of a page the shell itself serves. */
export function isAppUrl(url: string): boolean {
  try {
    const parsed = new URL(url);
    return parsed.protocol === `${APP_SCHEME}:` && parsed.host === APP_HOST;
  } catch {
    return false;
  }
}

/**
 * Answers a request on the app scheme from the files under `root`: 200 with the file and the
 * strict content policy; 400 for a path that cannot name a file (bad percent-encoding, NUL); 404
 * for another host, a path leading outside `root`, or a missing file; 405 for anything but GET.
 */
export function appProtocolHandler(root: string): (request: Request) => Promise<Response> {
  return async (request) => {
    if (request.method !== 'GET') return answer(405, 'method not allowed');
    let url: URL;
    try {
      url = new URL(request.url);
    } catch {
      return answer(400, 'not a valid address');
    }
    if (url.protocol !== `${APP_SCHEME}:` || url.host !== APP_HOST) return answer(404, 'not found');
    const pathname = requestPath(url.pathname);
    if (pathname === undefined) return answer(400, 'the path is not a valid address');
    const file = staticFile(root, pathname);
    if (file === undefined) return answer(404, 'not found');
    try {
      return new Response(new Uint8Array(await readFile(file)), {
        status: 200,
        headers: headers(contentType(file)),
      });
    } catch {
      return answer(404, 'not found');
    }
  };
}

function headers(type: string): Record<string, string> {
  return {
    'content-type': type,
    'content-security-policy': CONTENT_SECURITY_POLICY,
    'x-content-type-options': 'nosniff',
    'cache-control': 'no-store',
  };
}

function answer(status: number, text: string): Response {
  return new Response(text, { status, headers: headers('text/plain; charset=utf-8') });
}
