import type { CommandInput, CommandName, CommandOutput } from '../../app/api/commands.ts';
import type { ApiResult } from '../../app/api/define.ts';

/** What the desktop preload exposes (app/shell/preload.ts); absent in browser mode. */
interface DesktopBridge {
  call(name: string, input: unknown): Promise<ApiResult<unknown>>;
}

declare global {
  interface Window {
    scalewright?: DesktopBridge;
  }
}

const TOKEN_KEY = 'scalewright-token';

/** Takes the per-launch token from the address (#token=…) once, then forgets it from the URL. */
function sessionToken(): string {
  const match = /token=([A-Za-z0-9_-]+)/.exec(window.location.hash);
  if (match) {
    sessionStorage.setItem(TOKEN_KEY, match[1]);
    history.replaceState(null, '', `${window.location.pathname}#/overview`);
  }
  return sessionStorage.getItem(TOKEN_KEY) ?? '';
}

export class ApiCallError extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

async function transport(name: string, input: unknown): Promise<ApiResult<unknown>> {
  if (window.scalewright) return window.scalewright.call(name, input);
  const response = await fetch('./api/call', {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-scalewright-token': sessionToken() },
    body: JSON.stringify({ name, input }),
  });
  return (await response.json()) as ApiResult<unknown>;
}

/** Calls one command of the table; the types come from the table itself, so they cannot drift. */
export async function call<K extends CommandName>(
  name: K,
  input: CommandInput<K>,
): Promise<CommandOutput<K>> {
  const result = await transport(name, input);
  if (!result.ok) throw new ApiCallError(result.error.code, result.error.message);
  return result.value as CommandOutput<K>;
}

export function initTransport(): void {
  if (!window.scalewright) sessionToken();
}
