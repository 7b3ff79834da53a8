import { canonicalJson } from '../../../db/canonical-json.ts';
import { listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import { listDatasets } from '../../../db/repos/datasets.ts';
import { getPhaseStatus } from '../../../db/repos/phase-state.ts';
import type { Study } from '../../../db/study.ts';
import type { CfaJobOutput, InvarianceJobOutput } from '../../workers/validity.ts';
import { FIT_CUTOFFS } from '../../engine/cfa/fit-indices.ts';
import { currentDataset } from '../analysis-data.ts';
import { modelInForce } from './model.ts';
import type { RelationsResults } from './relations.ts';
import type { RetestResults } from './retest.ts';
import { measureSettings, groupSettings, plannedRelations } from './settings.ts';
import { latestRun, type StoredRun } from './structure.ts';

/** The sources of validity evidence of the Standards for Educational and Psychological Testing. Registry: `validity.standards`. */
export const EVIDENCE_SOURCES = [
  { id: 'content', title: 'Test content' },
  { id: 'response-processes', title: 'Response processes' },
  { id: 'internal-structure', title: 'Internal structure' },
  { id: 'relations', title: 'Relations to other variables' },
  { id: 'consequences', title: 'Consequences of testing' },
] as const;
export type EvidenceSourceId = (typeof EVIDENCE_SOURCES)[number]['id'];

export interface EvidenceSource {
  id: EvidenceSourceId;
  title: string;
  state: 'found' | 'partial' | 'missing';
  found: string[];
  missing: string[];
  /** Changes whenever what was found changes; an acknowledgement holds for one fingerprint. */
  fingerprint: string;
}

const two = (x: number | null | undefined) =>
  x === null || x === undefined ? '—' : x.toFixed(2).replace(/^(-?)0\./, '$1.');
const three = (x: number | null | undefined) =>
  x === null || x === undefined ? '—' : x.toFixed(3).replace(/^(-?)0\./, '$1.');

/** The latest relations run, out of date also when the column settings or the planned relations changed since. */
export function latestRelations(study: Study): StoredRun<RelationsResults> | null {
  const run = latestRun<RelationsResults>(study, 'relations');
  if (!run || run.outOfDate) return run;
  const inputs = run.run.inputs as { measures?: unknown; groups?: unknown; relations?: unknown };
  if (canonicalJson(inputs.measures ?? {}) !== canonicalJson(Object.fromEntries(measureSettings(study))))
    return { ...run, outOfDate: 'a criterion column was described differently since' };
  if (canonicalJson(inputs.groups ?? {}) !== canonicalJson(Object.fromEntries(groupSettings(study))))
    return { ...run, outOfDate: 'a group column was described differently since' };
  if (canonicalJson(inputs.relations ?? []) !== canonicalJson(plannedRelations(study)))
    return { ...run, outOfDate: 'the planned relations changed since' };
  return run;
}

/** The latest retest run, out of date when either dataset is no longer current or the items changed. */
export function latestRetest(
  study: Study,
): { run: RunRecord; results: RetestResults; outOfDate: string | null } | null {
  const stored = listRuns(study, { phase: 'validity', kind: 'retest' }).at(-1);
  if (!stored) return null;
  const run = { run: stored, results: stored.results as RetestResults };
  const inputs = stored.inputs as {
    first: { datasetId: number; role: string };
    second: { datasetId: number };
    items: string[];
  };
  const retest = currentDataset(study, 'retest');
  const first = currentDataset(study, inputs.first.role as 'validation' | 'pilot');
  const items = modelInForce(study).model.factors.flatMap((f) => f.items);
  let outOfDate: string | null = null;
  if (retest?.id !== inputs.second.datasetId) outOfDate = 'the current retest data changed since';
  else if (first?.id !== inputs.first.datasetId)
    outOfDate = 'the first occasion’s dataset is no longer current';
  else if (canonicalJson(items) !== canonicalJson(inputs.items)) outOfDate = 'the items changed since';
  return { ...run, outOfDate };
}

function fingerprint(found: string[], missing: string[]): string {
  return canonicalJson({ found, missing });
}

function source(id: EvidenceSourceId, found: string[], missing: string[]): EvidenceSource {
  const title = EVIDENCE_SOURCES.find((s) => s.id === id)?.title ?? id;
  const state = found.length === 0 ? 'missing' : missing.length === 0 ? 'found' : 'partial';
  return { id, title, state, found, missing, fingerprint: fingerprint(found, missing) };
}

/** What the study holds for each source of validity evidence, and what it lacks. */
export function evidenceSources(study: Study): EvidenceSource[] {
  const out: EvidenceSource[] = [];

  const review = getPhaseStatus(study, 'review');
  out.push(
    source(
      'content',
      review === 'signed-off'
        ? ['Expert review of the item pool signed off (content validity ratios and indices, item decisions)']
        : [],
      review === 'signed-off' ? [] : [`the Expert review phase is ${review.replace('-', ' ')}`],
    ),
  );

  const pilotScreened =
    getPhaseStatus(study, 'pilot') === 'signed-off' && listDatasets(study, 'pilot').length > 0;
  out.push(
    source(
      'response-processes',
      pilotScreened
        ? ['Pilot responses screened for inattention (attention checks, response times, straight-lining)']
        : [],
      [
        'No study of how respondents read and answer the items (for example cognitive interviews or think-aloud protocols) is recorded in this study',
      ],
    ),
  );

  const cfa = latestRun<CfaJobOutput>(study, 'cfa');
  const inv = latestRun<InvarianceJobOutput>(study, 'invariance');
  const retest = latestRetest(study);
  const found: string[] = [];
  const missing: string[] = [];
  if (cfa && !cfa.outOfDate) {
    const f = cfa.results.fit;
    found.push(
      `CFA (run ${cfa.run.id}, n = ${cfa.inputs.n}): χ²(${f.df}) = ${f.chiSquare.toFixed(1)}, CFI = ${three(f.cfi)}, TLI = ${three(f.tli)}, RMSEA = ${three(f.rmsea)}, SRMR = ${three(f.srmr)}`,
    );
    const good =
      (f.cfi ?? 0) >= FIT_CUTOFFS.cfi && (f.rmsea ?? 1) <= FIT_CUTOFFS.rmsea && f.srmr <= FIT_CUTOFFS.srmr;
    if (!good) missing.push('the model does not meet every fit cut-off (common practice)');
    const weakCr = cfa.results.reliability.filter((r) => r.compositeReliability < 0.7);
    found.push(
      `Composite reliability ${cfa.results.reliability.map((r) => `${r.factor} ${two(r.compositeReliability)}`).join(', ')}`,
    );
    if (weakCr.length > 0)
      missing.push(`composite reliability below .70 for ${weakCr.map((r) => r.factor).join(', ')}`);
  } else
    missing.push(
      cfa ? `the latest CFA is out of date: ${cfa.outOfDate}` : 'no CFA on the validation data yet',
    );
  if (inv && !inv.outOfDate)
    found.push(
      `Invariance across "${inv.inputs.groupColumn}": ${inv.results.result.level} (run ${inv.run.id})`,
    );
  else
    missing.push(
      inv
        ? `the latest invariance test is out of date: ${inv.outOfDate}`
        : 'no invariance test across groups',
    );
  if (retest && !retest.outOfDate) {
    const icc = retest.results.icc.forms.find((f) => f.form === retest.results.form);
    found.push(
      `Test–retest ${retest.results.form} = ${three(icc?.value)} over ${retest.results.pairs} pairs, SEM = ${two(retest.results.sem)}, MDC95 = ${two(retest.results.mdc95)}`,
    );
  } else
    missing.push(
      retest ? `the latest retest analysis is out of date: ${retest.outOfDate}` : 'no test–retest analysis',
    );
  out.push(source('internal-structure', found, missing));

  const rel = latestRelations(study);
  const rf: string[] = [];
  const rm: string[] = [];
  if (rel && !rel.outOfDate) {
    const tested = rel.results.hypotheses.filter((h) => h.outcome);
    const count = (v: string) => tested.filter((h) => h.outcome?.verdict === v).length;
    rf.push(
      `${tested.length} of ${rel.results.hypotheses.length} planned relations tested (run ${rel.run.id}): ${count('supported')} supported, ${count('partly supported')} partly, ${count('not supported')} not supported`,
    );
    for (const m of rel.results.measures)
      rf.push(
        `${m.column} (${m.timing}): r = ${two(m.correlation.r)} [${two(m.correlation.lower)}, ${two(m.correlation.upper)}]`,
      );
    for (const g of rel.results.groups)
      rf.push(
        `${g.column}: ${g.comparison.a.name} vs ${g.comparison.b.name}, d = ${two(g.comparison.cohensD)}, Welch t(${g.comparison.df.toFixed(1)}) = ${two(g.comparison.t)}`,
      );
    const untested = rel.results.hypotheses.filter((h) => !h.outcome);
    if (untested.length > 0) rm.push(`untested: ${untested.map((h) => h.otherConstruct).join(', ')}`);
    if (!rel.results.measures.some((m) => m.timing === 'predictive'))
      rm.push('no criterion measured later (predictive)');
  } else
    rm.push(
      rel
        ? `the latest test of the planned relations is out of date: ${rel.outOfDate}`
        : 'the planned relations have not been tested yet',
    );
  out.push(source('relations', rf, rm));

  out.push(
    source(
      'consequences',
      [],
      [
        'No evidence about the consequences of using the scores is recorded; a new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions',
      ],
    ),
  );
  return out;
}
