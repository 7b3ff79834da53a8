import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { analysisData } from '../../../app/phases/analysis-data.ts';
import { currentExclusions, insertExclusions, loadDatasetFile } from '../../../db/repos/datasets.ts';
import { Study } from '../../../db/study.ts';
import { storeCsv } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

const CSV = 'rid,q1,q2,q3,grp\nr1,1,2,3,a\nr2,4,-9,5,b\nr3,2,2,,a\nr4,5,4,3,b\n';

let tmp: ReturnType<typeof tempDir>;
let study: Study;
beforeEach(() => {
  tmp = tempDir();
  study = Study.create(path.join(tmp.dir, 's.scalewright'), { actor: TEST_ACTOR, app: 'test' });
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

function storePilot(): Promise<number> {
  return storeCsv(
    study,
    CSV,
    {
      rid: { role: 'id' },
      q1: { role: 'item', itemCode: 'Q1' },
      q2: { role: 'item', itemCode: 'Q2' },
      q3: { role: 'item', itemCode: 'Q3' },
      grp: { role: 'group' },
    },
    { missingCodes: { text: [], numeric: [-9] }, scaleMin: 1, scaleMax: 5 },
  );
}

describe('stored datasets and the data an analysis reads', () => {
  it('gives back the responses as imported, with missing codes as null, in the order asked', async () => {
    const id = await storePilot();
    const read = analysisData(study, id, ['Q3', 'Q1']);
    expect(read.data).toEqual([
      [3, 1],
      [5, 4],
      [null, 2],
      [3, 5],
    ]);
    expect(read.respondentIds).toEqual(['r1', 'r2', 'r3', 'r4']);
    expect(new TextDecoder().decode(loadDatasetFile(study, id))).toBe(CSV);
    // SHA-256 of the CSV text above, computed outside the project with coreutils' sha256sum.
    expect(read.provenance.fileSha256).toBe(
      '8c2048406c48828cb185fa5ad2c6787b7a3107e3840d252a8da3638dcd2f8cef',
    );
  });

  it('leaves out the respondents excluded now, and a later decision reverses an exclusion', async () => {
    const id = await storePilot();
    study.change({ phase: 'pilot', kind: 'excluded', target: 'r2' }, () =>
      insertExclusions(study, id, [{ respondent: 1, excluded: true, reason: 'straight-lining' }]),
    );
    expect(analysisData(study, id, ['Q1']).data).toEqual([[1], [2], [5]]);
    expect(analysisData(study, id, ['Q1']).provenance).toMatchObject({
      excluded: 1,
      excludedRespondents: [1],
    });
    study.change({ phase: 'pilot', kind: 'reinstated', target: 'r2' }, () =>
      insertExclusions(study, id, [{ respondent: 1, excluded: false, reason: 'checked: a genuine pattern' }]),
    );
    expect(currentExclusions(study, id).size).toBe(0);
    expect(analysisData(study, id, ['Q1']).data).toHaveLength(4);
  });

  it('names items the dataset does not have', async () => {
    const id = await storePilot();
    expect(() => analysisData(study, id, ['Q1', 'Q9'])).toThrow(
      'dataset "Pilot" has no column mapped to item Q9',
    );
    expect(() => analysisData(study, 99, ['Q1'])).toThrow('dataset 99 does not exist in this study');
  });
});
