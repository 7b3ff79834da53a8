import path from 'node:path';
import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { getConstruct } from '../../../db/repos/construct.ts';
import { getDatasetSummary, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { breakPlace, verifyStudy } from '../../../db/verify.ts';
import { methodsField } from '../../engine/methods/index.ts';
import { type NormTable, normTable, ruleScores, type ScoreRule, scoreGrid } from '../../engine/norms.ts';
import { reverseScore, type ScaleBounds } from '../../engine/scoring.ts';
import { analysisData } from '../../phases/analysis-data.ts';
import { type InstrumentItem, instrumentForm } from '../../phases/appendix/instrument-form.ts';
import { RuleError } from '../../phases/errors.ts';

/**
 * Everything the final instrument's files print, gathered once from the study so the files cannot
 * disagree: the retained items in the chosen order, the response scale, the scoring key, norms from
 * the pilot sample the final purification round analysed, the retest SEM and MDC when the study holds
 * a retest analysis, the decision log's head with the command that checks it, and the cautions.
 */

export const INSTRUMENT_CAUTIONS = [
  'A new scale is not validated for diagnosis, hiring, admission or any other high-stakes decision about a person; these scores support research on the scale.',
  'Data from human participants needs ethics approval (or a documented exemption), informed consent and careful protection.',
  'Follow local regulations and licensed professional practice; the norms and figures here do not replace expert judgement.',
] as const;

/** Registry ids of the methods the scoring key and the norms rest on. */
export const INSTRUMENT_METHODS = [
  'scoring.reverse-keying',
  'scoring.sum-and-mean',
  'scoring.prorated',
  'norms.percentile-rank',
  'norms.standard-scores',
] as const;

export interface InstrumentScore {
  /** "Scale" or the facet's name. */
  name: string;
  kind: 'scale' | 'facet';
  items: string[];
  reverseKeyed: string[];
  /** Fewest answered items that still give a score. */
  minAnswered: number;
  range: { min: number; max: number };
  norms: NormTable;
}

export interface RetestFigures {
  runId: number;
  phase: string;
  analysis: string;
  createdAt: string;
  reliability: number;
  sem: number;
  mdc95: number;
}

export interface InstrumentModel {
  studyTitle: string;
  studyFile: string;
  exportedAt: string;
  title: string;
  instructions: string;
  bounds: ScaleBounds;
  anchors: { value: number; label: string }[];
  items: (InstrumentItem & { position: number })[];
  rule: ScoreRule;
  minAnsweredShare: number;
  orderChosen: boolean;
  scores: InstrumentScore[];
  sample: {
    datasetId: number;
    name: string;
    fileName: string;
    importedAt: string;
    sha256: string;
    respondentsInFile: number;
    excluded: number;
    analysed: number;
  };
  round: { number: number; runId: number };
  retest: RetestFigures | null;
  log: { head: string | null; rows: number };
  verifyCommand: string;
  verification: { intact: boolean; breaks: string[] };
  methods: { id: string; reference: string }[];
  cautions: readonly string[];
  warnings: string[];
}

/** The rule's missing-answer allowance as a count of items: at least 1, at most k. */
export function minAnsweredFor(k: number, share: number): number {
  return Math.min(k, Math.max(1, Math.ceil(share * k - 1e-9)));
}

/**
 * The latest stored analysis run holding a test–retest measurement error (an SEM and MDC95 built on
 * an intraclass correlation), or null. Found by the shape of its results, so any retest analysis the
 * study stores is found.
 */
export function latestRetest(study: Study): RetestFigures | null {
  const runs = listRuns(study);
  for (let i = runs.length - 1; i >= 0; i--) {
    const found = findIccError(runs[i].results, 0);
    if (found) {
      return {
        runId: runs[i].id,
        phase: runs[i].phase,
        analysis: runs[i].kind,
        createdAt: runs[i].createdAt,
        ...found,
      };
    }
  }
  return null;
}

function findIccError(
  value: unknown,
  depth: number,
): { reliability: number; sem: number; mdc95: number } | null {
  if (value === null || typeof value !== 'object' || depth > 3) return null;
  const v = value as Record<string, unknown>;
  if (
    v.basis === 'icc' &&
    typeof v.sem === 'number' &&
    typeof v.mdc95 === 'number' &&
    typeof v.reliability === 'number'
  ) {
    return { reliability: v.reliability, sem: v.sem, mdc95: v.mdc95 };
  }
  for (const child of Object.values(v)) {
    const found = findIccError(child, depth + 1);
    if (found) return found;
  }
  return null;
}

/**
 * Builds the model. Throws RuleError when purification has no retained set (code
 * `no-retained-set`) or a score cannot be normed (too few scored respondents, no variation).
 */
export function instrumentModel(study: Study, now: Date = new Date()): InstrumentModel {
  const form = instrumentForm(study);
  const construct = getConstruct(study);
  const bounds = { min: construct.responseMin, max: construct.responseMin + construct.responsePoints - 1 };
  const anchors = construct.anchors.map((label, i) => ({ value: bounds.min + i, label: label.trim() }));
  const summary = getDatasetSummary(study, form.round.datasetId);
  const encoded = loadEncodedDataset(study, form.round.datasetId);
  if (!summary || !encoded) {
    throw new RuleError(`the pilot dataset of purification round ${form.round.number} is gone`, 'not-found');
  }
  const spelling = new Map(
    encoded.columns
      .filter((c) => c.role === 'item' && c.itemCode)
      .map((c) => [(c.itemCode as string).toLowerCase(), c.itemCode as string]),
  );
  const codes = form.items.map((it) => it.code);
  const read = analysisData(
    study,
    summary.id,
    codes.map((c) => spelling.get(c.toLowerCase()) ?? c),
  );
  const reverse = form.items.filter((it) => it.keying === 'reverse').map((it) => it.code);
  const scored = reverseScore(read.data, codes, reverse, bounds);
  const groups: { name: string; kind: 'scale' | 'facet'; items: InstrumentItem[] }[] = [
    { name: 'Scale', kind: 'scale', items: form.items },
    ...form.facets.map((f) => ({
      name: f.name,
      kind: 'facet' as const,
      items: form.items.filter((it) => it.facetId === f.id),
    })),
  ];
  const scores = groups
    .filter((g) => g.items.length > 0)
    .map((g): InstrumentScore => {
      const columns = g.items.map((it) => codes.indexOf(it.code));
      const block = scored.map((row) => columns.map((c) => row[c]));
      const k = g.items.length;
      const minAnswered = minAnsweredFor(k, form.minAnsweredShare);
      const grid = scoreGrid(k, bounds, form.rule);
      let norms: NormTable;
      try {
        norms = normTable(ruleScores(block, form.rule, minAnswered), grid);
      } catch (error) {
        throw new RuleError(
          `norms for the ${g.kind === 'scale' ? 'scale' : `facet "${g.name}"`} score cannot be computed from "${summary.name}": ${(error as Error).message}`,
          'no-norms',
        );
      }
      return {
        name: g.name,
        kind: g.kind,
        items: g.items.map((it) => it.code),
        reverseKeyed: g.items.filter((it) => it.keying === 'reverse').map((it) => it.code),
        minAnswered,
        range: { min: grid[0], max: grid[grid.length - 1] },
        norms,
      };
    });
  const head = study.log.head() ?? null;
  const retest = latestRetest(study);
  const report = verifyStudy(study);
  const warnings = [...form.warnings];
  const reworded = form.items.filter((it) => it.rewordedSinceRound).map((it) => it.code);
  if (reworded.length > 0) {
    warnings.push(
      `${reworded.join(', ')} reworded after purification round ${form.round.number}; the questionnaire prints the current wording, the norms come from answers to the earlier one`,
    );
  }
  if (!form.chosen)
    warnings.push('no order set yet: the items print in the default order (facets taking turns)');
  if (anchors.some((a) => a.label === ''))
    warnings.push('some response points have no label (Construct phase, response format)');
  const breaks = report.breaks.map(
    (b) => `${b.check}: ${[breakPlace(b), b.problem].filter(Boolean).join(': ')}`,
  );
  if (!report.intact) warnings.push(`the study failed verification at export: ${breaks[0]}`);
  const fileName = path.basename(study.path);
  return {
    studyTitle: study.meta('title') || fileName,
    studyFile: fileName,
    exportedAt: now.toISOString(),
    title: form.title,
    instructions: form.instructions,
    bounds,
    anchors,
    items: form.items.map((it, i) => ({ ...it, position: i + 1 })),
    rule: form.rule,
    minAnsweredShare: form.minAnsweredShare,
    orderChosen: form.chosen,
    scores,
    sample: {
      datasetId: summary.id,
      name: summary.name,
      fileName: summary.fileName,
      importedAt: summary.importedAt,
      sha256: summary.fileSha256,
      respondentsInFile: read.provenance.respondentsInFile,
      excluded: read.provenance.excluded,
      analysed: read.data.length,
    },
    round: { number: form.round.number, runId: form.round.runId },
    retest,
    log: { head, rows: study.log.count() },
    verifyCommand: `scalewright project verify ${quoteArg(fileName)} --head ${head ?? 'SEQ:HASH'}`,
    verification: { intact: report.intact, breaks },
    methods: methodsField([...INSTRUMENT_METHODS, ...(retest ? ['sem.classical', 'sem.mdc95'] : [])]),
    cautions: INSTRUMENT_CAUTIONS,
    warnings,
  };
}

/** A file name as a shell argument: quoted when it holds anything but safe characters. */
function quoteArg(name: string): string {
  return /^[\w.@%+=:,/-]+$/.test(name) ? name : `'${name.replace(/'/g, `'\\''`)}'`;
}

/** What every file says about where it comes from: the study, the log head, and whether it verified. */
export function provenance(m: InstrumentModel): { study: string; head: string; verification: string } {
  return {
    study: `Study: ${m.studyTitle} (${m.studyFile}); exported ${m.exportedAt}`,
    head: `Decision log head: ${m.log.head ?? 'none'} (${m.log.rows} rows)`,
    verification: m.verification.intact
      ? 'Verification at export: the study passed every check (file, log chain, stored files, analysis runs, content).'
      : `VERIFICATION FAILED at export (${m.verification.breaks.length} break(s)); first: ${m.verification.breaks[0]}. Do not rely on these files until the study verifies.`,
  };
}

/** The same as lines of text, the check command spelled out. */
export function provenanceLines(m: InstrumentModel): string[] {
  const p = provenance(m);
  return [p.study, `${p.head}. Check it later with: ${m.verifyCommand}`, p.verification];
}
