import { getConstruct } from '../../db/repos/construct.ts';
import {
  currentDatasetChoice,
  type DatasetRole,
  type DatasetSummary,
  currentExclusions,
  getDatasetSummary,
  loadEncodedDataset,
} from '../../db/repos/datasets.ts';
import type { Study } from '../../db/study.ts';
import { decodeColumn } from '../engine/columnar.ts';
import type { ScaleBounds } from '../engine/scoring.ts';
import { RuleError } from './errors.ts';

/** The responses an analysis runs on, and exactly where they came from. */
export interface AnalysisData {
  /** Raw answers, respondents × items in the order asked; null where missing. Not reverse-scored. */
  data: (number | null)[][];
  itemCodes: string[];
  respondentIds: string[];
  provenance: {
    datasetId: number;
    datasetName: string;
    fileSha256: string;
    respondentsInFile: number;
    excluded: number;
    /** Positions (0-based) of the excluded respondents, as stored in the exclusion decisions. */
    excludedRespondents: number[];
  };
}

/**
 * Reads the named items of a dataset, leaving out the respondents excluded now. Every analysis
 * reads its data through here, so every analysis runs on "the dataset minus the current
 * exclusions" and can say so. Cost O(respondents × items).
 */
export function analysisData(study: Study, datasetId: number, itemCodes: string[]): AnalysisData {
  const summary = getDatasetSummary(study, datasetId);
  const encoded = loadEncodedDataset(study, datasetId);
  if (!summary || !encoded)
    throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const byCode = new Map(
    encoded.columns.filter((c) => c.role === 'item' && c.itemCode).map((c) => [c.itemCode as string, c]),
  );
  const missing = itemCodes.filter((code) => !byCode.has(code));
  if (missing.length > 0) {
    throw new RuleError(
      `dataset "${summary.name}" has no column mapped to item${missing.length > 1 ? 's' : ''} ${missing.join(', ')}`,
    );
  }
  const columns = itemCodes.map((code) =>
    decodeColumn((byCode.get(code) as (typeof encoded.columns)[number]).encoded),
  );
  const excluded = currentExclusions(study, datasetId);
  const data: (number | null)[][] = [];
  const respondentIds: string[] = [];
  for (let r = 0; r < encoded.n; r++) {
    if (excluded.has(r)) continue;
    data.push(columns.map((values) => (Number.isNaN(values[r]) ? null : values[r])));
    respondentIds.push(encoded.ids[r]);
  }
  return {
    data,
    itemCodes,
    respondentIds,
    provenance: {
      datasetId,
      datasetName: summary.name,
      fileSha256: summary.fileSha256,
      respondentsInFile: encoded.n,
      excluded: excluded.size,
      excludedRespondents: [...excluded.keys()].sort((a, b) => a - b),
    },
  };
}

/**
 * The dataset of a role that analyses use: the one the latest logged choice of that role made
 * current, or none (no choice yet, or the current one withdrawn). An import never changes it
 * silently; see makeDatasetCurrent and withdrawDataset in pilot.ts.
 */
export function currentDataset(study: Study, role: DatasetRole): DatasetSummary | undefined {
  const choice = currentDatasetChoice(study, role);
  return choice?.datasetId == null ? undefined : getDatasetSummary(study, choice.datasetId);
}

/** The pilot data analyses use (see currentDataset). */
export function currentPilotDataset(study: Study): DatasetSummary | undefined {
  return currentDataset(study, 'pilot');
}

/** The response format's declared bounds (never the observed ones): reverse scores and range checks use them. */
export function declaredBounds(study: Study): ScaleBounds {
  const c = getConstruct(study);
  return { min: c.responseMin, max: c.responseMin + c.responsePoints - 1 };
}
