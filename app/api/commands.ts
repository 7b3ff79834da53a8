import { z } from 'zod';
import { PHASE_IDS } from '../../db/repos/phase-state.ts';
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
} from '../phases/construct.ts';
import { reopenPhase, signOffPhase, studyOverview } from '../phases/index.ts';
import { command } from './define.ts';

const id = z.number().int().positive();
const text = (max: number) => z.string().max(max);
const rationale = z.string().trim().min(1, 'a rationale is required').max(10_000);
const phase = z.enum(PHASE_IDS);
const relation = z.object({
  otherConstruct: text(200),
  kind: z.enum(['convergent', 'discriminant', 'criterion', 'known-groups']),
  expectedSign: z.enum(['positive', 'negative', 'none']),
  expectedStrength: z.enum(['near-zero', 'weak', 'moderate', 'strong']),
  measure: text(500),
  rationale: text(5_000),
});

/**
 * Every operation the renderer may call. The same table is served over Electron IPC and over
 * HTTP in browser mode (app/api/dispatch.ts); nothing else crosses from renderer to main.
 */
export const commands = {
  'study.info': command(z.object({}), (s) => {
    const study = s.study;
    return {
      path: study.path,
      title: study.meta('title') ?? '',
      studyId: study.meta('study_id') ?? '',
      createdAt: study.meta('created_at') ?? '',
      version: study.version,
      actor: study.actor,
    };
  }),
  'study.open': command(z.object({ path: text(4_096).min(1) }), (s, input) => {
    s.open(input.path);
    return { path: s.study.path };
  }),
  'study.create': command(z.object({ path: text(4_096).min(1), title: text(300) }), (s, input) => {
    s.create(input.path, input.title);
    return { path: s.study.path };
  }),
  'study.overview': command(z.object({}), (s) => studyOverview(s.study)),

  'phase.signOff': command(z.object({ phase, rationale }), (s, input) =>
    signOffPhase(s.study, input.phase, input.rationale),
  ),
  'phase.reopen': command(z.object({ phase, rationale }), (s, input) =>
    reopenPhase(s.study, input.phase, input.rationale),
  ),

  'construct.get': command(z.object({}), (s) => constructView(s.study)),
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

  'log.list': command(
    z.object({
      phase: phase.optional(),
      limit: z.number().int().min(1).max(1_000).default(200),
      offset: z.number().int().min(0).default(0),
    }),
    (s, input) => ({ total: s.study.log.count(), entries: s.study.log.list(input) }),
  ),
  'log.verify': command(z.object({}), (s) => ({ breaks: s.study.log.verify(), rows: s.study.log.count() })),

  'settings.get': command(z.object({}), (s) => ({ actor: s.actor })),
  'settings.setDisplayName': command(
    z.object({ name: text(200).trim().min(1, 'a display name cannot be blank') }),
    (s, input) => {
      s.setDisplayName(input.name);
      return { actor: s.actor };
    },
  ),
};

export type Commands = typeof commands;
export type CommandName = keyof Commands;
export type CommandInput<K extends CommandName> = z.input<Commands[K]['input']>;
export type CommandOutput<K extends CommandName> = Awaited<ReturnType<Commands[K]['handler']>>;
