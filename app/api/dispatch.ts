import { StudyFileError } from '../../db/errors.ts';
import { EngineError } from '../engine/errors.ts';
import { RuleError } from '../phases/errors.ts';
import { type CommandName, commands } from './commands.ts';
import type { ApiResult } from './define.ts';
import type { Session } from './session.ts';

/**
 * Checks a call against the command table and runs it. Never throws: a wrong name, an input of
 * the wrong shape, a broken rule or a bad file comes back as `{ ok: false, error }` with a
 * message for the user; anything unexpected is reported as an internal error.
 */
export async function dispatch(session: Session, name: unknown, input: unknown): Promise<ApiResult<unknown>> {
  if (typeof name !== 'string' || !Object.hasOwn(commands, name)) {
    return {
      ok: false,
      error: { code: 'unknown-command', message: `there is no command named ${JSON.stringify(name)}` },
    };
  }
  const cmd = commands[name as CommandName];
  const parsed = cmd.input.safeParse(input ?? {});
  if (!parsed.success) {
    const message = parsed.error.issues
      .map((issue) => `${issue.path.length > 0 ? issue.path.join('.') : 'input'}: ${issue.message}`)
      .join('; ');
    return { ok: false, error: { code: 'invalid-input', message: `${name}: ${message}` } };
  }
  try {
    const value = await (cmd.handler as (s: Session, i: unknown) => unknown)(session, parsed.data);
    return { ok: true, value: value ?? null };
  } catch (error) {
    if (error instanceof RuleError || error instanceof EngineError) {
      return { ok: false, error: { code: error.code, message: error.message } };
    }
    if (error instanceof StudyFileError)
      return { ok: false, error: { code: error.problem, message: error.message } };
    console.error(`command ${name} failed:`, error);
    return {
      ok: false,
      error: { code: 'internal', message: `${name} failed unexpectedly: ${(error as Error).message}` },
    };
  }
}
