import { listFacets } from '../../../db/repos/construct.ts';
import type { DatasetRole, DatasetSummary } from '../../../db/repos/datasets.ts';
import { currentExclusions, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import { listRounds } from '../../../db/repos/purification.ts';
import type { Study } from '../../../db/study.ts';
import { decodeColumn } from '../../engine/columnar.ts';
import { analysisData, currentDataset, declaredBounds } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';

export const PHASE = 'validity' as const;

/** An item the scale keeps after purification, with its facet at the final round. */
export interface RetainedItem {
  itemId: number;
  code: string;
  facetId: number | null;
  facetName: string | null;
  keying: 'forward' | 'reverse';
}

/**
 * The items purification kept: the item set of its final round (which the purification sign-off
 * requires to include every drop, move and restore), with facet names. Empty before any round.
 */
export function retainedItems(study: Study): { items: RetainedItem[]; round: number | null } {
  const last = listRounds(study).at(-1);
  if (!last) return { items: [], round: null };
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  return {
    round: last.number,
    items: last.items.map((it) => ({
      itemId: it.itemId,
      code: it.code,
      facetId: it.facetId,
      facetName: it.facetId === null ? null : (names.get(it.facetId) ?? null),
      keying: it.keying,
    })),
  };
}

/** The validation data the phase runs on: the current dataset of the validation role, never the pilot. */
export function validationDataset(study: Study): DatasetSummary {
  const dataset = currentDataset(study, 'validation');
  if (!dataset) {
    throw new RuleError(
      'no validation data is current; import a validation dataset (or make one current) first — the pilot data is never used for validity evidence',
      'no-data',
    );
  }
  return dataset;
}

/** Numeric columns (criteria and other measures) and group columns of a dataset, minus exclusions. */
export interface SideColumns {
  respondentIds: string[];
  measures: Map<string, (number | null)[]>;
  groups: Map<string, string[]>;
  retestLinks: string[] | null;
}

export function sideColumns(study: Study, datasetId: number): SideColumns {
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const excluded = currentExclusions(study, datasetId);
  const keep = (i: number) => !excluded.has(i);
  const measures = new Map<string, (number | null)[]>();
  for (const c of encoded.columns) {
    if (c.role !== 'criterion') continue;
    const values = decodeColumn(c.encoded);
    measures.set(
      c.name,
      Array.from(values)
        .map((v) => (Number.isNaN(v) ? null : v))
        .filter((_, i) => keep(i)),
    );
  }
  const groups = new Map<string, string[]>();
  for (const g of encoded.groups)
    groups.set(
      g.name,
      g.values.filter((_, i) => keep(i)),
    );
  return {
    respondentIds: encoded.ids.filter((_, i) => keep(i)),
    measures,
    groups,
    retestLinks: encoded.retestLinks ? encoded.retestLinks.values.filter((_, i) => keep(i)) : null,
  };
}

/** Where an analysis's data came from, as stored with every run of this phase. */
export interface DataSource {
  datasetId: number;
  datasetName: string;
  fileSha256: string;
  role: DatasetRole;
  respondentsInFile: number;
  excluded: number;
  /**
   * The excluded respondents' positions in the file (0-based, ascending) when the run was made.
   * Absent in runs stored before positions were kept: those are compared by count only.
   */
  excludedRows?: number[];
}

/** The current exclusions of a dataset as positions in the file, ascending. Cost O(e log e). */
function excludedPositions(study: Study, datasetId: number): number[] {
  return [...currentExclusions(study, datasetId).keys()].sort((a, b) => a - b);
}

/**
 * How a dataset's exclusions differ from those a run stored with its source ("1 respondent excluded
 * then, 2 now", or the same number but other respondents), or null when they are the same. A source
 * stored before positions were kept is compared by count only. Cost O(e log e) for e exclusions.
 */
export function exclusionsChange(study: Study, source: DataSource): string | null {
  const now = excludedPositions(study, source.datasetId);
  if (now.length !== source.excluded)
    return `${source.excluded} respondents excluded then, ${now.length} now`;
  const then = source.excludedRows;
  if (then === undefined || then.every((row, i) => row === now[i])) return null;
  return `as many excluded then as now (${now.length}), but not the same respondents`;
}

/** The retained items' answers in a dataset, with the declared bounds and where they came from. */
export function itemAnswers(study: Study, dataset: DatasetSummary, codes: string[]) {
  const data = analysisData(study, dataset.id, codes);
  const source: DataSource = {
    datasetId: dataset.id,
    datasetName: dataset.name,
    fileSha256: dataset.fileSha256,
    role: dataset.role,
    respondentsInFile: data.provenance.respondentsInFile,
    excluded: data.provenance.excluded,
    excludedRows: excludedPositions(study, dataset.id),
  };
  return { ...data, source, bounds: declaredBounds(study) };
}
