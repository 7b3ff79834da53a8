import type { StatsAnalysis } from '../types.ts';

/** Every `stats <analysis>`, by name. */
export const STATS_ANALYSES: Record<string, StatsAnalysis> = {};
