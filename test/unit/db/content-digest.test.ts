import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { createRng } from '../../../app/engine/rng.ts';
import { UNDIGESTED_TABLES } from '../../../db/content-digest.ts';
import { entryFromRow, GENESIS_HASH, type LogRow, rowHash } from '../../../db/decision-log.ts';
import { Study } from '../../../db/study.ts';
import { type IntegrityBreak, verifyStudy } from '../../../db/verify.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let demoFile: string;

beforeAll(() => {
  tmp = tempDir();
  demoFile = path.join(tmp.dir, 'demo.scalewright');
  Study.create(demoFile, { actor: TEST_ACTOR, app: 'test' }, { init: fillDemoStudy }).close();
}, 60_000);
afterAll(() => tmp.cleanup());

/** A fresh copy of the demo study, so that each tamper starts from an intact file. */
function copyOfDemo(): string {
  const file = path.join(tmp.dir, `copy-${crypto.randomUUID()}.scalewright`);
  fs.copyFileSync(demoFile, file);
  return file;
}

/**
 * Edits the file directly in SQLite, as someone with a database tool would: the append-only
 * triggers of the tables touched are dropped for the edit and put back after it.
 */
function tamper(file: string, edit: (db: Database.Database) => void): void {
  const db = new Database(file);
  try {
    const triggers = db.prepare("SELECT name, sql FROM sqlite_master WHERE type = 'trigger'").all() as {
      name: string;
      sql: string;
    }[];
    for (const t of triggers) db.exec(`DROP TRIGGER "${t.name}"`);
    edit(db);
    for (const t of triggers) db.exec(t.sql);
  } finally {
    db.close();
  }
}

function verify(file: string, head?: string) {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return verifyStudy(study, { head });
  } finally {
    study.close();
  }
}

function one(db: Database.Database, sql: string): Record<string, unknown> {
  return db.prepare(sql).get() as Record<string, unknown>;
}

describe('the demo study verifies as made', () => {
  it('has no break, and every log row after the first change records the content root', () => {
    const report = verify(demoFile);
    expect(report.breaks).toEqual([]);
    expect(report.intact).toBe(true);
    const db = new Database(demoFile, { readonly: true });
    const rows = one(db, 'SELECT count(*) AS n, count(state_digest) AS recorded FROM decision_log');
    expect(rows.recorded).toBe(rows.n);
    const runs = one(db, 'SELECT count(*) AS n FROM analysis_run').n as number;
    expect(runs).toBeGreaterThan(0);
    // Every run is cited by at least one log row that carries its digest.
    const cited = one(
      db,
      'SELECT count(DISTINCT run_id) AS n FROM decision_log WHERE run_id IS NOT NULL AND run_digest IS NOT NULL',
    ).n;
    expect(cited).toBe(runs);
    db.close();
  });
});

