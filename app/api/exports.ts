import path from 'node:path';
import Papa from 'papaparse';
import type { Study } from '../../db/study.ts';
import { screeningView } from '../phases/pilot/index.ts';
import { roundDetail, roundSummaries } from '../phases/purification/index.ts';
import { reviewView } from '../phases/review/index.ts';
import { RuleError } from '../phases/errors.ts';

/**
 * Result tables as CSV files a researcher can take elsewhere. Each file opens with comment lines
 * naming the study, what was exported, and the decision log's head (`SEQ:HASH`), so that a table in
 * a supplement can be traced to the state of the study it came from. Numbers are written unrounded.
 */

export const EXPORT_KINDS = [
  'purification-items',
  'purification-rounds',
  'screening',
  'content-validity',
] as const;
export type ExportKind = (typeof EXPORT_KINDS)[number];

export interface CsvExport {
  fileName: string;
  text: string;
  rows: number;
}

type Cell = string | number | boolean | null;

function csv(study: Study, what: string, fileStem: string, fields: string[], rows: Cell[][]): CsvExport {
  const title = study.meta('title') || path.basename(study.path);
  const head = study.meta('log_head') ?? '0:none';
  const header = [
    `# Scalewright export: ${what}`,
    `# Study: ${title} (${path.basename(study.path)})`,
    `# Decision log head: ${head} (${study.log.count()} rows)`,
    `# Exported: ${new Date().toISOString()}`,
  ];
  const body = Papa.unparse(
    { fields, data: rows.map((r) => r.map((c) => (c === null ? '' : c))) },
    { newline: '\r\n' },
  );
  return { fileName: `${fileStem}.csv`, text: `${header.join('\r\n')}\r\n${body}\r\n`, rows: rows.length };
}

/** One result table of the study as CSV; `roundId` and `datasetId` pick the round or dataset it belongs to. */
export function exportTable(
  study: Study,
  kind: ExportKind,
  where: { roundId?: number; datasetId?: number } = {},
): CsvExport {
  if (kind === 'purification-items') {
    const roundId = where.roundId ?? roundSummaries(study).at(-1)?.id;
    if (roundId === undefined)
      throw new RuleError('there is no purification round to export yet', 'no-round');
    const detail = roundDetail(study, roundId);
    return csv(
      study,
      `item table of purification round ${detail.summary.number} (analysis run ${detail.summary.runId})`,
      `purification-round-${detail.summary.number}-items`,
      [
        'item',
        'wording',
        'facet',
        'keying',
        'n',
        'missing',
        'mean',
        'sd',
        'skewness',
        'kurtosis',
        'floorShare',
        'ceilingShare',
        'correctedItemTotal',
        'alphaIfDeleted',
        'flags',
      ],
      detail.rows.map((r) => [
        r.code,
        r.text,
        r.facetName,
        r.keying,
        r.stats.n,
        r.stats.missing,
        r.stats.mean,
        r.stats.sd,
        r.stats.skewness,
        r.stats.kurtosis,
        r.stats.floorShare,
        r.stats.ceilingShare,
        r.stats.correctedItemTotal,
        r.stats.alphaIfDeleted,
        r.flags.map((f) => f.text).join('; '),
      ]),
    );
  }
  if (kind === 'purification-rounds') {
    const rounds = roundSummaries(study);
    return csv(
      study,
      'purification round history',
      'purification-rounds',
      [
        'round',
        'analysisRun',
        'createdAt',
        'by',
        'dataset',
        'items',
        'k',
        'n',
        'missing',
        'alpha',
        'ciLevel',
        'ciLower',
        'ciUpper',
        'omegaTotal',
        'sem',
        'meetsCriterion',
        'left',
        'returned',
      ],
      rounds.map((r) => [
        r.number,
        r.runId,
        r.createdAt,
        r.actor,
        r.datasetName,
        r.items.join(' '),
        r.k,
        r.n,
        r.missing,
        r.alpha,
        r.ci.level,
        r.ci.lower,
        r.ci.upper,
        r.omega,
        r.sem,
        r.meetsCriterion,
        r.left.join(' '),
        r.returned.join(' '),
      ]),
    );
  }
  if (kind === 'screening') {
    if (where.datasetId === undefined)
      throw new RuleError('say which dataset’s screening to export', 'invalid-input');
    const view = screeningView(study, where.datasetId);
    return csv(
      study,
      `respondent screening of dataset ${where.datasetId}`,
      `screening-dataset-${where.datasetId}`,
      [
        'row',
        'id',
        'answered',
        'missing',
        'longstring',
        'irv',
        'mahalanobis',
        'mahalanobisP',
        'duration',
        'flags',
        'excluded',
        'exclusionReason',
      ],
      view.respondents.map((r) => [
        r.row,
        r.id,
        r.answered,
        r.missing,
        r.longstring,
        r.irv,
        r.mahalanobis,
        r.mahalanobisP,
        r.duration,
        r.flags.map((f) => `${f.label}: ${f.reason}`).join('; '),
        r.exclusion !== null,
        r.exclusion?.reason ?? null,
      ]),
    );
  }
  const view = reviewView(study);
  const round =
    where.roundId === undefined ? view.rounds.at(-1) : view.rounds.find((r) => r.id === where.roundId);
  if (!round) throw new RuleError('there is no review round to export', 'not-found');
  if (!round.report) throw new RuleError(`review round ${round.number} has no ratings yet`, 'no-ratings');
  return csv(
    study,
    `content validity of review round ${round.number}`,
    `content-validity-round-${round.number}`,
    [
      'item',
      'wording',
      'facet',
      'rated',
      'iCvi',
      'modifiedKappa',
      'kappaBand',
      'cvr',
      'cvrCritical',
      'aikenV',
      'facetAgreement',
      'flags',
      'wordingFlags',
      'decision',
      'rationale',
    ],
    round.items.map((it) => [
      it.code,
      it.text,
      it.facetName,
      it.stats?.rated ?? null,
      it.stats?.iCvi ?? null,
      it.stats?.modifiedKappa ?? null,
      it.stats?.kappaBand ?? null,
      it.stats?.cvr ?? null,
      it.stats?.cvrCritical ?? null,
      it.stats?.aikenV ?? null,
      it.stats?.facetAgreement ?? null,
      it.stats?.flags.join('; ') ?? null,
      it.wordingFlags.join('; '),
      it.decision?.decision ?? null,
      it.decision?.rationale ?? null,
    ]),
  );
}
