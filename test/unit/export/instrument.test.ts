import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { listRounds } from '../../../db/repos/purification.ts';
import { Study } from '../../../db/study.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { intraclassCorrelations, iccMeasurementError } from '../../../app/engine/icc.ts';
import { instrumentFiles } from '../../../app/export/instrument/index.ts';
import { recordRun } from '../../../app/phases/change.ts';
import { decideItem } from '../../../app/phases/purification/index.ts';
import { analysisData } from '../../../app/phases/analysis-data.ts';
import { setInstrumentForm } from '../../../app/phases/appendix/instrument-form.ts';
import type { RoundResults } from '../../../app/phases/purification/index.ts';
import { runCliHere } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let demoPath: string;
beforeAll(() => {
  tmp = tempDir('scalewright-instrument-');
  demoPath = path.join(tmp.dir, 'demo.scalewright');
  // The demo up to purification (left open), which these tests change round by round.
  Study.create(
    demoPath,
    { actor: TEST_ACTOR, app: 'test' },
    { title: 'Demo', init: (study) => fillDemoStudy(study, 'purification') },
  ).close();
});
afterAll(() => tmp.cleanup());

/** A fresh copy of the demo study, so that a test can change it. */
function demoCopy(name: string): string {
  const file = path.join(tmp.dir, `${name}.scalewright`);
  fs.copyFileSync(demoPath, file);
  return file;
}

async function withStudy<T>(file: string, work: (study: Study) => T | Promise<T>): Promise<T> {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
  try {
    return await work(study);
  } finally {
    study.close();
  }
}

/** The comment lines and the table of a CSV the export wrote. */
function readCsv(text: string) {
  const lines = text.split('\r\n');
  const comments = lines.filter((l) => l.startsWith('# '));
  const rows = Papa.parse<Record<string, string>>(lines.filter((l) => !l.startsWith('# ')).join('\r\n'), {
    header: true,
    skipEmptyLines: true,
  }).data;
  return { comments, rows };
}

interface ScoringKey {
  format: string;
  log: { head: string };
  verifyCommand: string;
  verification: { intact: boolean; breaks: string[] };
  responseScale: { min: number; max: number };
  items: { position: number; code: string; keying: string }[];
  scoring: {
    rule: 'sum' | 'mean';
    scores: { name: string; kind: string; items: string[]; reverseKeyed: string[]; minAnswered: number }[];
  };
  source: { purificationRound: number; analysisRun: number; sample: { datasetId: number; analysed: number } };
  cautions: string[];
}

describe('the scoring key, applied to the pilot data on its own, reproduces the stored round', () => {
  it('gives the scale and facet sum scores whose n and SD the final purification round stored', async () => {
    const file = demoCopy('key');
    await withStudy(file, async (study) => {
      setInstrumentForm(study, { rule: 'sum', reason: 'Sum scores, as the pilot analyses used (test)' });
      const { files } = await instrumentFiles(study);
      const key = JSON.parse(
        (files.find((f) => f.name === 'scoring-key.json') as { bytes: Buffer }).bytes.toString('utf8'),
      ) as ScoringKey;
      expect(key.format).toBe('scalewright-instrument-scoring-key');
      expect(key.scoring.rule).toBe('sum');
      const round = listRounds(study).at(-1);
      if (!round) throw new Error('the demo has no purification round');
      expect(key.source.analysisRun).toBe(round.runId);
      const run = listRuns(study).find((r) => r.id === round.runId);
      const results = run?.results as RoundResults;
      // The key's own items, reverse keys and bounds applied to the raw answers, summed here.
      const codes = key.items.map((it) => it.code);
      const raw = analysisData(study, key.source.sample.datasetId, codes).data;
      const { min, max } = key.responseScale;
      // The round analyses every facet on the respondents who answered all of its items (listwise).
      const complete = raw.filter((row) => row.every((x) => x !== null));
      const check = (
        score: ScoringKey['scoring']['scores'][number],
        stored: { n: number; sdTotal: number },
      ) => {
        const cols = score.items.map((c) => codes.indexOf(c));
        const sums: number[] = [];
        for (const row of complete) {
          const answers = cols.map((c, i) => {
            const x = row[c];
            return x === null ? null : score.reverseKeyed.includes(score.items[i]) ? min + max - x : x;
          });
          if (answers.every((x) => x !== null)) sums.push((answers as number[]).reduce((s, x) => s + x, 0));
        }
        const mean = sums.reduce((s, x) => s + x, 0) / sums.length;
        const sd = Math.sqrt(sums.reduce((s, x) => s + (x - mean) ** 2, 0) / (sums.length - 1));
        expect(sums.length).toBe(stored.n);
        expect(sd).toBeCloseTo(stored.sdTotal, 10);
      };
      const scale = key.scoring.scores.find((s) => s.kind === 'scale');
      if (!scale || !results.scale.measurementError) throw new Error('no scale score or stored SD');
      expect([...scale.items].sort()).toEqual([...results.scale.inputs.items].sort());
      check(scale, { n: results.scale.n, sdTotal: results.scale.measurementError.sdTotal });
      const facets = key.scoring.scores.filter((s) => s.kind === 'facet');
      expect(facets.length).toBe(results.facets.length);
      for (const facet of results.facets) {
        const score = facets.find(
          (s) => [...s.items].sort().join() === [...facet.analysis.inputs.items].sort().join(),
        );
        if (!score || !facet.analysis.measurementError) throw new Error('facet score missing from the key');
        check(score, { n: facet.analysis.n, sdTotal: facet.analysis.measurementError.sdTotal });
      }
    });
  });
});

