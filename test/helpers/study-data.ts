import { streamDataset } from '../../app/import/stream-dataset.ts';
import type { ColumnMapping } from '../../app/import/mapping.ts';
import type { MissingCodes } from '../../app/import/numbers.ts';
import {
  currentDatasetChoice,
  type DatasetRole,
  insertDataset,
  insertDatasetChoice,
} from '../../db/repos/datasets.ts';
import { insertItem } from '../../db/repos/items.ts';
import { Study } from '../../db/study.ts';
import { addFacet } from '../../app/phases/construct/index.ts';
import { addItem } from '../../app/phases/items/index.ts';
import { TEST_ACTOR } from './tmp.ts';

async function* once(bytes: Uint8Array) {
  yield bytes;
}

/**
 * Stores a CSV in a study as a dataset, read by the streaming reader and logged, without the
 * import screens: for tests of what analyses do with stored data. Returns the dataset id.
 */
export async function storeCsv(
  study: Study,
  csv: string,
  mapping: ColumnMapping,
  options: {
    name?: string;
    role?: DatasetRole;
    missingCodes?: MissingCodes;
    scaleMin?: number;
    scaleMax?: number;
    /** Make it the current dataset of its role (default: when the role has none). */
    current?: boolean;
  } = {},
): Promise<number> {
  const name = options.name ?? 'Pilot';
  const fileName = `${name}.csv`;
  const bytes = new TextEncoder().encode(csv);
  const dataset = await streamDataset(once(bytes), mapping, {
    fileName,
    missingCodes: options.missingCodes,
    scaleMin: options.scaleMin,
    scaleMax: options.scaleMax,
  });
  const role = options.role ?? 'pilot';
  return study.change({ phase: 'pilot', kind: 'imported', target: fileName }, () => {
    const id = insertDataset(study, {
      role,
      name,
      fileName,
      fileSha256: dataset.sha256,
      fileBytes: bytes,
      reading: {
        encoding: dataset.encoding,
        delimiter: dataset.delimiter,
        decimalMark: dataset.decimalMark,
        missingCodes: dataset.missingCodes,
        header: dataset.header,
      },
      mapping,
      dataset,
    });
    // As an import does by default: current when its role has no current dataset.
    if (options.current ?? currentDatasetChoice(study, role)?.datasetId == null) {
      insertDatasetChoice(study, { role, datasetId: id, reason: 'stored by a test' });
    }
    return id;
  });
}

/** Respondents × items as a CSV with an id column `rid` (p1, p2, …), blank where missing, and its mapping. */
export function responsesCsv(
  codes: string[],
  rows: (number | null)[][],
): { csv: string; mapping: ColumnMapping } {
  const csv = `rid,${codes.join(',')}\n${rows.map((row, r) => `p${r + 1},${row.map((x) => x ?? '').join(',')}`).join('\n')}\n`;
  const mapping: ColumnMapping = { rid: { role: 'id' } };
  for (const code of codes) mapping[code] = { role: 'item', itemCode: code };
  return { csv, mapping };
}

/**
 * The item pool of test/reference/fixtures/purification.json: one item per code, filed under the
 * facet its prefix names (the off-domain item under TR), reverse-keyed where the fixture says.
 */
export function insertFixturePool(
  study: Study,
  fixture: { codes: string[]; reverse: string[]; offDomain: string },
  facetIds: Record<string, number>,
): void {
  study.change({ phase: 'items', kind: 'imported', target: 'test pool' }, () => {
    for (const code of fixture.codes) {
      insertItem(
        study,
        {
          code,
          text: `Test wording of ${code}`,
          facetId: facetIds[code === fixture.offDomain ? 'TR' : code.slice(0, 2)],
          keying: fixture.reverse.includes(code) ? 'reverse' : 'forward',
          sourceType: 'own-drafting',
          sourceNote: '',
          state: 'kept',
        },
        'drafted',
        new Date().toISOString(),
      );
    }
  });
}

/** A new study at `file` with one facet and a forward-keyed draft item for each code: the pool an import maps to. */
export function createStudyWithPool(file: string, codes: readonly string[]): Study {
  const study = Study.create(file, { actor: TEST_ACTOR, app: 'test' });
  const facet = addFacet(study, 'Test facet', '');
  for (const code of codes) {
    addItem(study, {
      code,
      text: `Test wording of item ${code}`,
      facetId: facet,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
  }
  return study;
}
