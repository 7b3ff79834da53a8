import type { Study } from '../../../db/study.ts';
import { questionnaireHtml } from './html.ts';
import { normsCsv, scoringKeyCsv, scoringKeyJson } from './key.ts';
import { type InstrumentModel, instrumentModel } from './model.ts';
import { questionnairePdf } from './pdf-form.ts';
import { type ExportFile, exportFile } from './write.ts';

export { type ExportFile, ExportFolderError, writeExportFolder } from './write.ts';
export type { InstrumentModel } from './model.ts';

/** The files of the final instrument, in the order they are listed. */
export const INSTRUMENT_FILES = [
  'questionnaire.html',
  'questionnaire.pdf',
  'scoring-key.csv',
  'scoring-key.json',
  'norms.csv',
] as const;

/**
 * The final instrument as files: the printable questionnaire (HTML and PDF), the scoring key (CSV and
 * JSON) and the norms from the pilot sample (CSV), each with its SHA-256. Reads the study only.
 * Throws RuleError when purification has no retained item set yet or a score cannot be normed.
 */
export async function instrumentFiles(
  study: Study,
  now: Date = new Date(),
): Promise<{ model: InstrumentModel; files: ExportFile[] }> {
  const model = instrumentModel(study, now);
  const csvType = 'text/csv;charset=utf-8';
  const files = [
    exportFile('questionnaire.html', 'text/html;charset=utf-8', questionnaireHtml(model)),
    exportFile('questionnaire.pdf', 'application/pdf', await questionnairePdf(model)),
    exportFile('scoring-key.csv', csvType, scoringKeyCsv(model)),
    exportFile('scoring-key.json', 'application/json', scoringKeyJson(model)),
    exportFile('norms.csv', csvType, normsCsv(model)),
  ];
  return { model, files };
}
