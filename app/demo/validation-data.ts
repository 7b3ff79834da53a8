import { cholesky } from '../engine/dense.ts';
import { createRng } from '../engine/rng.ts';
import type { ColumnMapping } from '../import/mapping.ts';
import {
  DEMO_COLUMNS,
  DEMO_CRITERION_MODEL,
  DEMO_FACTOR_CORRELATIONS,
  DEMO_GROUP_MODEL,
  DEMO_ITEM_TRUTH,
  DEMO_MISSING_CODE,
  DEMO_PILOT_SEED,
  demoAnswer,
  poisson,
} from './pilot.ts';

/** The validation wave: a new sample of the demo population, drawn with its own seed. */
export const DEMO_VALIDATION_SEED = DEMO_PILOT_SEED + 200;
export const DEMO_VALIDATION_ROWS = 600;
export const DEMO_VALIDATION_FILE = 'cycling-confidence-validation.csv';
export const DEMO_VALIDATION_NAME = 'Validation wave, autumn (demo)';

/**
 * The misfit planted in the validation wave: two repair items about tyres share part of their
 * unique variance (the latent residuals of the two correlate this much), which a model with one
 * factor per facet does not allow for and a modification hint should find.
 */
export const DEMO_PLANTED_RESIDUAL = { a: 'RR01', b: 'RR05', correlation: 0.5 } as const;

/** The other measures and how each relates to the standardized mean of the four facet factors. */
export const DEMO_OTHER_MEASURES = {
  selfEfficacy: { column: 'gen_self_efficacy', weight: 0.4, mean: 30, sd: 5, reliability: 0.85 },
  anxiety: { column: 'traffic_anxiety', weight: -0.5, mean: 20, sd: 6, reliability: 0.8 },
  desirability: { column: 'social_desirability', weight: 0.05, mean: 7, sd: 2.5, reliability: 0.7 },
} as const;
/** The trip diary four weeks later (Poisson, as in the pilot) and the reliability stated for it. */
export const DEMO_TRIPS_LATER = { column: 'trips_next_4wk', reliability: 0.7 } as const;

const MISSING_SHARE = 0.003;
const DIARY_NOT_RETURNED = 0.12;

/** Standard deviation of the mean of the four facet factors under their correlations. */
export function generalSd(): number {
  const m = DEMO_FACTOR_CORRELATIONS.length;
  const sum = DEMO_FACTOR_CORRELATIONS.flat().reduce((a, b) => a + b, 0);
  return Math.sqrt(sum) / m;
}

/** The validation wave as CSV (−9 codes a missing answer), with the mapping its import uses. */
export function generateDemoValidation(seed = DEMO_VALIDATION_SEED): { csv: string; mapping: ColumnMapping } {
  const rng = createRng(seed);
  const chol = cholesky(DEMO_FACTOR_CORRELATIONS.map((r) => [...r]));
  const sdG = generalSd();
  const items = DEMO_ITEM_TRUTH;
  const header = [
    DEMO_COLUMNS.id,
    DEMO_COLUMNS.group,
    ...items.map((it) => it.code),
    DEMO_OTHER_MEASURES.selfEfficacy.column,
    DEMO_OTHER_MEASURES.anxiety.column,
    DEMO_OTHER_MEASURES.desirability.column,
    DEMO_TRIPS_LATER.column,
  ];
  const lines = [header.join(',')];
  const rc = DEMO_PLANTED_RESIDUAL.correlation;
  for (let r = 0; r < DEMO_VALIDATION_ROWS; r++) {
    const z = chol.map(() => rng.normal());
    const factors = chol.map((row) => row.reduce((s, l, k) => s + l * z[k], 0));
    const g = factors.reduce((s, f) => s + f, 0) / factors.length;
    const own = rng.normal();
    const shared = rng.normal();
    const answers = items.map((item) => {
      const planted = item.code === DEMO_PLANTED_RESIDUAL.a || item.code === DEMO_PLANTED_RESIDUAL.b;
      const e = planted ? Math.sqrt(1 - rc) * rng.normal() + Math.sqrt(rc) * shared : rng.normal();
      const value = demoAnswer(item, factors, own, e);
      return rng.next() < MISSING_SHARE ? DEMO_MISSING_CODE : value;
    });
    const noisyG = g + DEMO_GROUP_MODEL.noise * rng.normal();
    const group =
      DEMO_GROUP_MODEL.levels[
        noisyG > DEMO_GROUP_MODEL.cuts[1] ? 2 : noisyG > DEMO_GROUP_MODEL.cuts[0] ? 1 : 0
      ];
    const other = Object.values(DEMO_OTHER_MEASURES).map((m) => {
      const std = m.weight * (g / sdG) + Math.sqrt(1 - m.weight ** 2) * rng.normal();
      return (Math.round((m.mean + m.sd * std) * 10) / 10).toFixed(1);
    });
    const trips = poisson(rng, Math.exp(DEMO_CRITERION_MODEL.intercept + DEMO_CRITERION_MODEL.slope * g));
    const diary = rng.next() < DIARY_NOT_RETURNED ? DEMO_MISSING_CODE : trips;
    lines.push([`V${String(r + 1).padStart(4, '0')}`, group, ...answers, ...other, diary].join(','));
  }
  const mapping: ColumnMapping = {
    [DEMO_COLUMNS.group]: { role: 'group' },
    ...Object.fromEntries(
      Object.values(DEMO_OTHER_MEASURES).map((m) => [m.column, { role: 'criterion' as const }]),
    ),
    [DEMO_TRIPS_LATER.column]: { role: 'criterion' },
  };
  return { csv: `${lines.join('\n')}\n`, mapping };
}
