import type { Study } from '../study.ts';

/** The study_meta key that holds the researcher's choices for the final instrument. */
const KEY = 'instrument_form';

/**
 * How the final instrument is laid out and scored, as the researcher last set it. Stored as one JSON
 * value in study_meta, so the content digest covers it like every other row.
 */
export interface InstrumentFormRecord {
  /** Item ids in the order the questionnaire prints them. */
  order: number[];
  /** The questionnaire's heading. */
  title: string;
  /** What respondents read before the items. */
  instructions: string;
  rule: 'sum' | 'mean';
  /** Share of a score's items a respondent must answer to get that score, in (0, 1]. */
  minAnsweredShare: number;
}

export function getInstrumentForm(study: Study): InstrumentFormRecord | null {
  const value = study.meta(KEY);
  return value === undefined ? null : (JSON.parse(value) as InstrumentFormRecord);
}

/** Call inside the change that logs it. */
export function setInstrumentForm(study: Study, form: InstrumentFormRecord): void {
  study.db
    .prepare(
      'INSERT INTO study_meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value',
    )
    .run(KEY, JSON.stringify(form));
}
