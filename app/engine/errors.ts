/**
 * The one error type the engine throws. `message` says what was wrong and why, in the form
 * "alpha requires at least two items"; callers (phases, CLI, api) show it to the user as is.
 */
export class EngineError extends Error {
  constructor(
    message: string,
    readonly code: string = 'engine',
  ) {
    super(message);
    this.name = 'EngineError';
  }
}
