import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bounded } from '../../../app/api/format.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { buildAppendix, exportAppendix } from '../../../app/export/appendix/index.ts';
import type { AppendixDocument, Table } from '../../../app/export/appendix/model.ts';
import { renderMarkdown } from '../../../app/export/appendix/markdown.ts';
import { currentPilotDataset } from '../../../app/phases/analysis-data.ts';
import { screeningView } from '../../../app/phases/pilot/index.ts';
import { roundSummaries } from '../../../app/phases/purification/index.ts';
import { loadDatasetFile } from '../../../db/repos/datasets.ts';
import { Study } from '../../../db/study.ts';
import { runCli } from '../../helpers/cli.ts';
import { checkWellFormed, unzip } from '../../helpers/ooxml.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

const AT = new Date('2026-12-01T12:00:00Z');
let tmp: ReturnType<typeof tempDir>;
let demo: string;

beforeAll(() => {
  tmp = tempDir('scalewright-appendix-');
  demo = path.join(tmp.dir, 'demo.scalewright');
  Study.create(demo, { actor: TEST_ACTOR, app: 'test' }, { title: 'Demo', init: fillDemoStudy }).close();
}, 60_000);
afterAll(() => tmp.cleanup());

function readStudy<T>(file: string, use: (study: Study) => T): T {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return use(study);
  } finally {
    study.close();
  }
}

async function readStudyAsync<T>(file: string, use: (study: Study) => Promise<T>): Promise<T> {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return await use(study);
  } finally {
    study.close();
  }
}

function tables(doc: AppendixDocument): Table[] {
  return doc.blocks.filter((b): b is Table => b.kind === 'table');
}

function decode(html: string): string {
  return html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&apos;/g, "'")
    .replace(/&amp;/g, '&');
}

/** The structural rules a reviewer's HTML checker applies: one h1, no skipped levels, tables with a head and rows. */
function checkHtmlStructure(html: string): void {
  const levels = [...html.matchAll(/<h([1-6])[\s>]/g)].map((m) => Number(m[1]));
  expect(levels.filter((l) => l === 1)).toHaveLength(1);
  expect(levels[0]).toBe(1);
  for (let i = 1; i < levels.length; i++) expect(levels[i] - levels[i - 1]).toBeLessThanOrEqual(1);
  const found = [...html.matchAll(/<table>([\s\S]*?)<\/table>/g)].map((m) => m[1]);
  expect(found.length).toBeGreaterThan(0);
  for (const table of found) {
    expect(table).toMatch(/<thead><tr>(<th [^>]*>[^<]*<\/th>)+<\/tr><\/thead>/);
    const body = /<tbody>([\s\S]*)<\/tbody>/.exec(table)?.[1] ?? '';
    expect(body).toMatch(/<tr><td/);
  }
  expect(html.match(/<table>/g)?.length).toBe(html.match(/<\/table>/g)?.length);
}