describe('the files of the demo study', () => {
  let files: Awaited<ReturnType<typeof instrumentFiles>>['files'];
  let model: Awaited<ReturnType<typeof instrumentFiles>>['model'];
  beforeAll(async () => {
    ({ files, model } = await withStudy(demoPath, (study) => instrumentFiles(study)));
  });
  const text = (name: string) =>
    (files.find((f) => f.name === name) as { bytes: Buffer }).bytes.toString('utf8');

  it('every file names the log head, the command that checks it, and the cautions', () => {
    expect(model.log.head).toMatch(/^\d+:[0-9a-f]{64}$/);
    for (const f of files) {
      const body = f.name.endsWith('.pdf') ? '' : f.bytes.toString('utf8');
      if (f.name.endsWith('.pdf')) continue;
      expect(body, f.name).toContain(model.log.head as string);
      expect(body, f.name).toContain(`project verify demo.scalewright --head ${model.log.head}`);
      expect(body, f.name).toMatch(/not validated for diagnosis, hiring, admission/);
      expect(body, f.name).toMatch(/ethics approval/);
      expect(body, f.name).toMatch(/licensed professional practice/);
    }
  });

  it('the norms CSV names the sample and holds, per score, each reachable score with percentile, z and T', () => {
    const { comments, rows } = readCsv(text('norms.csv'));
    const sample = comments.find((c) => c.startsWith('# Sample:')) ?? '';
    expect(sample).toContain(model.sample.sha256);
    expect(sample).toContain(`n = ${model.sample.analysed}`);
    expect(sample).toContain(model.sample.importedAt);
    expect(sample).toContain(model.sample.name);
    for (const score of model.scores) {
      const own = rows.filter((r) => r.score === score.name);
      // Mean rule, 1–5 answers, k items: the reachable means are the sums k … 5k divided by k.
      expect(own.length).toBe(4 * score.items.length + 1);
      const mid = own[Math.floor(own.length / 2)];
      const z = (Number(mid.rawScore) - score.norms.mean) / score.norms.sd;
      expect(Number(mid.z)).toBeCloseTo(z, 12);
      expect(Number(mid.t)).toBeCloseTo(50 + 10 * z, 12);
      const percentiles = own.map((r) => Number(r.percentile));
      expect(percentiles[0]).toBeGreaterThanOrEqual(0);
      expect(percentiles.at(-1)).toBeLessThanOrEqual(100);
      expect([...percentiles].sort((a, b) => a - b)).toEqual(percentiles);
    }
    expect(comments.some((c) => c.includes('no retest analysis'))).toBe(true);
  });

  it('the questionnaire HTML is well formed and lists every item once, in order, with one answer per point', () => {
    const html = text('questionnaire.html');
    expect(html.startsWith('<!DOCTYPE html>\n<html lang="en">')).toBe(true);
    expect(html).not.toMatch(/<script|<link|src=|url\(/i);
    const VOID = new Set(['meta', 'br', 'img', 'hr', 'link', 'input']);
    const stack: string[] = [];
    for (const m of html.matchAll(/<(\/?)([a-z][a-z0-9]*)\b[^>]*>/gi)) {
      const tag = m[2].toLowerCase();
      if (VOID.has(tag)) continue;
      if (m[1] === '') stack.push(tag);
      else expect(stack.pop(), `closing </${tag}>`).toBe(tag);
    }
    expect(stack).toEqual([]);
    expect(html.match(/<h1>/g)?.length).toBe(1);
    const body = html.slice(html.indexOf('<tbody>'), html.indexOf('</tbody>'));
    const rows = body.match(/<tr>.*?<\/tr>/g) ?? [];
    expect(rows.length).toBe(model.items.length);
    rows.forEach((row, i) => {
      expect(row).toContain(`<td class="number">${i + 1}</td>`);
      expect(row.match(/class="answer"/g)?.length).toBe(model.anchors.length);
    });
    const head = html.slice(html.indexOf('<thead>'), html.indexOf('</thead>'));
    expect(head.match(/<th /g)?.length).toBe(2 + model.anchors.length);
    // Respondents see neither item codes nor facets.
    for (const it of model.items) expect(body).not.toContain(it.code);
  });

  it('the PDF embeds DejaVu Serif and has the pages the items need plus the researcher page', async () => {
    const pdf = files.find((f) => f.name === 'questionnaire.pdf')?.bytes as Buffer;
    const latin = pdf.toString('latin1');
    expect(latin.startsWith('%PDF-')).toBe(true);
    expect(latin).toMatch(/DejaVuSerif/);
    const pages = latin.match(/\/Type \/Page\b(?!s)/g)?.length;
    // The demo keeps 29 items; at about 19 per A4 page that is two pages of items, then the researcher's page.
    expect(pages).toBe(3);
  });

  it('the scoring key CSV lists the items in the questionnaire order with their facet and keying', () => {
    const { rows } = readCsv(text('scoring-key.csv'));
    expect(rows.map((r) => r.item)).toEqual(model.items.map((it) => it.code));
    expect(rows.map((r) => Number(r.position))).toEqual(model.items.map((_, i) => i + 1));
    for (const r of rows) expect(r.scoredAs).toBe(r.keying === 'reverse' ? '6 − x' : 'x');
  });
});

describe('the order, heading and rule are a logged decision', () => {
  it('refuses an order that leaves out, repeats or adds an item, naming each; a valid one is logged and printed', async () => {
    const file = demoCopy('order');
    await withStudy(file, async (study) => {
      const { model } = await instrumentFiles(study);
      const codes = model.items.map((it) => it.code);
      const reversed = [...codes].reverse();
      expect(() =>
        setInstrumentForm(study, { order: [...codes.slice(1), codes[1], 'ZZ99'], reason: 'test' }),
      ).toThrow(`not in the retained set: ZZ99; listed twice: ${codes[1]}; left out: ${codes[0]}`);
      expect(() => setInstrumentForm(study, { order: reversed, reason: ' ' })).toThrow('a reason');
      expect(() => setInstrumentForm(study, { minAnsweredShare: 0, reason: 'x' })).toThrow(
        'above 0 and at most 1',
      );
      const rows = study.log.count();
      setInstrumentForm(study, {
        order: reversed,
        title: 'Cycling confidence survey',
        reason: 'Route planning items first, as in the pilot (test)',
      });
      expect(study.log.count()).toBe(rows + 1);
      const row = study.log.list({ limit: 1 })[0];
      expect(row.kind).toBe('instrument-form-set');
      expect(row.phase).toBe('appendix');
      expect((row.detail as { after: { order: string[] } }).after.order).toEqual(reversed);
      const after = await instrumentFiles(study);
      expect(after.model.items.map((it) => it.code)).toEqual(reversed);
      expect(after.model.orderChosen).toBe(true);
      expect(after.files[0].bytes.toString('utf8')).toContain('<h1>Cycling confidence survey</h1>');
    });
  });
});

describe('project instrument on the command line', () => {
  it('writes the five files with their SHA-256, and replaces an earlier export whole', async () => {
    const out = path.join(tmp.dir, 'instrument');
    const first = await runCliHere(['project', 'instrument', demoPath, '--out', out, '--json']);
    expect(first.code).toBe(0);
    const value = JSON.parse(first.stdout) as {
      files: { name: string; sha256: string }[];
      verified: boolean;
    };
    expect(value.verified).toBe(true);
    expect(value.files.map((f) => f.name).sort()).toEqual(fs.readdirSync(out).sort());
    const again = await runCliHere(['project', 'instrument', demoPath, '--out', out]);
    expect(again.code).toBe(0);
    expect(again.stdout).toContain('scoring-key.json');
    for (const line of again.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    expect(fs.readdirSync(path.dirname(out)).filter((n) => n.includes('.writing-'))).toEqual([]);
  });

  it('refuses a folder holding other files, or a file, and leaves them as they were', async () => {
    const busy = path.join(tmp.dir, 'busy');
    fs.mkdirSync(busy);
    fs.writeFileSync(path.join(busy, 'notes.txt'), 'mine');
    const run = await runCliHere(['project', 'instrument', demoPath, '--out', busy]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/^error: --out .*busy already holds other files \(notes\.txt\)/);
    expect(fs.readdirSync(busy)).toEqual(['notes.txt']);
    const asFile = await runCliHere([
      'project',
      'instrument',
      demoPath,
      '--out',
      path.join(busy, 'notes.txt'),
    ]);
    expect(asFile.code).toBe(1);
    expect(asFile.stderr).toContain('is a file, not a folder');
    const usage = await runCliHere(['project', 'instrument', demoPath]);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toBe('error: --out DIR is required: the folder to write the instrument into\n');
  });

  it('refuses, exit 1, while purification has no retained set, naming what is missing', async () => {
    const empty = path.join(tmp.dir, 'empty.scalewright');
    Study.create(empty, { actor: TEST_ACTOR, app: 'test' }, { title: 'Empty' }).close();
    const out = path.join(tmp.dir, 'never');
    const run = await runCliHere(['project', 'instrument', empty, '--out', out]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(
      /^error: the purification phase has no retained item set yet \(.*no pilot data/,
    );
    expect(fs.existsSync(out)).toBe(false);
  });

  it('refuses, exit 1, while a drop is not yet in a round, naming the decision and the round to run', async () => {
    const file = demoCopy('stale-round');
    await withStudy(file, (study) =>
      decideItem(study, {
        itemCode: 'BH08',
        action: 'drop',
        domainRationale: 'Handling at low speed is covered by BH07 already (test)',
        statisticalRationale: 'None needed for this check (test)',
      }),
    );
    const run = await runCliHere(['project', 'instrument', file, '--out', path.join(tmp.dir, 'stale-out')]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(
      /^error: the purification phase has no retained item set yet \(The final round includes every drop, move and restore: 1 decision since round 2 \(drop BH08\): run round 3\)/,
    );
  });

  it('exports a tampered study, every file saying that verification failed', async () => {
    const file = demoCopy('tampered');
    const db = new Database(file);
    db.prepare("UPDATE construct SET definition = definition || ' (edited outside the app)'").run();
    db.close();
    const out = path.join(tmp.dir, 'tampered-out');
    const run = await runCliHere(['project', 'instrument', file, '--out', out, '--json']);
    expect(run.code).toBe(0);
    const value = JSON.parse(run.stdout) as { verified: boolean; warnings: string[] };
    expect(value.verified).toBe(false);
    expect(value.warnings.some((w) => w.startsWith('the study failed verification at export'))).toBe(true);
    for (const name of ['questionnaire.html', 'scoring-key.csv', 'scoring-key.json', 'norms.csv']) {
      expect(fs.readFileSync(path.join(out, name), 'utf8'), name).toContain('VERIFICATION FAILED at export');
    }
  });
});

describe('SEM and MDC from a retest analysis', () => {
  it('are reported, with the run they come from, when the study stores a retest analysis', async () => {
    const file = demoCopy('retest');
    await withStudy(file, async (study) => {
      // Shrout & Fleiss (1979), Table 2: six targets rated by judges 1 and 2, as pilot and retest scores.
      const data = [
        [9, 2],
        [6, 1],
        [8, 4],
        [7, 1],
        [10, 5],
        [6, 2],
      ];
      const icc = intraclassCorrelations(data).forms.find((f) => f.form === 'ICC(2,1)')?.value as number;
      const measurement = iccMeasurementError(data, icc);
      const runId = recordRun(study, {
        phase: 'validity',
        kind: 'test-retest',
        label: 'retest of the scale score (test)',
        inputs: { scores: data },
        options: {},
        results: { icc, measurement },
      });
      const { model, files } = await instrumentFiles(study);
      expect(model.retest).toMatchObject({
        runId,
        sem: measurement.sem,
        mdc95: measurement.mdc95,
        reliability: icc,
      });
      expect(measurement.mdc95).toBeCloseTo(1.96 * Math.SQRT2 * measurement.sem, 12);
      const norms = files.find((f) => f.name === 'norms.csv')?.bytes.toString('utf8') ?? '';
      expect(norms).toContain(`# Retest (analysis run ${runId}, test-retest`);
      expect(norms).toContain(`SEM ${measurement.sem}, MDC95 ${measurement.mdc95}`);
      expect(model.methods.map((m) => m.id)).toContain('sem.mdc95');
    });
  });
});
