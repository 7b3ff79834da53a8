import { EngineError } from '../errors.ts';

/** Relative slack when deciding that m·k is already a whole number of items. */
export const LENGTH_ROUNDING_TOLERANCE = 1e-9;

function checkReliability(rho: number, what: string): void {
  if (!Number.isFinite(rho) || rho <= 0 || rho >= 1) {
    throw new EngineError(`${what} must lie strictly between 0 and 1 (got ${rho})`, 'reliability');
  }
}

/**
 * Spearman–Brown prophecy formula: the reliability of a test m times as long, built from parallel
 * items, ρ* = mρ / (1 + (m − 1)ρ). m below 1 predicts a shortened test.
 *
 * Source: spearman-brown.prophecy (the method registry). Check: doubling a test with ρ = .50 gives
 * 2·.5/(1 + .5) = .667.
 * Cost: O(1).
 * Throws EngineError when ρ is not strictly between 0 and 1 or m is not a positive finite number.
 */
export function spearmanBrown(rho: number, m: number): number {
  checkReliability(rho, 'reliability');
  if (!Number.isFinite(m) || m <= 0) {
    throw new EngineError(`the length factor must be a positive number (got ${m})`, 'length');
  }
  return (m * rho) / (1 + (m - 1) * rho);
}

/**
 * Spearman–Brown solved for length: the factor m by which a test of reliability ρ must be lengthened
 * (m > 1) or may be shortened (m < 1) to reach a target ρ*, m = ρ*(1 − ρ) / (ρ(1 − ρ*)).
 *
 * Source: spearman-brown.prophecy (the method registry), solved for the length factor m.
 * Cost: O(1).
 * Throws EngineError when ρ or ρ* is not strictly between 0 and 1.
 */
export function lengthFactorForTarget(rho: number, target: number): number {
  checkReliability(rho, 'reliability');
  checkReliability(target, 'target reliability');
  return (target * (1 - rho)) / (rho * (1 - target));
}

/**
 * Items needed to reach a target reliability: the smallest whole number of parallel items whose
 * Spearman–Brown prophecy reaches ρ*, i.e. ⌈m·k⌉ with m from `lengthFactorForTarget`.
 *
 * Source: spearman-brown.prophecy (the method registry). Cost: O(1).
 * Throws EngineError when ρ or ρ* is not strictly between 0 and 1 or k is not a positive integer.
 */
export function itemsForTarget(rho: number, k: number, target: number): number {
  if (!Number.isInteger(k) || k < 1) {
    throw new EngineError(`the current number of items must be a positive whole number (got ${k})`, 'length');
  }
  const exact = lengthFactorForTarget(rho, target) * k;
  // Guard against 2.0000000000000004 becoming 3 when the target is reached exactly.
  const rounded = Math.round(exact);
  return Math.abs(exact - rounded) <= LENGTH_ROUNDING_TOLERANCE * Math.max(1, exact)
    ? rounded
    : Math.ceil(exact);
}