describe('the methods appendix of the demo study', () => {
  it('renders the same tables in Markdown, HTML and DOCX from one model, and HTML passes the structural check', async () => {
    const [doc, md, html, docx] = await readStudyAsync(
      demo,
      async (study) =>
        [
          buildAppendix(study, { exportedAt: AT }),
          new TextDecoder().decode((await exportAppendix(study, 'md', { exportedAt: AT })).bytes),
          new TextDecoder().decode((await exportAppendix(study, 'html', { exportedAt: AT })).bytes),
          (await exportAppendix(study, 'docx', { exportedAt: AT })).bytes,
        ] as const,
    );
    checkHtmlStructure(html);
    const text = decode(html);
    const documentXml = unzip(docx).get('word/document.xml')?.toString('utf8') ?? '';
    const docxText = documentXml
      .replace(/<[^>]+>/g, '')
      .replace(/&lt;/g, '<')
      .replace(/&gt;/g, '>')
      .replace(/&quot;/g, '"')
      .replace(/&apos;/g, "'")
      .replace(/&amp;/g, '&');
    for (const table of tables(doc)) {
      expect(text).toContain(table.caption);
      expect(docxText).toContain(table.caption);
      for (const row of table.rows)
        for (const cell of row) {
          expect(text).toContain(cell);
          expect(docxText).toContain(cell);
        }
    }
    expect(md).toBe(renderMarkdown(doc));
    for (const heading of [
      'Construct definition and facets',
      'Expert review of content',
      'Purification rounds',
      'Validity evidence',
      'The final instrument',
      'Cautions on use',
      'Reproducibility',
      'References',
    ])
      expect(md).toContain(heading);
    expect(md).toMatch(/not validate the scale for diagnosis, hiring, admission/);
    expect(md).toMatch(/ethics committee/);
  }, 60_000);

  it('writes the DOCX as a valid OOXML package: every part well-formed XML, tables with repeated header rows, figures as SVG with a PNG', async () => {
    const bytes = await readStudyAsync(
      demo,
      async (study) => (await exportAppendix(study, 'docx', { exportedAt: AT })).bytes,
    );
    const parts = unzip(bytes);
    for (const required of ['[Content_Types].xml', '_rels/.rels', 'word/document.xml', 'word/styles.xml'])
      expect(parts.has(required)).toBe(true);
    for (const [name, data] of parts) {
      if (name.endsWith('.xml') || name.endsWith('.rels') || name.endsWith('.svg'))
        expect(() => checkWellFormed(data.toString('utf8'), name)).not.toThrow();
    }
    const types = parts.get('[Content_Types].xml')?.toString('utf8') ?? '';
    expect(types).toContain('Extension="svg"');
    expect(types).toContain('Extension="png"');
    const png = [...parts.entries()].find(([name]) => name.endsWith('.png'))?.[1];
    expect(png?.subarray(1, 4).toString('ascii')).toBe('PNG');
    const document = parts.get('word/document.xml')?.toString('utf8') ?? '';
    const doc = readStudy(demo, (study) => buildAppendix(study, { exportedAt: AT }));
    expect(document.match(/<w:tbl>/g)?.length).toBe(tables(doc).length);
    expect(document).toContain('<w:tblHeader');
  }, 60_000);

  it('writes the PDF with its pages, the four DejaVu Serif styles embedded and no standard font', async () => {
    const bytes = await readStudyAsync(
      demo,
      async (study) => (await exportAppendix(study, 'pdf', { exportedAt: AT })).bytes,
    );
    const text = Buffer.from(bytes).toString('latin1');
    expect(text.startsWith('%PDF-1.7')).toBe(true);
    expect(text.trimEnd().endsWith('%%EOF')).toBe(true);
    const pages = text.match(/\/Type \/Page\b(?!s)/g)?.length ?? 0;
    const declared = Number(/\/Type \/Pages\s*\/Count (\d+)/.exec(text)?.[1]);
    expect(pages).toBe(declared);
    // Nine numbered sections, two review rounds and two 30-item tables do not fit in fewer than 8 A4 pages.
    expect(pages).toBeGreaterThanOrEqual(8);
    expect(text.match(/\/FontFile2/g)?.length).toBe(4);
    for (const style of ['DejaVuSerif', 'DejaVuSerif-Bold', 'DejaVuSerif-Italic', 'DejaVuSerif-BoldItalic'])
      expect(text).toMatch(new RegExp(`/BaseFont /[A-Z]{6}\\+${style}\\b`));
    expect(text).not.toMatch(/\/BaseFont \/(Helvetica|Times|Courier)/);
  }, 60_000);

  it('prints the stored alpha of every round, and the last one equals stats reliability on the exported pilot data', () => {
    const { doc, rounds, stored, csv, items } = readStudy(demo, (study) => {
      const pilot = currentPilotDataset(study);
      if (!pilot) throw new Error('the demo has pilot data');
      const excludedIds = new Set(
        screeningView(study, pilot.id)
          .respondents.filter((r) => r.exclusion !== null)
          .map((r) => r.id),
      );
      const raw = new TextDecoder().decode(loadDatasetFile(study, pilot.id));
      const parsed = Papa.parse<Record<string, string>>(raw, { header: true, skipEmptyLines: true });
      const kept = parsed.data.filter((row) => !excludedIds.has(row.respondent_id));
      expect(kept.length).toBe(parsed.data.length - excludedIds.size);
      const file = path.join(tmp.dir, 'pilot-kept.csv');
      fs.writeFileSync(
        file,
        Papa.unparse({
          fields: parsed.meta.fields ?? [],
          data: kept.map((r) => (parsed.meta.fields ?? []).map((f) => r[f])),
        }),
      );
      const summaries = roundSummaries(study);
      const last = summaries.at(-1);
      const results = JSON.parse(
        (
          study.db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(last?.runId) as {
            results: string;
          }
        ).results,
      );
      return {
        doc: buildAppendix(study, { exportedAt: AT }),
        rounds: summaries,
        stored: results.scale as { alpha: { value: number }; n: number },
        csv: file,
        items: last?.items ?? [],
      };
    });
    const reliability = tables(doc).find((t) => t.caption === 'Reliability across purification rounds');
    expect(reliability?.rows.map((r) => r[3])).toEqual(rounds.map((r) => bounded(r.alpha)));
    expect(reliability?.rows.at(-1)?.[3]).toBe(bounded(stored.alpha.value));
    const cli = runCli([
      'stats',
      'reliability',
      '--data',
      csv,
      '--items',
      items.join(','),
      '--missing-codes',
      '-9',
      '--json',
    ]);
    expect(cli.code).toBe(0);
    const out = JSON.parse(cli.stdout) as { alpha: number; n: number };
    expect(out.n).toBe(stored.n);
    expect(out.alpha).toBeCloseTo(stored.alpha.value, 12);
    expect(renderMarkdown(doc)).toContain(`Cronbach’s α = ${bounded(out.alpha)}`);
  }, 60_000);

  it('shows a phase or analysis not yet done as a note, never as an empty table', () => {
    const blank = path.join(tmp.dir, 'blank.scalewright');
    Study.create(blank, { actor: TEST_ACTOR, app: 'test' }, { title: 'Blank' }).close();
    const doc = readStudy(blank, (study) => buildAppendix(study, { exportedAt: AT }));
    for (const table of tables(doc)) expect(table.rows.length).toBeGreaterThan(0);
    const notYet = doc.blocks.filter((b) => b.kind === 'notice' && b.tone === 'not-yet').length;
    expect(notYet).toBeGreaterThanOrEqual(6);
    // The demo worked only through purification has no validity runs yet: each says so.
    const early = path.join(tmp.dir, 'early.scalewright');
    Study.create(
      early,
      { actor: TEST_ACTOR, app: 'test' },
      { title: 'Early', init: (study) => fillDemoStudy(study, 'purification') },
    ).close();
    const md = renderMarkdown(readStudy(early, (study) => buildAppendix(study, { exportedAt: AT })));
    expect(md).toContain('**Not yet done.** Confirmatory factor analysis');
    expect(md).toContain('**Not yet done.** Test–retest reliability');
    expect(md).toContain('**Not yet done.** Tests of these hypotheses');
    // The full demo has them: the planned relations are tested, criteria and groups compared.
    const full = renderMarkdown(readStudy(demo, (study) => buildAppendix(study, { exportedAt: AT })));
    for (const done of [
      'Confirmatory factor analysis',
      'Test–retest',
      'Tests of these',
      'Criterion',
      'Known-groups',
    ])
      expect(full).not.toContain(`**Not yet done.** ${done}`);
    expect(full).toMatch(/Hypotheses tested against the observed relations \(analysis run \d+\)/);
    expect(full).toMatch(/Known-groups comparisons of the scale score/);
  });
});

