/**
 * What the content digest costs, on a study holding a 100,000 × 60 dataset:
 *   1. storing the import (its rows are digested in the same transaction; the file's bytes are
 *      vouched for by their recorded SHA-256, the 62 column blocks are hashed once);
 *   2. one small logged change afterwards (a construct field edited), the digest's share of it
 *      (digesting the touched rows and the root over the whole bookkeeping), median of REPEATS;
 *   3. the same change on a study without the dataset, for comparison;
 *   4. every row digested from scratch (an upper bound on the digest's share of the import);
 *   5. a full verify (every row re-digested, the stored file re-hashed).
 * No target is asserted; the figures are printed.
 *
 *     npx tsx test/bench/content-digest.ts [respondents] [items]
 */
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { median, writeBenchCsv } from './import-baseline.ts';
import { addFacet, updateConstructText } from '../../app/phases/construct/index.ts';
import { addItem } from '../../app/phases/items/index.ts';
import { automaticMapping, planImport, storeImport } from '../../app/phases/pilot/index.ts';
import { readDataFile } from '../../app/import/read-data-file.ts';
import { rootDigest, syncAllDigests } from '../../db/content-digest.ts';
import { Study } from '../../db/study.ts';
import { verifyStudy } from '../../db/verify.ts';

const RESPONDENTS = Number(process.argv[2] ?? 100_000);
const ITEMS = Number(process.argv[3] ?? 60);
const REPEATS = 25;
const ACTOR = { user: 'bench', name: 'Digest bench' };
const APP = 'the digest bench';

function studyWithItems(path: string): Study {
  const study = Study.create(path, { actor: ACTOR, app: APP });
  const facet = addFacet(study, 'Bench facet', '');
  for (let j = 1; j <= ITEMS; j++) {
    addItem(study, {
      code: `TC${j}`,
      text: `Bench wording of item ${j}`,
      facetId: facet,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
  }
  return study;
}

/** Median time of one logged change, and of the root digest alone, on `study`. */
function changeCost(study: Study): { change: number; root: number } {
  const changes: number[] = [];
  const roots: number[] = [];
  for (let r = 0; r < REPEATS + 1; r++) {
    const started = performance.now();
    updateConstructText(study, 'definition', `Bench definition, version ${r}.`);
    const changed = performance.now();
    rootDigest(study.db);
    const ended = performance.now();
    // The first run warms the statements up.
    if (r > 0) {
      changes.push(changed - started);
      roots.push(ended - changed);
    }
  }
  return { change: median(changes), root: median(roots) };
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'scalewright-bench-'));
  try {
    const dataPath = join(dir, 'responses.csv');
    writeBenchCsv(dataPath, RESPONDENTS, ITEMS);
    const bytes = readFileSync(dataPath);

    const small = studyWithItems(join(dir, 'small.scalewright'));
    const smallCost = changeCost(small);
    small.close();

    const study = studyWithItems(join(dir, 'large.scalewright'));
    const { plan, read } = planImport(study, bytes, {
      fileName: 'bench.csv',
      role: 'pilot',
      mapping: automaticMapping(study),
      missingCodes: { text: [], numeric: [] },
      reading: {},
    });
    const result = await readDataFile(read, { progress: () => undefined, shouldStop: () => false });
    const storing = performance.now();
    storeImport(study, plan, result, bytes, { acceptProblems: false });
    const stored = performance.now() - storing;
    const rows = study.db.prepare('SELECT count(*) FROM content_digest').pluck().get() as number;
    // Re-digesting every row from scratch bounds the digest's share of the import above.
    const redigesting = performance.now();
    syncAllDigests(study.db);
    const redigested = performance.now() - redigesting;
    const largeCost = changeCost(study);
    const verifying = performance.now();
    const report = verifyStudy(study);
    const verified = performance.now() - verifying;
    study.close();
    if (!report.intact) throw new Error(`the bench study does not verify: ${report.breaks[0]?.problem}`);

    console.log(
      `file: ${RESPONDENTS} respondents × ${ITEMS} items, ${(statSync(dataPath).size / 1e6).toFixed(1)} MB; ${rows} digested rows after the import`,
    );
    console.log(`store the import (its rows digested in the same transaction): ${stored.toFixed(1)} ms`);
    console.log(
      `digest every row of that study from scratch (bounds the import's digest share): ${redigested.toFixed(1)} ms`,
    );
    console.log(
      `one logged change, with the dataset:    ${largeCost.change.toFixed(2)} ms (root digest alone ${largeCost.root.toFixed(2)} ms), median of ${REPEATS}`,
    );
    console.log(
      `one logged change, without the dataset: ${smallCost.change.toFixed(2)} ms (root digest alone ${smallCost.root.toFixed(2)} ms)`,
    );
    console.log(
      `full verify with the dataset (integrity check, chain, file, runs, content): ${verified.toFixed(0)} ms`,
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();
