import type { z } from 'zod';
import type { Session } from './session.ts';

/** One operation the UI may call: a zod schema for its input and the handler that serves it. */
export interface Command<S extends z.ZodType, R> {
  input: S;
  handler(session: Session, input: z.output<S>): R;
}

export function command<S extends z.ZodType, R>(
  input: S,
  handler: (session: Session, input: z.output<S>) => R,
): Command<S, R> {
  return { input, handler };
}

export type ApiError = { code: string; message: string };
export type ApiResult<T> = { ok: true; value: T } | { ok: false; error: ApiError };
