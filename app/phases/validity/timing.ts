import type { LogEntry } from '../../../db/decision-log.ts';
import type { Study } from '../../../db/study.ts';
import { currentDataset } from '../analysis-data.ts';
import { plannedRelations } from './settings.ts';

/** A log row as `SEQ:HASH`, the form `project verify --head` checks. */
function headOf(e: LogEntry): string {
  return `${e.seq}:${e.hash}`;
}

export interface HypothesisTiming {
  relationId: number;
  /** The log row that recorded the relation as it stands (its plan, or its latest edit). */
  recorded: { seq: number; head: string; at: string; kind: string } | null;
  /** The log row that imported the current validation data. */
  imported: { seq: number; head: string; at: string; dataset: string } | null;
  /** True when the relation's row comes before the import's row in the log. */
  before: boolean | null;
  statement: string;
}

/**
 * For each planned relation, whether the log recorded it (as it stands now) before the current
 * validation data was imported: the hash chain fixes the order of rows, so the two rows and their
 * heads show it; a relation edited after the import says so plainly.
 */
export function hypothesisTiming(study: Study): HypothesisTiming[] {
  const dataset = currentDataset(study, 'validation');
  const imports = study.log.list({ kind: 'dataset-imported' });
  const importRow = dataset
    ? imports.find(
        (e) =>
          e.detail.role === 'validation' &&
          e.detail.sha256 === dataset.fileSha256 &&
          e.detail.name === dataset.name,
      )
    : undefined;
  const planned = study.log.list({ phase: 'construct', kind: 'relation-planned' }).reverse();
  const edited = study.log.list({ phase: 'construct', kind: 'relation-edited' }).reverse();
  const relations = plannedRelations(study);
  return relations.map((r): HypothesisTiming => {
    const lastEdit = edited.filter((e) => e.detail.relationId === r.id).at(-1);
    const plan = planned.find((e) => e.target === `relation to "${r.otherConstruct}"`);
    const row = lastEdit ?? plan;
    const recorded = row ? { seq: row.seq, head: headOf(row), at: row.at, kind: row.kind } : null;
    const imported = importRow
      ? {
          seq: importRow.seq,
          head: headOf(importRow),
          at: importRow.at,
          dataset: String(importRow.detail.name),
        }
      : null;
    const before = recorded && imported ? recorded.seq < imported.seq : null;
    const statement = !recorded
      ? 'The log holds no row recording this relation; it cannot be shown to have been planned before the data.'
      : !imported
        ? 'No current validation data has been imported yet.'
        : before
          ? `Recorded in log row ${recorded.seq}, before the validation data was imported in row ${imported.seq}.`
          : `Recorded (or last edited) in log row ${recorded.seq}, after the validation data was imported in row ${imported.seq}: it was not fixed before the data were seen.`;
    return { relationId: r.id, recorded, imported, before, statement };
  });
}
