import { getItem, insertRevision, setItemState } from '../../../db/repos/items.ts';
import {
  countRatings,
  type Decision,
  freezeRoundRevisions,
  getImport,
  type ImportRecord,
  insertAnalysisRun,
  insertDecision,
  insertExpert,
  insertImport,
  insertRatings,
  latestRoundRun,
  listImports,
  type NewRating,
  unfreezeRoundRevisions,
  withdrawImport,
} from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import { ENGINE_VERSION } from '../../engine/version.ts';
import { matchRatingsFile, type RatingsPreview } from '../../import/ratings/index.ts';

import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import { MAX_ITEM_TEXT } from '../items/index.ts';
import {
  ANALYSIS_KIND,
  DECISION_KIND,
  type RoundAnalysis,
  analyzeRound,
  roundContext,
  roundRatings,
  storedEngineRatings,
} from './round-data.ts';

/** Reads a ratings file for a round and says what importing it would do; writes nothing. */
export function previewRatings(
  study: Study,
  roundId: number,
  bytes: Uint8Array,
  fileName: string,
): RatingsPreview {
  return matchRatingsFile(roundRatings(study, roundId), bytes, fileName).preview;
}

function storeRun(
  study: Study,
  analysis: RoundAnalysis | null,
  imports: readonly ImportRecord[],
): number | null {
  if (!analysis) return null;
  return insertAnalysisRun(study, {
    phase: 'review',
    kind: ANALYSIS_KIND,
    inputs: {
      ...analysis.inputs,
      files: imports.map((imp) => ({ fileName: imp.fileName, sha256: imp.sha256 })),
    },
    options: analysis.options,
    engineVersion: ENGINE_VERSION,
    results: analysis.report,
    at: new Date().toISOString(),
  });
}

/**
 * Imports a ratings file into a round after reading it again: any problem refuses the whole file
 * and nothing is written. An expert code that is not on the round's panel is refused too (code
 * "unknown-experts") unless `addExperts` confirms it, so a typo never creates an expert; confirmed
 * experts are added to the panel in the same transaction. The revision each item was rated in is
 * fixed; the content-validity statistics are stored as an analysis run that the log row names.
 */
export function importRatings(
  study: Study,
  roundId: number,
  bytes: Uint8Array,
  fileName: string,
  options: { addExperts?: readonly string[] } = {},
): { imported: number; runId: number | null } {
  const { preview, ratings } = matchRatingsFile(roundRatings(study, roundId), bytes, fileName);
  if (preview.problems.length > 0) {
    const more = preview.problems.length > 1 ? ` (and ${preview.problems.length - 1} more)` : '';
    throw new RuleError(`${fileName} was not imported: ${preview.problems[0].text}${more}`, 'file');
  }
  const confirmed = new Set((options.addExperts ?? []).map((c) => c.trim().toLowerCase()));
  const unconfirmed = preview.unknownExperts.filter((e) => !confirmed.has(e.code.toLowerCase()));
  if (unconfirmed.length > 0) {
    const more = unconfirmed.length > 1 ? ` (and ${unconfirmed.length - 1} more)` : '';
    throw new RuleError(`${fileName} was not imported: ${unconfirmed[0].text}${more}`, 'unknown-experts');
  }
  const ctx = roundContext(study, roundId);
  const combined = [
    ...storedEngineRatings(study, roundId),
    ...ratings.map((r) => ({
      item: r.itemCode,
      expert: r.expertCode,
      relevance: r.relevance,
      essential: r.essential,
      facet: r.facetName,
    })),
  ];
  const analysis = analyzeRound(study, ctx, combined);
  const at = new Date().toISOString();
  return study.db.transaction(() => {
    const pending: ImportRecord = {
      id: 0,
      roundId,
      fileName,
      sha256: preview.sha256,
      layout: preview.layout ?? 'long',
      ratings: ratings.length,
      importedAt: at,
      withdrawnAt: null,
    };
    const runId = storeRun(study, analysis, [
      ...listImports(study, roundId).filter((i) => !i.withdrawnAt),
      pending,
    ]);
    changeInPhase(
      study,
      {
        phase: 'review',
        kind: 'ratings-imported',
        target: `round ${ctx.round.number}: file "${fileName}"`,
        runId,
        detail: {
          fileName,
          sha256: preview.sha256,
          layout: preview.layout,
          ratings: ratings.length,
          experts: preview.experts.map((e) => e.code),
          addedToPanel: preview.experts.filter((e) => !e.onPanel).map((e) => e.code),
          items: preview.itemCount,
        },
      },
      () => {
        const importId = insertImport(study, {
          roundId,
          fileName,
          sha256: preview.sha256,
          layout: pending.layout,
          ratings: ratings.length,
          importedAt: at,
        });
        const expertIds = new Map(ctx.experts.map((e) => [e.code.toLowerCase(), e.id]));
        for (const e of preview.experts) {
          if (!expertIds.has(e.code.toLowerCase())) {
            expertIds.set(
              e.code.toLowerCase(),
              insertExpert(study, roundId, { code: e.code, role: '', name: '', nameWithheld: false }),
            );
          }
        }
        const rows: NewRating[] = ratings.map((r) => ({
          expertId: expertIds.get(r.expertCode.toLowerCase()) as number,
          itemId: r.itemId,
          relevance: r.relevance,
          essential: r.essential,
          facetId: r.facetId,
          comment: r.comment,
          sourceRow: r.row,
        }));
        insertRatings(study, roundId, importId, rows);
        freezeRoundRevisions(study, roundId);
      },
    );
    return { imported: ratings.length, runId };
  })();
}

