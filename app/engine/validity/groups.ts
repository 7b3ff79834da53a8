import { fSf, tQuantile, tSf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { kahanSum } from '../numeric.ts';

export interface GroupSummary {
  name: string;
  n: number;
  mean: number;
  sd: number;
}

export interface WelchComparison {
  a: GroupSummary;
  b: GroupSummary;
  /** Mean of a minus mean of b. */
  difference: number;
  t: number;
  df: number;
  p: number;
  /** Interval of the mean difference from the Welch t. */
  lower: number;
  upper: number;
  level: number;
  /** Difference over the pooled SD (divisor n₁ + n₂ − 2). */
  cohensD: number;
  /** d·J with J = 1 − 3/(4(n₁ + n₂) − 9). */
  hedgesG: number;
}

export interface AnovaResult {
  groups: GroupSummary[];
  F: number;
  df1: number;
  df2: number;
  p: number;
  /** SS between / SS total. */
  etaSquared: number;
}

function summarize(name: string, values: (number | null)[]): GroupSummary {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x));
  const n = v.length;
  if (n < 2) throw new EngineError(`group "${name}" has ${n} score(s); at least two are needed`);
  const mean = kahanSum(v) / n;
  const sd = Math.sqrt(kahanSum(v.map((x) => (x - mean) ** 2)) / (n - 1));
  return { name, n, mean, sd };
}

/**
 * Known-groups comparison of two groups: Welch's (1947) t test with Welch–Satterthwaite df and the
 * interval of the mean difference, Cohen's (1988) d with the pooled SD, and Hedges' (1981) g = d·J with
 * J = 1 − 3/(4(n₁ + n₂) − 9). Missing scores (null) are left out. Registry: `t.welch`, `d.cohen`,
 * `g.hedges`.
 *
 * Cost: O(n). Throws EngineError when a group has fewer than two scores, when neither group varies,
 * or for a level outside (0, 1).
 */
export function welchComparison(
  a: { name: string; values: (number | null)[] },
  b: { name: string; values: (number | null)[] },
  level = 0.95,
): WelchComparison {
  if (!(level > 0 && level < 1))
    throw new EngineError(`a confidence level must lie strictly between 0 and 1 (got ${level})`);
  const sa = summarize(a.name, a.values);
  const sb = summarize(b.name, b.values);
  const va = sa.sd ** 2 / sa.n;
  const vb = sb.sd ** 2 / sb.n;
  if (!(va + vb > 0)) throw new EngineError(`the scores do not vary within "${a.name}" or "${b.name}"`);
  const difference = sa.mean - sb.mean;
  const se = Math.sqrt(va + vb);
  const t = difference / se;
  const df = (va + vb) ** 2 / (va ** 2 / (sa.n - 1) + vb ** 2 / (sb.n - 1));
  const half = tQuantile(1 - (1 - level) / 2, df) * se;
  const pooled = Math.sqrt(((sa.n - 1) * sa.sd ** 2 + (sb.n - 1) * sb.sd ** 2) / (sa.n + sb.n - 2));
  const cohensD = difference / pooled;
  const j = 1 - 3 / (4 * (sa.n + sb.n) - 9);
  return {
    a: sa,
    b: sb,
    difference,
    t,
    df,
    p: 2 * tSf(Math.abs(t), df),
    lower: difference - half,
    upper: difference + half,
    level,
    cohensD,
    hedgesG: cohensD * j,
  };
}

/**
 * One-way analysis of variance of a score across more than two known groups (Fisher 1925): F = MS
 * between / MS within on (g − 1, N − g) df, and η². Registry: `anova.one-way`.
 *
 * Cost: O(N). Throws EngineError with fewer than two groups, a group with fewer than two scores, or
 * no variation within groups.
 */
export function oneWayAnova(groups: { name: string; values: (number | null)[] }[]): AnovaResult {
  if (groups.length < 2)
    throw new EngineError(`an analysis of variance needs at least two groups; got ${groups.length}`);
  const summaries = groups.map((g) => summarize(g.name, g.values));
  const total = summaries.reduce((s, g) => s + g.n, 0);
  const grand = summaries.reduce((s, g) => s + g.n * g.mean, 0) / total;
  const ssBetween = kahanSum(summaries.map((g) => g.n * (g.mean - grand) ** 2));
  const ssWithin = kahanSum(summaries.map((g) => (g.n - 1) * g.sd ** 2));
  if (!(ssWithin > 0)) throw new EngineError('the scores do not vary within the groups');
  const df1 = groups.length - 1;
  const df2 = total - groups.length;
  const F = ssBetween / df1 / (ssWithin / df2);
  return {
    groups: summaries,
    F,
    df1,
    df2,
    p: fSf(F, df1, df2),
    etaSquared: ssBetween / (ssBetween + ssWithin),
  };
}
