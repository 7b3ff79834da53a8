import { getRun } from '../../../db/repos/analysis-runs.ts';
import { getConstruct, listFacets } from '../../../db/repos/construct.ts';
import {
  getInstrumentForm,
  type InstrumentFormRecord,
  setInstrumentForm as storeInstrumentForm,
} from '../../../db/repos/instrument.ts';
import { listItems } from '../../../db/repos/items.ts';
import { listRounds, type RoundRecord } from '../../../db/repos/purification.ts';
import type { Study } from '../../../db/study.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import { purificationRules } from '../purification/index.ts';

/**
 * The final instrument's form: which items it prints (the purification phase's retained set), in
 * which order, under which heading and instructions, and how its scores are formed. Setting it is a
 * logged decision of the methods-appendix phase, the phase that hands the study's results on.
 */

const PHASE = 'appendix';

/** The checklist items of the purification phase that say a retained set exists. */
const RETAINED_SET_GATES = ['round-on-current-data', 'final-round-current'] as const;

/** One retained item as the instrument prints and scores it. */
export interface InstrumentItem {
  itemId: number;
  code: string;
  text: string;
  facetId: number | null;
  facetName: string | null;
  keying: 'forward' | 'reverse';
  /** True when the item was reworded after the final round analysed it. */
  rewordedSinceRound: boolean;
}

export interface RetainedSet {
  round: RoundRecord;
  /** In the item pool's order. */
  items: InstrumentItem[];
  /** Facets that keep items, in the construct's order. */
  facets: { id: number; name: string }[];
}

/**
 * The items purification retained: those of its final round, provided that round ran on the current
 * pilot data and reflects every drop, move and restore. Otherwise a RuleError (code
 * `no-retained-set`) names what is missing, in the purification checklist's own words.
 */
export function retainedSet(study: Study): RetainedSet {
  const round = listRounds(study).at(-1);
  const unmet = purificationRules
    .checklist(study)
    .filter((c) => (RETAINED_SET_GATES as readonly string[]).includes(c.id) && !c.met);
  if (!round || unmet.length > 0) {
    const why = unmet.length > 0 ? unmet.map((c) => `${c.label}: ${c.detail}`).join('; ') : 'no round yet';
    throw new RuleError(
      `the purification phase has no retained item set yet (${why}); run a purification round that includes every decision first`,
      'no-retained-set',
    );
  }
  const pool = new Map(listItems(study).map((it) => [it.id, it]));
  const facets = listFacets(study, { includeRetired: true });
  const facetName = new Map(facets.map((f) => [f.id, f.name]));
  const analysed = (
    getRun(study, round.runId)?.inputs as { items?: { itemId: number; revisionId: number | null }[] }
  )?.items;
  const revisionAnalysed = new Map((analysed ?? []).map((it) => [it.itemId, it.revisionId]));
  const runItems = round.items;
  const items: InstrumentItem[] = runItems.map((ri) => {
    const item = pool.get(ri.itemId);
    if (!item)
      throw new RuleError(`item ${ri.code} of purification round ${round.number} is gone from the pool`);
    return {
      itemId: ri.itemId,
      code: item.code,
      text: item.text,
      facetId: ri.facetId,
      facetName: ri.facetId === null ? null : (facetName.get(ri.facetId) ?? null),
      keying: ri.keying,
      rewordedSinceRound: (revisionAnalysed.get(ri.itemId) ?? item.revisionId) !== item.revisionId,
    };
  });
  const used = new Set(items.map((it) => it.facetId));
  return {
    round,
    items,
    facets: facets.filter((f) => used.has(f.id)).map((f) => ({ id: f.id, name: f.name })),
  };
}

/**
 * The order used until the researcher sets one: one item of each facet in turn (the first of every
 * facet, then the second, …), each facet's items in pool order, items without a facet last. Spreading
 * the facets through the form keeps a facet's items from sitting side by side, where answering one
 * can colour the next.
 */
export function defaultOrder(set: RetainedSet): InstrumentItem[] {
  const groups = set.facets.map((f) => set.items.filter((it) => it.facetId === f.id));
  const out: InstrumentItem[] = [];
  for (let i = 0; groups.some((g) => i < g.length); i++) {
    for (const g of groups) if (i < g.length) out.push(g[i]);
  }
  out.push(...set.items.filter((it) => !out.includes(it)));
  return out;
}

export const DEFAULT_INSTRUCTIONS =
  'Each statement below describes a situation. Mark the one answer that fits you best. ' +
  'There are no right or wrong answers; answer every statement, even if you are unsure.';