describe('a change made directly in SQLite is named by table and row', () => {
  const cases: {
    label: string;
    edit: (db: Database.Database) => void;
    expected: Partial<IntegrityBreak>;
  }[] = [
    {
      label: "a stored file's bytes",
      edit: (db) => {
        const bytes = Buffer.from(
          one(db, 'SELECT file_bytes FROM dataset WHERE id = 1').file_bytes as Buffer,
        );
        bytes[10] ^= 0x01;
        db.prepare('UPDATE dataset SET file_bytes = ? WHERE id = 1').run(bytes);
      },
      expected: { check: 'stored-file', table: 'dataset', row: 'id 1', columns: ['file_bytes'] },
    },
    {
      label: 'a result in an analysis run',
      edit: (db) => {
        const run = one(db, "SELECT id, results FROM analysis_run WHERE kind = 'purification-round' LIMIT 1");
        const results = JSON.parse(run.results as string);
        results.scale.alpha = 0.95;
        db.prepare('UPDATE analysis_run SET results = ? WHERE id = ?').run(JSON.stringify(results), run.id);
      },
      expected: { check: 'analysis-run', table: 'analysis_run' },
    },
    {
      label: "an item's wording",
      edit: (db) => db.exec("UPDATE item_revision SET text = 'I can ride anywhere at all.' WHERE id = 3"),
      expected: { check: 'content', table: 'item_revision', row: 'id 3', columns: ['text'] },
    },
    {
      label: 'a facet',
      edit: (db) => db.exec("UPDATE facet SET name = 'Confidence on roads' WHERE id = 1"),
      expected: { check: 'content', table: 'facet', row: 'id 1', columns: ['name'] },
    },
    {
      label: 'an expert rating',
      edit: (db) => db.exec('UPDATE review_rating SET relevance = coalesce(5 - relevance, 1) WHERE id = 7'),
      expected: { check: 'content', table: 'review_rating', row: 'id 7', columns: ['relevance'] },
    },
    {
      label: 'a phase state',
      edit: (db) =>
        db.exec(
          "UPDATE phase_state SET state = CASE state WHEN 'signed-off' THEN 'reopened' ELSE 'signed-off' END WHERE phase = 'pilot'",
        ),
      expected: { check: 'content', table: 'phase_state', row: 'phase pilot', columns: ['state'] },
    },
    {
      label: 'an exclusion',
      edit: (db) => db.exec('UPDATE respondent_exclusion SET excluded = 1 - excluded WHERE id = 2'),
      expected: { check: 'content', table: 'respondent_exclusion', row: 'id 2', columns: ['excluded'] },
    },
    {
      label: 'a removed rating',
      edit: (db) => db.exec('DELETE FROM review_rating WHERE id = 9'),
      expected: { check: 'content', table: 'review_rating', row: 'rowid 9' },
    },
    {
      label: 'an added facet',
      edit: (db) => db.exec("INSERT INTO facet (id, name, position) VALUES (99, 'Smuggled in', 9)"),
      expected: { check: 'content', table: 'facet', row: 'id 99' },
    },
    {
      label: 'the study title',
      edit: (db) => db.exec("UPDATE study_meta SET value = 'Another study' WHERE key = 'title'"),
      expected: { check: 'content', table: 'study_meta', row: 'key title', columns: ['value'] },
    },
  ];

  it.each(cases)('$label', ({ edit, expected }) => {
    const file = copyOfDemo();
    tamper(file, edit);
    const report = verify(file);
    expect(report.intact).toBe(false);
    expect(report.breaks).toContainEqual(expect.objectContaining(expected));
  });

  it('an analysis run edited in place is also named with the columns that differ', () => {
    const file = copyOfDemo();
    tamper(file, (db) => db.exec("UPDATE analysis_run SET engine_version = '0.0.0' WHERE id = 1"));
    const report = verify(file);
    expect(report.breaks).toContainEqual(
      expect.objectContaining({ check: 'analysis-run', table: 'analysis_run', row: 'id 1' }),
    );
    expect(report.breaks).toContainEqual(
      expect.objectContaining({
        check: 'content',
        table: 'analysis_run',
        row: 'id 1',
        columns: ['engine_version'],
      }),
    );
  });

  it('a row edited together with its bookkeeping entry breaks the root the last log row recorded', () => {
    const file = copyOfDemo();
    tamper(file, (db) => {
      db.exec("UPDATE facet SET definition = 'Quietly changed.' WHERE id = 2");
      db.prepare("UPDATE content_digest SET digest = ? WHERE tbl = 'facet' AND row_id = 2").run(
        '0'.repeat(64),
      );
    });
    const report = verify(file);
    expect(report.breaks).toContainEqual(
      expect.objectContaining({ check: 'digests', table: 'content_digest' }),
    );
  });

  it('the digest covers every table but the log and its own bookkeeping, including tables added later', () => {
    const file = copyOfDemo();
    // A table a later migration might add, holding a row the log never recorded.
    tamper(file, (db) => {
      db.exec(
        "CREATE TABLE later_table (id INTEGER PRIMARY KEY, note TEXT NOT NULL) STRICT; INSERT INTO later_table VALUES (1, 'x')",
      );
    });
    expect(verify(file).breaks).toContainEqual(
      expect.objectContaining({ check: 'content', table: 'later_table', row: 'id 1' }),
    );
    expect([...UNDIGESTED_TABLES.keys()].sort()).toEqual(['content_digest', 'decision_log']);
  });

  it('a change through the app keeps the study verifiable and moves the recorded root', () => {
    const file = copyOfDemo();
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    const before = study.log.lastRecordedState();
    study.change({ phase: 'construct', kind: 'edit', target: 'title' }, () =>
      study.db.prepare("UPDATE study_meta SET value = 'Renamed' WHERE key = 'title'").run(),
    );
    const after = study.log.lastRecordedState();
    study.close();
    expect(after?.seq).toBe((before?.seq ?? 0) + 1);
    expect(after?.root).not.toBe(before?.root);
    expect(verify(file).breaks).toEqual([]);
  });
});

/** Flips one bit of a cell's stored form (integer, real, text bytes or blob bytes). */
function flipped(value: unknown, bit: number): unknown {
  if (typeof value === 'bigint') return value ^ (1n << BigInt(bit % 63));
  if (typeof value === 'number') {
    const buf = Buffer.alloc(8);
    buf.writeDoubleLE(value);
    buf[Math.floor((bit % 64) / 8)] ^= 1 << (bit % 8);
    return buf.readDoubleLE();
  }
  if (typeof value === 'string' || Buffer.isBuffer(value)) {
    const bytes = Buffer.from(value as Buffer);
    if (bytes.length === 0) return undefined;
    const at = bit % (bytes.length * 8);
    bytes[Math.floor(at / 8)] ^= 1 << (at % 8);
    return bytes;
  }
  return undefined;
}

