import { insertFacet, listFacets } from '../../../../db/repos/construct.ts';
import { listDecisions, listRounds } from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import { changeInPhase, requireOpen } from '../../change.ts';
import { RuleError } from '../../errors.ts';
import { PHASE, standingsOf } from '../standing.ts';
import { listItems } from '../../../../db/repos/items.ts';
import { decideItem } from './decisions.ts';

/** The reasons every facet decision carries; the domain reason is required. */
export interface FacetRationale {
  domainRationale: string;
  statisticalRationale: string;
}

function activeFacetNamed(study: Study, id: number, role: string) {
  const facet = listFacets(study).find((f) => f.id === id);
  if (!facet)
    throw new RuleError(`the ${role} facet (${id}) is not an active facet of this study`, 'not-found');
  return facet;
}

/** Item codes of the latest round that sit in the facet now (every decision so far applied). */
function itemsOfFacet(study: Study, facetId: number): string[] {
  const latest = listRounds(study).at(-1);
  if (!latest)
    throw new RuleError('run a round first: facet decisions are made on a round’s results', 'no-round');
  const standings = standingsOf(listItems(study), listDecisions(study));
  return latest.items
    .filter((it) => {
      const s = standings.get(it.itemId);
      return s !== undefined && s.droppedBy === null && s.facetId === facetId;
    })
    .map((it) => it.code);
}

function requireDomain(r: FacetRationale, what: string): { domain: string; statistical: string } {
  const domain = r.domainRationale.trim();
  if (domain === '') {
    throw new RuleError(
      `${what} changes what the facets mean: say how the items’ content fits the facet they go to`,
    );
  }
  return { domain, statistical: r.statisticalRationale.trim() };
}

/**
 * Merges one facet into another on the latest round: every item of `fromFacetId` still in (not
 * dropped) moves to `intoFacetId`, each as its own move decision with the same reasons and a log row
 * that names the merge; all are recorded or (when one is refused) none. Each move is reversed like
 * any move (a move back). Refuses the same facet twice, an inactive facet, a facet with no items in
 * the latest round, a signed-off phase, and a missing domain reason. Returns the decision ids.
 */
export function mergeFacets(
  study: Study,
  request: { fromFacetId: number; intoFacetId: number } & FacetRationale,
): number[] {
  requireOpen(study, PHASE);
  if (request.fromFacetId === request.intoFacetId)
    throw new RuleError('choose two different facets to merge');
  const from = activeFacetNamed(study, request.fromFacetId, 'merged');
  const into = activeFacetNamed(study, request.intoFacetId, 'receiving');
  const { domain, statistical } = requireDomain(request, `merging facet "${from.name}" into "${into.name}"`);
  const codes = itemsOfFacet(study, from.id);
  if (codes.length === 0)
    throw new RuleError(
      `facet "${from.name}" has no items left in the latest round, so there is nothing to merge`,
    );
  const group = { kind: 'merge' as const, from: from.name, to: into.name };
  return study.db.transaction(() =>
    codes.map((itemCode) =>
      decideItem(study, {
        itemCode,
        action: 'move',
        toFacetId: into.id,
        domainRationale: domain,
        statisticalRationale: statistical,
        group,
      }),
    ),
  )();
}

/**
 * Splits a facet on the latest round: a new facet (name and definition, unique among the active
 * facets) is added with a logged decision of this phase, and the chosen items of the facet move to it,
 * each as its own move decision naming the split; all in one transaction. The moves are reversed like
 * any move; the new facet then stays empty and can be retired in the Construct phase. Refuses items
 * not in the facet in the latest round, moving every item (a split leaves some behind), a missing
 * name, definition or domain reason, and a signed-off phase. Returns the new facet's id.
 */
export function splitFacet(
  study: Study,
  request: {
    facetId: number;
    itemCodes: string[];
    newFacet: { name: string; definition: string };
  } & FacetRationale,
): { facetId: number; decisions: number[] } {
  requireOpen(study, PHASE);
  const facet = activeFacetNamed(study, request.facetId, 'split');
  const name = request.newFacet.name.trim();
  const definition = request.newFacet.definition.trim();
  if (name === '') throw new RuleError('name the new facet');
  if (definition === '') throw new RuleError(`define the new facet "${name}": what its items have in common`);
  const clash = listFacets(study).find((f) => f.name.toLowerCase() === name.toLowerCase());
  if (clash) throw new RuleError(`a facet named "${clash.name}" already exists`);
  const { domain, statistical } = requireDomain(request, `splitting facet "${facet.name}"`);
  const inFacet = itemsOfFacet(study, facet.id);
  const chosen = [...new Set(request.itemCodes.map((c) => c.trim()).filter((c) => c !== ''))];
  if (chosen.length === 0)
    throw new RuleError(`choose the items of facet "${facet.name}" that go to "${name}"`);
  const byLower = new Map(inFacet.map((c) => [c.toLowerCase(), c]));
  const outside = chosen.filter((c) => !byLower.has(c.toLowerCase()));
  if (outside.length > 0) {
    throw new RuleError(
      `not in facet "${facet.name}" in the latest round: ${outside.join(', ')}; a split moves items of the facet it splits`,
    );
  }
  if (chosen.length === inFacet.length) {
    throw new RuleError(
      `a split leaves some items in facet "${facet.name}"; to move all ${inFacet.length}, rename the facet in the Construct phase instead`,
    );
  }
  const codes = chosen.map((c) => byLower.get(c.toLowerCase()) as string);
  const lines = [`Domain: ${domain}`, ...(statistical === '' ? [] : [`Statistics: ${statistical}`])];
  return study.db.transaction(() => {
    const facetId = changeInPhase(
      study,
      {
        phase: PHASE,
        kind: 'facet-split',
        target: `facet "${facet.name}": ${codes.length} item(s) to new facet "${name}"`,
        rationale: lines.join('\n'),
        detail: { from: facet.name, newFacet: { name, definition }, items: codes },
      },
      () => insertFacet(study, name, definition),
    );
    const group = { kind: 'split' as const, from: facet.name, to: name };
    const decisions = codes.map((itemCode) =>
      decideItem(study, {
        itemCode,
        action: 'move',
        toFacetId: facetId,
        domainRationale: domain,
        statisticalRationale: statistical,
        group,
      }),
    );
    return { facetId, decisions };
  })();
}