describe('a decision row edited behind the app’s back', () => {
  it('breaks project verify and shows in the appendix’s reproducibility block', () => {
    const file = path.join(tmp.dir, 'tampered.scalewright');
    fs.copyFileSync(demo, file);
    const head = readStudy(file, (study) => study.log.head());
    const db = new Database(file);
    const row = db
      .prepare(
        "SELECT seq FROM decision_log WHERE phase = 'purification' AND kind != 'analysis-run' ORDER BY seq LIMIT 1",
      )
      .get() as { seq: number };
    db.exec('DROP TRIGGER decision_log_no_update');
    db.prepare("UPDATE decision_log SET rationale = rationale || ' (edited later)' WHERE seq = ?").run(
      row.seq,
    );
    db.close();

    const verify = runCli(['project', 'verify', file, '--head', head ?? '']);
    expect(verify.code).toBe(1);
    expect(verify.stderr).toContain(`log row ${row.seq}`);

    const out = path.join(tmp.dir, 'tampered.md');
    const exported = runCli(['project', 'export', file, '--format', 'md', '--out', out]);
    expect(exported.code).toBe(0);
    expect(exported.stderr).toMatch(/^warning: .*failed verification/m);
    const md = fs.readFileSync(out, 'utf8');
    expect(md).toContain('Verification at export FAILED');
    expect(md).toContain(`log row ${row.seq}`);
    expect(md).toContain('This study file failed verification at export');

    const clean = renderMarkdown(readStudy(demo, (study) => buildAppendix(study, { exportedAt: AT })));
    expect(clean).toContain('**Verified.** **At export:**');
    expect(clean).not.toContain('FAILED');
  }, 60_000);
});