describe('single-bit flips in content and analysis-run cells', () => {
  it('are all detected: 40 seeded random flips across every covered table', () => {
    const rng = createRng(20261202);
    const source = new Database(demoFile, { readonly: true });
    const tables = (
      source
        .prepare(
          "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
        )
        .pluck()
        .all() as string[]
    ).filter((t) => !UNDIGESTED_TABLES.has(t));
    source.close();
    const hit = new Set<string>();
    let flips = 0;
    let attempts = 0;
    while (flips < 40) {
      attempts++;
      if (attempts > 400) throw new Error('could not place 40 flips');
      // Every other flip lands in an analysis run, the rest anywhere in the content.
      const table = flips % 2 === 0 ? 'analysis_run' : tables[rng.int(tables.length)];
      const file = copyOfDemo();
      let place = '';
      let applied = false;
      tamper(file, (db) => {
        db.pragma('ignore_check_constraints = ON');
        const rows = db
          .prepare(
            `SELECT rowid AS r, * FROM "${table}"${table === 'study_meta' ? " WHERE key != 'log_head'" : ''}`,
          )
          .safeIntegers(true)
          .all() as Record<string, unknown>[];
        if (rows.length === 0) return;
        const row = rows[rng.int(rows.length)];
        const columns = Object.keys(row).filter((c) => c !== 'r');
        const column = columns[rng.int(columns.length)];
        const value = flipped(row[column], rng.int(1 << 30));
        if (value === undefined || (typeof value === 'number' && Number.isNaN(value))) return;
        const isText = typeof row[column] === 'string';
        try {
          db.prepare(
            `UPDATE "${table}" SET "${column}" = ${isText ? 'CAST(? AS TEXT)' : '?'} WHERE rowid = ?`,
          )
            .safeIntegers(true)
            .run(value, row.r);
          applied = true;
          place = `${table}.${column} (rowid ${row.r})`;
        } catch {
          // A flip that breaks a NOT NULL or UNIQUE constraint cannot be stored; pick another.
        }
      });
      if (!applied) continue;
      flips++;
      hit.add(table);
      const report = verify(file);
      expect(report.intact, `flip in ${place} went unnoticed`).toBe(false);
      fs.rmSync(file);
    }
    expect(flips).toBe(40);
    expect(hit.size).toBeGreaterThan(5);
  }, 120_000);
});

/** Rewrites log row `seq` and every later one with fresh hashes, as a forger would. */
function rewriteChain(file: string, seq: number, rationale: string): void {
  tamper(file, (db) => {
    const rows = db.prepare('SELECT * FROM decision_log WHERE seq >= ? ORDER BY seq').all(seq) as LogRow[];
    let prev =
      (db
        .prepare('SELECT hash FROM decision_log WHERE seq = ?')
        .pluck()
        .get(seq - 1) as string) ?? GENESIS_HASH;
    const update = db.prepare('UPDATE decision_log SET rationale = ?, prev_hash = ?, hash = ? WHERE seq = ?');
    for (const row of rows) {
      const { hash: _old, ...body } = entryFromRow(row);
      if (row.seq === seq) body.rationale = rationale;
      body.prevHash = prev;
      const hash = rowHash(body);
      update.run(body.rationale, prev, hash, row.seq);
      prev = hash;
    }
    const last = rows[rows.length - 1].seq;
    db.prepare("UPDATE study_meta SET value = ? WHERE key = 'log_head'").run(`${last}:${prev}`);
  });
}

describe('a head recorded outside the file', () => {
  it('catches a rewritten chain that passes every check inside the file', () => {
    const file = copyOfDemo();
    const recorded = verify(file).head as string;
    expect(recorded).toMatch(/^\d+:[0-9a-f]{64}$/);
    expect(verify(file, recorded).breaks).toEqual([]);
    rewriteChain(file, 20, 'a reason that was never given');
    const inside = verify(file);
    expect(inside.breaks).toEqual([]);
    expect(inside.head).not.toBe(recorded);
    const outside = verify(file, recorded);
    expect(outside.intact).toBe(false);
    expect(outside.headChecked).toEqual({ head: recorded, held: false });
    expect(outside.breaks).toEqual([
      expect.objectContaining({ check: 'head', seq: Number(recorded.split(':')[0]) }),
    ]);
    // An earlier head, recorded before the rewritten row, is still held: what came before stands.
    const study = Study.open(demoFile, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
    const early = study.log.row(19);
    study.close();
    expect(verify(file, `19:${early?.hash}`).breaks).toEqual([]);
  });

  it('names a head whose row the log no longer holds', () => {
    const report = verify(demoFile, `9999:${'a'.repeat(64)}`);
    expect(report.breaks).toEqual([expect.objectContaining({ check: 'head', seq: 9999 })]);
    expect(report.breaks[0].problem).toMatch(/no longer holds row 9999/);
  });
});
