import type { LogEntry } from '../../../db/decision-log.ts';
import { getRun, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import { listFacets } from '../../../db/repos/construct.ts';
import { getItemByCode, listItems } from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import { RuleError } from '../errors.ts';
import { PHASE_TITLES } from '../titles.ts';

/** The stage of an item's life a log row belongs to. */
export type StoryStage = 'drafted' | 'revised' | 'edited' | 'rated' | 'decided' | 'analysed';

/** One figure an analysis gave the item, raw (the screen formats it). */
export interface StoryFigure {
  label: string;
  value: number | null;
  /** How it reads: a statistic bounded by ±1, another statistic, or a count. */
  form: 'bounded' | 'plain' | 'count';
}

/** One step of an item's life, from its log row. */
export interface StoryStep {
  seq: number;
  at: string;
  by: string;
  phase: string;
  kind: string;
  stage: StoryStage;
  /** The log row's target and kind, in words ("revised after review"). */
  title: string;
  /** The wording the step gave the item, when it set one. */
  wording: string | null;
  /** The wording before, when the step changed it. */
  before: string | null;
  /** The rationale the log row holds ('' when the step needed none). */
  reason: string;
  figures: StoryFigure[];
  /** The stored analysis run the step rests on. */
  runId: number | null;
}

export interface ItemStory {
  item: {
    id: number;
    code: string;
    /** Earlier codes the item had (renamed later). */
    formerCodes: string[];
    text: string;
    facet: string | null;
    keying: string;
    state: string;
    revisions: number;
  };
  /** Where the item stands now, in words: "dropped in purification round 1". */
  standing: string;
  steps: StoryStep[];
}

const ITEM_KINDS_DRAFTED = new Set(['item-added']);
const ITEM_KINDS_REVISED = new Set(['item-reworded', 'revised-after-review']);
const ITEM_KINDS_DECIDED = new Set([
  'kept-after-review',
  'retired-after-review',
  'item-dropped',
  'item-kept',
  'item-moved',
  'item-restored',
  'item-retired',
]);

/** Codes the item has had: its code now and every earlier one an edit renamed. */
function codesOf(study: Study, itemId: number, code: string): string[] {
  const codes = [code];
  const rows = study.db
    .prepare(
      `SELECT detail FROM decision_log WHERE kind = 'item-edited' AND json_extract(detail, '$.itemId') = ?
       AND json_extract(detail, '$.code') IS NOT NULL ORDER BY seq`,
    )
    .all(itemId) as { detail: string }[];
  for (const r of rows) {
    const before = (JSON.parse(r.detail) as { code?: { before?: unknown } }).code?.before;
    if (typeof before === 'string' && !codes.includes(before)) codes.push(before);
  }
  return codes;
}

function targetCode(target: string): string | null {
  const m = /^item (\S+)/.exec(target);
  return m ? m[1].toLowerCase() : null;
}

function num(x: unknown): number | null {
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
}

/** The item's content-validity figures in a stored content-validity run. */
function ratingFigures(run: RunRecord, codes: Set<string>): StoryFigure[] | null {
  const items = (run.results as { items?: Record<string, unknown>[] }).items ?? [];
  const row = items.find((it) => typeof it.item === 'string' && codes.has(it.item.toLowerCase()));
  if (!row) return null;
  return present([
    { label: 'experts rating', value: num(row.rated), form: 'count' },
    { label: 'I-CVI', value: num(row.iCvi), form: 'bounded' },
    { label: 'modified kappa', value: num(row.modifiedKappa), form: 'bounded' },
    { label: 'CVR', value: num(row.cvr), form: 'bounded' },
    { label: "Aiken's V", value: num(row.aikenV), form: 'bounded' },
  ]);
}

/** The figures that exist (CVR is absent where the form did not ask the essential question). */
function present(figures: StoryFigure[]): StoryFigure[] {
  return figures.filter((f) => f.value !== null);
}

/** The item's figures in a stored purification round. */
function roundFigures(run: RunRecord, codes: Set<string>): StoryFigure[] | null {
  const scale = (
    run.results as { scale?: { items?: Record<string, unknown>[]; alpha?: { value?: unknown } } }
  ).scale;
  const row = scale?.items?.find((it) => typeof it.name === 'string' && codes.has(it.name.toLowerCase()));
  if (!row) return null;
  return present([
    { label: 'mean', value: num(row.mean), form: 'plain' },
    { label: 'SD', value: num(row.sd), form: 'plain' },
    { label: 'corrected item-total r', value: num(row.correctedItemTotal), form: 'bounded' },
    { label: 'alpha if deleted', value: num(row.alphaIfDeleted), form: 'bounded' },
    { label: 'alpha of the round', value: num(scale?.alpha?.value), form: 'bounded' },
  ]);
}

function words(kind: string): string {
  return kind.replace(/-/g, ' ');
}

/**
 * An item's life, in log order: drafted (added or imported), each rewording, each expert-review
 * round that rated it (with its content-validity figures from the stored run), each purification
 * round that analysed it (its item statistics), and every decision on it (kept, revised, retired,
 * dropped, moved, restored) with the reason, each step naming its log row and the stored run it
 * rests on. Rows written under an earlier code of the item count too. Cost O(log rows + runs read).
 */
export function itemStory(study: Study, code: string): ItemStory {
  const item = getItemByCode(study, code.trim());
  if (!item) throw new RuleError(`the study has no item with the code "${code.trim()}"`, 'not-found');
  const codes = codesOf(study, item.id, item.code);
  const lower = new Set(codes.map((c) => c.toLowerCase()));
  const runs = new Map<number, RunRecord | undefined>();
  const run = (id: number) => {
    if (!runs.has(id)) runs.set(id, getRun(study, id));
    return runs.get(id);
  };
  const steps: StoryStep[] = [];
  const rows = study.log.list().reverse();
  for (const e of rows) {
    const step = storyStep(e, lower, run);
    if (step) steps.push(step);
  }
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const decided = steps.filter((s) => s.stage === 'decided').at(-1);
  const analysed = steps.filter((s) => s.stage === 'analysed').at(-1);
  const phaseTitle = (p: string) => PHASE_TITLES[p as keyof typeof PHASE_TITLES] ?? p;
  const standing = decided
    ? `${decided.title.replace(/^item \S+ /, '')} (${phaseTitle(decided.phase)} phase, log row ${decided.seq})`
    : analysed
      ? `in the item set of ${analysed.title.replace(/^analysed in /, '')} (log row ${analysed.seq}); no keep or drop decision logged yet`
      : `in the item pool (${item.state}); no keep or drop decision logged yet`;
  return {
    item: {
      id: item.id,
      code: item.code,
      formerCodes: codes.slice(1),
      text: item.text,
      facet: item.facetId === null ? null : (facets.get(item.facetId) ?? null),
      keying: item.keying,
      state: item.state,
      revisions: item.revision,
    },
    standing,
    steps,
  };
}

function storyStep(
  e: LogEntry,
  codes: Set<string>,
  run: (id: number) => RunRecord | undefined,
): StoryStep | undefined {
  const base = {
    seq: e.seq,
    at: e.at,
    by: e.actorName,
    phase: e.phase,
    kind: e.kind,
    reason: e.rationale,
    runId: e.runId,
    wording: null,
    before: null,
    figures: [],
  };
  const d = e.detail as Record<string, unknown>;
  const str = (x: unknown) => (typeof x === 'string' ? x : null);
  const own = targetCode(e.target);
  if (own !== null && codes.has(own)) {
    const title = `${e.target} ${words(e.kind).replace(/^item /, '')}`;
    if (ITEM_KINDS_DRAFTED.has(e.kind)) return { ...base, stage: 'drafted', title, wording: str(d.text) };
    if (ITEM_KINDS_REVISED.has(e.kind)) {
      const figures = e.kind === 'revised-after-review' ? statsFigures(d.stats) : [];
      return { ...base, stage: 'revised', title, wording: str(d.after), before: str(d.before), figures };
    }
    if (e.phase === 'items' && e.kind === 'item-kept') {
      return { ...base, stage: 'edited', title: `${e.target} kept in the pool for expert review` };
    }
    if (ITEM_KINDS_DECIDED.has(e.kind)) {
      return { ...base, stage: 'decided', title, figures: statsFigures(d.stats) };
    }
    return { ...base, stage: 'edited', title };
  }
  if (e.kind === 'items-imported' && Array.isArray(d.codes)) {
    if (!d.codes.some((c) => typeof c === 'string' && codes.has(c.toLowerCase()))) return undefined;
    return { ...base, stage: 'drafted', title: `imported from ${e.target}` };
  }
  if ((e.kind === 'ratings-imported' || e.kind === 'ratings-withdrawn') && e.runId !== null) {
    const stored = run(e.runId);
    const figures = stored ? ratingFigures(stored, codes) : null;
    if (!figures) return undefined;
    return { ...base, stage: 'rated', title: ratedTitle(e), figures };
  }
  if (e.kind === 'analysis-run' && e.runId !== null && d.analysis === 'purification-round') {
    const stored = run(e.runId);
    const figures = stored ? roundFigures(stored, codes) : null;
    if (!figures) return undefined;
    return { ...base, stage: 'analysed', title: `analysed in ${e.target}`, figures };
  }
  return undefined;
}

/** "rated in review round 1 (file "x.csv")", or "… (file "x.csv" withdrawn: figures without it)". */
function ratedTitle(e: LogEntry): string {
  const m = /^round (\d+): (.*)$/.exec(e.target);
  const round = m ? `review round ${m[1]}` : e.target;
  const file = m ? m[2] : '';
  return e.kind === 'ratings-withdrawn'
    ? `rated again in ${round}, ${file} withdrawn`
    : `rated in ${round}${file ? `, ${file}` : ''}`;
}

/** The content-validity figures a review decision's log row holds. */
function statsFigures(stats: unknown): StoryFigure[] {
  if (typeof stats !== 'object' || stats === null) return [];
  const s = stats as Record<string, unknown>;
  return present([
    { label: 'I-CVI', value: num(s.iCvi), form: 'bounded' },
    { label: 'modified kappa', value: num(s.modifiedKappa), form: 'bounded' },
    { label: 'CVR', value: num(s.cvr), form: 'bounded' },
    { label: "Aiken's V", value: num(s.aikenV), form: 'bounded' },
  ]);
}

/** One log row by its number. Throws RuleError when the log holds no such row. */
export function logRow(study: Study, seq: number): LogEntry {
  const row = study.log.row(seq);
  if (!row)
    throw new RuleError(`the decision log has no row ${seq} (it has ${study.log.count()})`, 'not-found');
  return row;
}

/** Every item of the pool (retired ones too), for choosing whose story to read. */
export function storyItems(study: Study): { code: string; text: string; state: string }[] {
  return listItems(study).map((it) => ({ code: it.code, text: it.text, state: it.state }));
}
