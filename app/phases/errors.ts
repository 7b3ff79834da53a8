/** A request that breaks a phase's rules (unknown facet, signed-off phase, gate not met). */
export class RuleError extends Error {
  override name = 'RuleError';
  constructor(
    message: string,
    readonly code: string = 'rule',
  ) {
    super(message);
  }
}
