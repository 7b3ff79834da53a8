import { listRelations } from '../../db/repos/construct.ts';
import type { Study } from '../../db/study.ts';
import { signOffPhase } from '../phases/index.ts';
import { planImport, storeImport } from '../phases/pilot/index.ts';
import { readDelimitedFileNow } from '../import/read-data-file.ts';
import {
  acknowledgeSource,
  describeGroups,
  describeMeasure,
  modelInForce,
  runCfa,
  runRelations,
  runRetest,
  setMeasurementModel,
} from '../phases/validity/index.ts';
import { validityView } from '../phases/validity/views.ts';
import { DEMO_COLUMNS, DEMO_GROUP_MODEL, DEMO_MISSING_CODE } from './pilot.ts';
import {
  DEMO_OTHER_MEASURES,
  DEMO_PLANTED_RESIDUAL,
  DEMO_TRIPS_LATER,
  DEMO_VALIDATION_FILE,
  DEMO_VALIDATION_NAME,
  generateDemoValidation,
} from './validation-data.ts';

const encoder = new TextEncoder();

function relationId(study: Study, otherConstruct: string): number {
  const r = listRelations(study).find((x) => x.otherConstruct === otherConstruct);
  if (!r) throw new Error(`the demo has no planned relation to "${otherConstruct}"`);
  return r.id;
}

/** Imports the demo's validation wave (items matched by code, the other columns given their roles). */
export function importDemoValidation(study: Study): number {
  const { csv, mapping } = generateDemoValidation();
  const bytes = encoder.encode(csv);
  const { plan, read } = planImport(study, bytes, {
    fileName: DEMO_VALIDATION_FILE,
    role: 'validation',
    name: DEMO_VALIDATION_NAME,
    mapping: (header) => ({
      ...Object.fromEntries(header.map((h) => [h, { role: 'item' as const, itemCode: h }])),
      [DEMO_COLUMNS.id]: { role: 'id' },
      ...mapping,
    }),
    missingCodes: { text: [], numeric: [DEMO_MISSING_CODE] },
    reading: {},
  });
  return storeImport(study, plan, readDelimitedFileNow(read), bytes, { acceptProblems: false });
}

/** The columns of the wave read as the construct phase planned them. */
function describeDemoColumns(study: Study): void {
  const m = DEMO_OTHER_MEASURES;
  describeMeasure(
    study,
    m.selfEfficacy.column,
    {
      relationId: relationId(study, 'General self-efficacy'),
      timing: 'concurrent',
      reliability: m.selfEfficacy.reliability,
    },
    'Short general self-efficacy questionnaire answered in the same session; its reliability is the alpha its manual reports (demo).',
  );
  describeMeasure(
    study,
    m.anxiety.column,
    {
      relationId: relationId(study, 'Traffic-related anxiety'),
      timing: 'concurrent',
      reliability: m.anxiety.reliability,
    },
    'Anxiety-in-traffic items answered in the same session; reliability from the travel survey’s last wave (demo).',
  );
  describeMeasure(
    study,
    m.desirability.column,
    {
      relationId: relationId(study, 'Social desirability'),
      timing: 'concurrent',
      reliability: m.desirability.reliability,
    },
    'Social desirability short form answered in the same session; reliability as published for the short form (demo).',
  );
  describeMeasure(
    study,
    DEMO_TRIPS_LATER.column,
    {
      relationId: relationId(study, 'Cycling trips in the following month'),
      timing: 'predictive',
      reliability: DEMO_TRIPS_LATER.reliability,
    },
    'Trip diary kept for the four weeks after the survey, so it was measured later; reliability from the diary’s split-half agreement in an earlier study (demo).',
  );
  describeGroups(
    study,
    DEMO_COLUMNS.group,
    {
      relationId: relationId(study, 'Riding frequency (regular versus rare riders)'),
      higher: DEMO_GROUP_MODEL.levels[2],
      lower: DEMO_GROUP_MODEL.levels[0],
    },
    'Rider type as the respondents described themselves; regular riders are expected to score higher than those who rarely ride (demo).',
  );
}

/** The hint that names the planted residual pair, if the latest CFA lists it. */
export function plantedHint(study: Study) {
  const cfa = validityView(study).cfa;
  const { a, b } = DEMO_PLANTED_RESIDUAL;
  return (
    cfa?.results.fit.hints.find(
      (h) => h.kind === 'residual covariance' && ((h.a === a && h.b === b) || (h.a === b && h.b === a)),
    ) ?? null
  );
}

const ACKNOWLEDGEMENTS: Record<string, string> = {
  content:
    'The expert panel’s ratings and the item decisions of the review phase stand as the content evidence (demo).',
  'response-processes':
    'Only the pilot’s screening for careless answering speaks to response processes; cognitive interviews are planned for the next study and named as missing in the appendix (demo).',
  'internal-structure':
    'The four-facet model fits once the tyre items’ shared wording is allowed for; composite reliabilities are adequate and the retest shows stable scores (demo).',
  relations:
    'The planned relations were tested on the validation wave as planned; each verdict is reported with its rule, including any that were only partly supported (demo).',
  consequences:
    'No evidence on consequences: the scale is for research on groups only, and the appendix says it is not validated for decisions about individuals (demo).',
};

/**
 * The demo's validity phase, worked to sign-off: the validation wave imported; its columns read as
 * the construct phase planned; a CFA whose modification hints find the planted residual covariance;
 * the model changed to free it, with the reason; the CFA again; the planned relations tested; the retest analysed; each source acknowledged; the phase signed off.
 */
export function fillDemoValidity(study: Study): void {
  importDemoValidation(study);
  describeDemoColumns(study);
  runCfa(study);
  const hint = plantedHint(study);
  if (!hint) throw new Error('the demo CFA does not list the planted residual covariance among its hints');
  const model = modelInForce(study).model;
  setMeasurementModel(
    study,
    {
      ...model,
      residualCovariances: [
        {
          a: DEMO_PLANTED_RESIDUAL.a,
          b: DEMO_PLANTED_RESIDUAL.b,
          rationale:
            'Both items are about tyres (fixing a flat, pumping to pressure): shared content beyond repair confidence (demo).',
        },
      ],
    },
    `The largest modification index (${hint.mi.toFixed(1)}) is the residual covariance of ${hint.a} and ${hint.b}; both items are about tyres, a reason outside the data, so it is freed (demo).`,
  );
  runCfa(study);
  runRelations(study);
  runRetest(study);
  for (const [source, note] of Object.entries(ACKNOWLEDGEMENTS))
    acknowledgeSource(study, source as Parameters<typeof acknowledgeSource>[1], note);
  signOffPhase(
    study,
    'validity',
    'CFA, relations to other variables and retest evidence gathered on the validation wave; missing sources are named for the appendix (demo).',
  );
}