describe('project export on the command line', () => {
  it('refuses a wrong format or a missing --out with exit 2, an unwritable place with exit 1, and leaves no partial file', () => {
    expect(runCli(['project', 'export', demo, '--format', 'odt', '--out', 'x.odt'])).toMatchObject({
      code: 2,
    });
    const missingOut = runCli(['project', 'export', demo, '--format', 'pdf']);
    expect(missingOut.code).toBe(2);
    expect(missingOut.stderr).toMatch(/^error: --out/);
    const noFolder = runCli([
      'project',
      'export',
      demo,
      '--format',
      'md',
      '--out',
      path.join(tmp.dir, 'nowhere', 'a.md'),
    ]);
    expect(noFolder.code).toBe(1);
    expect(noFolder.stderr).toMatch(/^error: cannot write .*does not exist/);
    const folder = runCli(['project', 'export', demo, '--format', 'md', '--out', tmp.dir]);
    expect(folder.code).toBe(1);
    expect(fs.readdirSync(tmp.dir).filter((f) => f.includes('.partial'))).toEqual([]);
  }, 60_000);

  it('works from the compiled bundle, finding the fonts from there, for every format', () => {
    const launcher = path.join(process.cwd(), 'app', 'cli', 'bin.mjs');
    for (const format of ['pdf', 'docx', 'html', 'md']) {
      const out = path.join(tmp.dir, `compiled.${format}`);
      const result = runCompiled(launcher, [
        'project',
        'export',
        'demo.scalewright',
        '--format',
        format,
        '--out',
        out,
        '--json',
      ]);
      expect(result.code, result.stderr).toBe(0);
      const json = JSON.parse(result.stdout) as { out: string; bytes: number; intact: boolean };
      expect(json).toMatchObject({ out, intact: true });
      expect(fs.statSync(out).size).toBe(json.bytes);
    }
    expect(fs.readFileSync(path.join(tmp.dir, 'compiled.pdf')).subarray(0, 5).toString()).toBe('%PDF-');
    expect(fs.readFileSync(path.join(tmp.dir, 'compiled.docx')).subarray(0, 2).toString()).toBe('PK');
  }, 120_000);
});

function runCompiled(launcher: string, args: string[]) {
  const env: NodeJS.ProcessEnv = { ...process.env, INIT_CWD: tmp.dir, SCALEWRIGHT_NAME: 'CLI Tester' };
  delete env.SCALEWRIGHT_FONTS;
  const result = spawnSync(process.execPath, [launcher, ...args], {
    cwd: path.dirname(launcher),
    encoding: 'utf8',
    env,
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}
