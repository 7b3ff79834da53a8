import { z } from 'zod';
import {
  addFacet,
  addRelation,
  constructView,
  editFacet,
  editRelation,
  moveFacet,
  restoreFacet,
  retireFacet,
  retireRelation,
  updateConstructText,
  updateResponseFormat,
  updateScoreUse,
} from '../../phases/construct/index.ts';
import { SCORE_USES } from '../../engine/reliability/criterion.ts';
import { command } from '../define.ts';
import { id, rationale, text } from './schemas.ts';

const relation = z.object({
  otherConstruct: text(200),
  kind: z.enum(['convergent', 'discriminant', 'criterion', 'known-groups']),
  expectedSign: z.enum(['positive', 'negative', 'none']),
  expectedStrength: z.enum(['near-zero', 'weak', 'moderate', 'strong']),
  measure: text(500),
  rationale: text(5_000),
});

/** Phase 1: the construct, its facets, response format and planned relations. */
export const constructCommands = {
  'construct.get': command(z.object({}), (s) => constructView(s.study)),
  'construct.setScoreUse': command(z.object({ use: z.enum(SCORE_USES).nullable() }), (s, input) =>
    updateScoreUse(s.study, input.use),
  ),
  'construct.setText': command(
    z.object({
      field: z.enum(['name', 'definition', 'includes', 'excludes', 'population', 'intendedUses']),
      value: text(20_000),
    }),
    (s, input) => updateConstructText(s.study, input.field, input.value),
  ),
  'construct.setResponseFormat': command(
    z.object({
      points: z.number().int().min(2).max(11),
      min: z.number().int().min(-10).max(10),
      anchors: z.array(text(200)),
    }),
    (s, input) => updateResponseFormat(s.study, input.points, input.min, input.anchors),
  ),
  'facet.add': command(z.object({ name: text(200), definition: text(5_000) }), (s, input) =>
    addFacet(s.study, input.name, input.definition),
  ),
  'facet.edit': command(
    z.object({ id, name: text(200).optional(), definition: text(5_000).optional() }),
    (s, input) => editFacet(s.study, input.id, input),
  ),
  'facet.move': command(z.object({ id, toIndex: z.number().int().min(0) }), (s, input) =>
    moveFacet(s.study, input.id, input.toIndex),
  ),
  'facet.retire': command(z.object({ id, rationale }), (s, input) =>
    retireFacet(s.study, input.id, input.rationale),
  ),
  'facet.restore': command(z.object({ id, rationale }), (s, input) =>
    restoreFacet(s.study, input.id, input.rationale),
  ),
  'relation.add': command(relation, (s, input) => addRelation(s.study, input)),
  'relation.edit': command(relation.extend({ id }), (s, input) => editRelation(s.study, input.id, input)),
  'relation.withdraw': command(z.object({ id, rationale }), (s, input) =>
    retireRelation(s.study, input.id, input.rationale),
  ),
};