/** Takes an imported file's ratings out of a round (the import stays on record, marked withdrawn). */
export function withdrawRatings(study: Study, importId: number, rationale: string): void {
  const record = getImport(study, importId);
  if (!record) throw new RuleError(`ratings import ${importId} does not exist in this study`, 'not-found');
  if (record.withdrawnAt) throw new RuleError(`the ratings from "${record.fileName}" are already withdrawn`);
  if (rationale.trim() === '')
    throw new RuleError(`say why the ratings from "${record.fileName}" are withdrawn`);
  const ctx = roundContext(study, record.roundId);
  const analysis = analyzeRound(study, ctx, storedEngineRatings(study, record.roundId, importId));
  study.db.transaction(() => {
    const remaining = listImports(study, record.roundId).filter((i) => !i.withdrawnAt && i.id !== importId);
    const runId = storeRun(study, analysis, remaining);
    changeInPhase(
      study,
      {
        phase: 'review',
        kind: 'ratings-withdrawn',
        target: `round ${ctx.round.number}: file "${record.fileName}"`,
        rationale: rationale.trim(),
        runId,
        detail: { importId, fileName: record.fileName, sha256: record.sha256, ratings: record.ratings },
      },
      () => {
        withdrawImport(study, importId, new Date().toISOString());
        if (countRatings(study, record.roundId) === 0) unfreezeRoundRevisions(study, record.roundId);
      },
    );
  })();
}

export interface DecisionInput {
  roundId: number;
  itemId: number;
  decision: Decision;
  rationale: string;
  /** The new wording, for a revise decision. */
  newText?: string;
}

/**
 * Records a decision on an item after a round: keep, revise (with the new wording, which becomes a
 * new revision) or retire; each with its rationale and the statistics it was taken on, in the log.
 * A later decision on the same item in the same round supersedes the earlier one.
 */
export function decideItem(study: Study, input: DecisionInput): number {
  const ctx = roundContext(study, input.roundId);
  const item = ctx.roundItems.find((it) => it.id === input.itemId);
  if (!item) {
    const known = getItem(study, input.itemId);
    throw new RuleError(
      known
        ? `item ${known.code} is not part of round ${ctx.round.number}`
        : `item ${input.itemId} does not exist in this study`,
      known ? 'rule' : 'not-found',
    );
  }
  const rationale = input.rationale.trim();
  if (rationale === '')
    throw new RuleError(
      `say why item ${item.code} is ${input.decision === 'keep' ? 'kept' : `${input.decision}d`}`,
    );
  const analysis = analyzeRound(study, ctx, storedEngineRatings(study, ctx.round.id));
  if (!analysis) {
    throw new RuleError(`round ${ctx.round.number} has no ratings yet; import them before deciding on items`);
  }
  let newText: string | null = null;
  if (input.decision === 'revise') {
    newText = (input.newText ?? '').trim();
    if (newText === '') throw new RuleError(`a revision of item ${item.code} needs the new wording`);
    if (newText.length > MAX_ITEM_TEXT) {
      throw new RuleError(
        `the new wording is ${newText.length} characters, above the limit of ${MAX_ITEM_TEXT}`,
      );
    }
    if (newText === item.text) {
      throw new RuleError(`the new wording of item ${item.code} is the same as its current wording`);
    }
  }
  const stats = analysis.report.items.find((s) => s.item === item.code) ?? null;
  const runId = latestRoundRun(study, ANALYSIS_KIND, ctx.round.id);
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: DECISION_KIND[input.decision],
      target: `item ${item.code}`,
      rationale,
      runId,
      detail: {
        round: ctx.round.number,
        decision: input.decision,
        stats: stats && {
          iCvi: stats.iCvi,
          modifiedKappa: stats.modifiedKappa,
          kappaBand: stats.kappaBand,
          cvr: stats.cvr,
          aikenV: stats.aikenV,
          facetAgreement: stats.facetAgreement,
          flags: stats.flags,
        },
        ...(newText !== null ? { before: item.text, after: newText } : {}),
      },
    },
    () => {
      const at = new Date().toISOString();
      const revisionId =
        newText === null
          ? null
          : insertRevision(study, item.id, newText, 'revised-after-review', ctx.round.id, at);
      setItemState(study, item.id, input.decision === 'retire' ? 'retired' : 'kept');
      return insertDecision(study, {
        itemId: item.id,
        roundId: ctx.round.id,
        decision: input.decision,
        rationale,
        revisionId,
        runId,
        decidedAt: at,
      });
    },
  );
}
