import path from 'node:path';
import type { Study } from '../../../db/study.ts';
import { verifyStudy } from '../../../db/verify.ts';
import packageJson from '../../../package.json' with { type: 'json' };
import type { AppendixDocument } from './model.ts';
import { instrumentSection, validitySection } from './sections-validity.ts';
import { pilotSection, purificationSection } from './sections-data.ts';
import { constructSection, itemsSection, reviewSection } from './sections-design.ts';
import { cautionsSection, referencesSection, reproducibilitySection } from './sections-closing.ts';
import { Writer } from './writer.ts';

export interface AppendixOptions {
  /** When the appendix is rendered (the one clock reading; tests pass a fixed one). */
  exportedAt?: Date;
}

/**
 * The methods appendix of a study as one document model, read from the study file alone: every
 * phase that is done, an explicit note for each that is not, the reference list of every method
 * cited, and the file's verification at the moment of export. Reads only; never writes the study.
 */
export function buildAppendix(study: Study, options: AppendixOptions = {}): AppendixDocument {
  const exportedAt = (options.exportedAt ?? new Date()).toISOString();
  const report = verifyStudy(study);
  const w = new Writer();
  const title = study.meta('title') || path.basename(study.path, path.extname(study.path));
  if (!report.intact)
    w.notice(
      'break',
      { text: 'This study file failed verification at export. ', strong: true },
      'See Reproducibility for the breaks found.',
    );
  for (const section of [
    constructSection,
    itemsSection,
    reviewSection,
    pilotSection,
    purificationSection,
    validitySection,
    instrumentSection,
  ]) {
    // A section the file can no longer give (a damaged or edited file) says so; the rest still renders.
    try {
      section(w, study);
    } catch (error) {
      w.notice(
        'break',
        { text: 'This section could not be read from the study file: ', strong: true },
        error instanceof Error ? error.message : String(error),
      );
    }
  }
  cautionsSection(w);
  reproducibilitySection(w, study, { appVersion: packageJson.version, report, exportedAt });
  referencesSection(w);
  return {
    title: `Methods appendix: ${title}`,
    subtitle: [
      `Study file ${path.basename(study.path)} · exported ${exportedAt.slice(0, 16).replace('T', ' ')} UTC`,
      `Decision log head ${report.head ?? 'none'}`,
    ],
    blocks: w.blocks,
  };
}