/** The form as the export and the screen use it: items in order, heading, instructions, scoring. */
export interface InstrumentForm {
  items: InstrumentItem[];
  title: string;
  instructions: string;
  rule: 'sum' | 'mean';
  minAnsweredShare: number;
  /** False while the defaults stand (nothing set yet). */
  chosen: boolean;
  /** The retained set changed since the order was set: what was done about it. */
  warnings: string[];
  round: RoundRecord;
  facets: { id: number; name: string }[];
}

/** The effective form: the stored one applied to the retained set, or the defaults. */
export function instrumentForm(study: Study): InstrumentForm {
  const set = retainedSet(study);
  const stored = getInstrumentForm(study);
  const base = defaultOrder(set);
  const warnings: string[] = [];
  let items = base;
  if (stored) {
    const byId = new Map(set.items.map((it) => [it.itemId, it]));
    const placed = stored.order.map((id) => byId.get(id)).filter((it): it is InstrumentItem => !!it);
    const added = base.filter((it) => !placed.includes(it));
    const gone = stored.order.length - placed.length;
    if (added.length > 0) {
      warnings.push(
        `${added.map((it) => it.code).join(', ')} joined the retained set after the order was set; printed last until the order is set again`,
      );
    }
    if (gone > 0)
      warnings.push(`${gone} item(s) of the chosen order are no longer retained and are left out`);
    items = [...placed, ...added];
  }
  return {
    items,
    title: stored?.title || getConstruct(study).name || 'Questionnaire',
    instructions: stored?.instructions || DEFAULT_INSTRUCTIONS,
    rule: stored?.rule ?? 'mean',
    minAnsweredShare: stored?.minAnsweredShare ?? 1,
    chosen: stored !== null,
    warnings,
    round: set.round,
    facets: set.facets,
  };
}

export interface InstrumentFormRequest {
  /** Item codes, every retained item exactly once. */
  order?: string[];
  title?: string;
  instructions?: string;
  rule?: 'sum' | 'mean';
  minAnsweredShare?: number;
  reason: string;
}

/**
 * Sets the instrument's order, heading, instructions and scoring rule (what is not given keeps its
 * current value): a logged decision with its reason, before and after in the log row. Refuses an
 * order that leaves out, repeats or adds an item (naming each), a share outside (0, 1], an empty
 * reason, and a signed-off methods-appendix phase.
 */
export function setInstrumentForm(study: Study, request: InstrumentFormRequest): void {
  if (request.reason.trim() === '') throw new RuleError('say why the instrument is set this way (a reason)');
  const now = instrumentForm(study);
  let order = now.items;
  if (request.order) {
    const byCode = new Map(now.items.map((it) => [it.code.toLowerCase(), it]));
    const unknown = request.order.filter((c) => !byCode.has(c.toLowerCase()));
    const seen = new Set<string>();
    const twice = request.order.filter((c) => {
      const key = c.toLowerCase();
      if (seen.has(key)) return true;
      seen.add(key);
      return false;
    });
    const left = now.items.filter((it) => !seen.has(it.code.toLowerCase())).map((it) => it.code);
    const problems = [
      unknown.length > 0 ? `not in the retained set: ${unknown.join(', ')}` : '',
      twice.length > 0 ? `listed twice: ${twice.join(', ')}` : '',
      left.length > 0 ? `left out: ${left.join(', ')}` : '',
    ].filter((p) => p !== '');
    if (problems.length > 0) {
      throw new RuleError(`the order must list every retained item once (${problems.join('; ')})`);
    }
    order = request.order.map((c) => byCode.get(c.toLowerCase()) as InstrumentItem);
  }
  const share = request.minAnsweredShare ?? now.minAnsweredShare;
  if (!(share > 0 && share <= 1)) {
    throw new RuleError(
      `the share of items a score needs answered must lie above 0 and at most 1 (got ${share})`,
    );
  }
  const title = (request.title ?? now.title).trim();
  const instructions = (request.instructions ?? now.instructions).trim();
  if (title === '') throw new RuleError('the questionnaire needs a heading');
  if (instructions === '') throw new RuleError('the questionnaire needs instructions for respondents');
  const next: InstrumentFormRecord = {
    order: order.map((it) => it.itemId),
    title,
    instructions,
    rule: request.rule ?? now.rule,
    minAnsweredShare: share,
  };
  const formSummary = (f: InstrumentForm | InstrumentFormRecord, codes: string[]) => ({
    order: codes,
    title: f.title,
    instructions: f.instructions,
    rule: f.rule,
    minAnsweredShare: f.minAnsweredShare,
  });
  changeInPhase(
    study,
    {
      phase: PHASE,
      kind: 'instrument-form-set',
      target: 'final instrument',
      rationale: request.reason,
      detail: {
        before: now.chosen
          ? formSummary(
              now,
              now.items.map((it) => it.code),
            )
          : null,
        after: formSummary(
          next,
          order.map((it) => it.code),
        ),
      },
    },
    () => storeInstrumentForm(study, next),
  );
}
