import type { StatsAnalysis } from '../types.ts';
import { cfa } from './cfa.ts';
import { content } from './content.ts';
import { dimensionality } from './dimensionality.ts';
import { efa } from './efa.ts';
import { icc } from './icc.ts';
import { polychoric } from './polychoric.ts';
import { reliability } from './reliability.ts';

/** Every `stats <analysis>`, by name. */
export const STATS_ANALYSES: Record<string, StatsAnalysis> = {
  reliability,
  content,
  cfa,
  icc,
  dimensionality,
  efa,
  polychoric,
};
