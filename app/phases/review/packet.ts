import { blankRatingsCsv } from '../../export/ratings-sheet.ts';
import { getConstruct, listFacets } from '../../../db/repos/construct.ts';
import { getRevision } from '../../../db/repos/items.ts';
import { listRoundItems } from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import {
  ESSENTIAL_ANSWERS,
  RELEVANCE_ANCHORS,
  packetSections,
  requireRound,
  roundContext,
} from './round-data.ts';
import { roundView } from './views.ts';

/**
 * The blank ratings sheet of a round, in long form (one row per expert and item, items in the
 * packet's order), with the columns its rating form asks for. Reading it changes nothing, so it stays
 * available after the phase is signed off (a late expert, a lost copy).
 */
export function blankRatingsSheet(study: Study, roundId: number): { fileName: string; text: string } {
  const round = roundView(study, requireRound(study, roundId));
  const experts = round.experts.length > 0 ? round.experts.map((e) => e.code) : ['E1', 'E2', 'E3'];
  const inPacketOrder = [...round.items].sort((a, b) => a.packetNumber - b.packetNumber);
  return blankRatingsCsv(
    round.number,
    round.form,
    inPacketOrder.map((it) => it.code),
    experts,
  );
}

/**
 * What the printable review packet of a round shows: the construct and facet definitions, the
 * rating scale and questions of the form, and the items in the wording the experts rate. When the
 * form asks experts to place items in facets, the items are listed in one interleaved sequence so
 * the packet does not reveal the intended facet; otherwise they are grouped under their facets.
 */
export function reviewPacket(study: Study, roundId: number) {
  const ctx = roundContext(study, roundId);
  const construct = getConstruct(study);
  const facets = listFacets(study);
  const frozen = new Map(listRoundItems(study, roundId).map((ri) => [ri.itemId, ri.revisionId]));
  const items = ctx.roundItems.map((it) => {
    const revisionId = frozen.get(it.id) ?? null;
    return {
      code: it.code,
      text: revisionId === null ? it.text : (getRevision(study, revisionId)?.text ?? it.text),
      facetId: it.facetId,
    };
  });
  const anchors = Array.from({ length: ctx.form.relevanceMax - ctx.form.relevanceMin + 1 }, (_, i) => ({
    value: ctx.form.relevanceMin + i,
    label: RELEVANCE_ANCHORS[i] ?? '',
  }));
  const sections = packetSections(study, ctx, items);
  let number = 0;
  return {
    studyTitle: study.meta('title') ?? '',
    construct: { name: construct.name, definition: construct.definition, population: construct.population },
    round: { id: ctx.round.id, number: ctx.round.number, label: ctx.round.label },
    form: ctx.form,
    anchors,
    essentialAnswers: ESSENTIAL_ANSWERS,
    /** Item codes often carry the facet (TR01), so they are left off when experts place items in facets. */
    showCodes: !ctx.form.asksFacet,
    facets: facets.map((f) => ({ name: f.name, definition: f.definition })),
    sections: sections.map((s) => ({
      facet: s.facet,
      items: s.items.map((it) => ({ number: ++number, code: it.code, text: it.text })),
    })),
    experts: ctx.experts.length,
  };
}
