import Papa from 'papaparse';
import { type InstrumentModel, type InstrumentScore, provenance, provenanceLines } from './model.ts';

/**
 * The scoring key (CSV and JSON) and the norms (CSV) of the final instrument. CSV files open with
 * comment lines (`# …`) naming the study, the log head with the command that checks it, the rule,
 * the sample and the cautions; numbers are written unrounded.
 */

/** Identifies a scoring key written by this module (and a folder holding a previous export). */
export const SCORING_KEY_FORMAT = 'scalewright-instrument-scoring-key';

type Cell = string | number | null;

function csv(comments: string[], fields: string[], rows: Cell[][]): string {
  const body = Papa.unparse(
    { fields, data: rows.map((r) => r.map((c) => (c === null ? '' : c))) },
    { newline: '\r\n' },
  );
  const lines = comments.flatMap((c) => c.split('\n')).map((c) => `# ${c}`);
  return `${lines.join('\r\n')}\r\n${body}\r\n`;
}

function ruleText(m: InstrumentModel): string {
  return m.rule === 'sum' ? 'the sum of the item scores' : 'the mean of the item scores';
}

/** What the rule does with unanswered items, in words. */
export function missingText(m: InstrumentModel, s: InstrumentScore): string {
  const k = s.items.length;
  if (s.minAnswered === k)
    return `every one of its ${k} items must be answered; otherwise the score is left empty`;
  return (
    `at least ${s.minAnswered} of its ${k} items must be answered; the score is then ` +
    (m.rule === 'sum'
      ? `the mean of the answered item scores times ${k}`
      : 'the mean of the answered item scores') +
    '; with fewer answers it is left empty'
  );
}

function reversal(m: InstrumentModel): string {
  return `${m.bounds.min + m.bounds.max} − x`;
}

function cautionLines(m: InstrumentModel): string[] {
  return m.cautions.map((c) => `Caution: ${c}`);
}

export function scoringKeyCsv(m: InstrumentModel): string {
  return csv(
    [
      `Scalewright final instrument: scoring key of "${m.title}" (${m.items.length} items)`,
      ...provenanceLines(m),
      `Response scale: ${m.bounds.min} to ${m.bounds.max} as declared in the study; a reverse-keyed answer x is scored ${reversal(m)} (the declared bounds, never the observed ones)`,
      ...m.scores.map(
        (s) =>
          `Score "${s.name}" (${s.kind}): ${ruleText(m)} of ${s.items.join(', ')}; ${missingText(m, s)}; range ${s.range.min} to ${s.range.max}`,
      ),
      ...cautionLines(m),
    ],
    ['position', 'item', 'wording', 'facet', 'keying', 'scoredAs', 'min', 'max'],
    m.items.map((it) => [
      it.position,
      it.code,
      it.text,
      it.facetName,
      it.keying,
      it.keying === 'reverse' ? reversal(m) : 'x',
      m.bounds.min,
      m.bounds.max,
    ]),
  );
}

export function scoringKeyJson(m: InstrumentModel): string {
  const value = {
    format: SCORING_KEY_FORMAT,
    formatVersion: 1,
    study: { title: m.studyTitle, file: m.studyFile },
    exportedAt: m.exportedAt,
    log: m.log,
    verifyCommand: m.verifyCommand,
    verification: { ...m.verification, note: provenance(m).verification },
    questionnaire: {
      title: m.title,
      instructions: m.instructions,
      items: m.items.length,
      orderChosen: m.orderChosen,
    },
    responseScale: { min: m.bounds.min, max: m.bounds.max, anchors: m.anchors },
    items: m.items.map((it) => ({
      position: it.position,
      code: it.code,
      text: it.text,
      facet: it.facetName,
      keying: it.keying,
      scoredAs: it.keying === 'reverse' ? reversal(m) : 'x',
    })),
    scoring: {
      rule: m.rule,
      minAnsweredShare: m.minAnsweredShare,
      reverseKeying: `a reverse-keyed answer x is scored ${reversal(m)} (declared bounds)`,
      scores: m.scores.map((s) => ({
        name: s.name,
        kind: s.kind,
        items: s.items,
        reverseKeyed: s.reverseKeyed,
        minAnswered: s.minAnswered,
        missing: missingText(m, s),
        range: s.range,
      })),
    },
    source: {
      purificationRound: m.round.number,
      analysisRun: m.round.runId,
      sample: m.sample,
    },
    retest: m.retest,
    methods: m.methods,
    cautions: m.cautions,
    warnings: m.warnings,
  };
  return `${JSON.stringify(value, null, 2)}\n`;
}

export function normsCsv(m: InstrumentModel): string {
  const s = m.sample;
  const comments = [
    `Scalewright final instrument: norms of "${m.title}" from the pilot sample`,
    ...provenanceLines(m),
    `Sample: dataset "${s.name}" (file ${s.fileName}, SHA-256 ${s.sha256}), imported ${s.importedAt}; ${s.respondentsInFile} respondents in the file, ${s.excluded} excluded, n = ${s.analysed} analysed in purification round ${m.round.number} (analysis run ${m.round.runId})`,
    `Scores: ${ruleText(m)} per scale and facet, reverse keys applied; a respondent without a score under the rule is left out of that score's norms`,
    'percentile: the percentage of the sample scoring below the score plus half the percentage scoring exactly it (mid-point percentile rank; scipy.stats.percentileofscore with kind="mean")',
    'z = (score − sample mean) / sample SD (divisor n − 1); T = 50 + 10z',
    ...m.scores.map(
      (sc) =>
        `Score "${sc.name}": n = ${sc.norms.n} (${sc.norms.unscored} without a score), mean ${sc.norms.mean}, SD ${sc.norms.sd}, observed ${sc.norms.min} to ${sc.norms.max}`,
    ),
    m.retest
      ? `Retest (analysis run ${m.retest.runId}, ${m.retest.analysis}, ${m.retest.createdAt}): ICC ${m.retest.reliability}, SEM ${m.retest.sem}, MDC95 ${m.retest.mdc95} (on the scale of the retest analysis's scores)`
      : 'Retest: the study holds no retest analysis, so no SEM or MDC from retest data is given',
    'Norms from a pilot sample describe that sample only; they are not population norms.',
    ...cautionLines(m),
  ];
  return csv(
    comments,
    ['score', 'kind', 'rawScore', 'percentile', 'z', 't'],
    m.scores.flatMap((sc) => sc.norms.rows.map((r) => [sc.name, sc.kind, r.score, r.percentile, r.z, r.t])),
  );
}
