import { TableError } from './table-error.ts';

/**
 * What a data column holds. `item` columns carry the item code of the pool they answer; `attention`
 * columns carry the answer an attentive respondent gives. Everything not mapped is `ignored`.
 */
export type ColumnRole =
  | { role: 'id' }
  | { role: 'item'; itemCode: string }
  | { role: 'criterion' }
  | { role: 'group' }
  | { role: 'retestLink' }
  | { role: 'duration' }
  | { role: 'attention'; correctAnswer: string }
  | { role: 'ignored' };

export type RoleName = ColumnRole['role'];

/** Roles keyed by the column's header text; columns absent from the record are ignored. */
export type ColumnMapping = Record<string, ColumnRole>;

/** Roles a dataset may give to one column only. */
const SINGLE_ROLES: RoleName[] = ['id', 'retestLink', 'duration'];

/**
 * Headers proposed as the respondent id, after `words` (lower case, every run of other characters one
 * underscore): "ID", "respondent_id", "Respondent ID", "participant no.", "Case number", "resp_id",
 * "subject_id", "pid". The researcher confirms or changes every proposal.
 */
const ID_HEADER =
  /^(?:(?:respondent|participant|case)(?:_?(?:id|no|nr|num|number|code))?|(?:subject|person|resp|part|record|response)_?(?:id|no|nr|num|number|code)|id|p_?id|r_?id|uid|id_?code)$/;

/**
 * Headers proposed as the response duration, after `words`: "duration", "duration_s", "Duration
 * (sec)", "time_taken", "Time taken (seconds)", "completion time", "response_time_ms", "seconds",
 * "elapsed".
 */
const DURATION_HEADER =
  /^(?:duration|time_taken|time_spent|total_time|response_time|completion_time|time_to_complete|elapsed(?:_time)?|seconds|secs|minutes|mins)(?:_(?:in_)?(?:s|sec|secs|seconds|ms|msec|milliseconds|m|min|mins|minutes))?$/;

function fold(name: string): string {
  return name.trim().toLowerCase();
}

/** A header as words: lower case, each run of characters other than letters and digits one underscore. */
function words(name: string): string {
  return name
    .trim()
    .toLowerCase()
    .replace(/[^\p{L}\p{N}]+/gu, '_')
    .replace(/^_+|_+$/g, '');
}

export interface ProposedMapping {
  mapping: ColumnMapping;
  /** Item codes of the pool with no column. */
  unmatchedItems: string[];
  /** Columns left ignored because nothing matched them. */
  unmatchedColumns: string[];
  /** Why each guessed role was proposed, by header ("its header is item code TR01"), for the researcher to confirm. */
  reasons: Record<string, string>;
  warnings: string[];
}

/**
 * Proposes a mapping for the researcher to confirm: a column whose header equals an item code
 * (trimmed, letter case ignored) becomes that item; the first header that names a respondent id and
 * the first that names a response time (in their usual spellings: ID_HEADER, DURATION_HEADER) take
 * those roles; `overrides` (by header) win over every guess. Nothing else is guessed; `reasons` says
 * why each guess was made. Cost O(columns + items).
 * Throws TableError when an override names a column that is not in the header.
 */
export function proposeMapping(
  header: readonly string[],
  itemCodes: readonly string[],
  overrides: ColumnMapping = {},
): ProposedMapping {
  const byFolded = new Map<string, string>();
  for (const code of itemCodes) byFolded.set(fold(code), code);
  const headerSet = new Set(header);
  for (const name of Object.keys(overrides)) {
    if (!headerSet.has(name)) {
      throw new TableError(
        `the mapping names column '${name}', which is not in the file's header`,
        undefined,
        name,
      );
    }
  }
  const mapping: ColumnMapping = {};
  const matchedCodes = new Set<string>();
  const unmatchedColumns: string[] = [];
  const reasons: Record<string, string> = {};
  const warnings: string[] = [];
  let idTaken = Object.values(overrides).some((r) => r.role === 'id');
  let durationTaken = Object.values(overrides).some((r) => r.role === 'duration');
  for (const name of header) {
    const override = overrides[name];
    if (override) {
      mapping[name] = override;
      if (override.role === 'item') matchedCodes.add(override.itemCode);
      continue;
    }
    const code = byFolded.get(fold(name));
    if (code !== undefined && !matchedCodes.has(code)) {
      mapping[name] = { role: 'item', itemCode: code };
      matchedCodes.add(code);
      reasons[name] = `its header is item code ${code}`;
    } else if (code !== undefined) {
      mapping[name] = { role: 'ignored' };
      warnings.push(`column '${name}' also matches item ${code}, already mapped; left ignored`);
    } else if (!idTaken && ID_HEADER.test(words(name))) {
      mapping[name] = { role: 'id' };
      idTaken = true;
      reasons[name] = 'its header names a respondent id';
    } else if (!durationTaken && DURATION_HEADER.test(words(name))) {
      mapping[name] = { role: 'duration' };
      durationTaken = true;
      reasons[name] = 'its header names a response time';
    } else {
      mapping[name] = { role: 'ignored' };
      unmatchedColumns.push(name);
    }
  }
  const unmatchedItems = itemCodes.filter((c) => !matchedCodes.has(c));
  return { mapping, unmatchedItems, unmatchedColumns, reasons, warnings };
}

/** A mapping checked against a header: column indexes grouped by role. */
export interface ResolvedMapping {
  idColumn?: number;
  items: { column: number; itemCode: string }[];
  criteria: number[];
  groups: number[];
  retestLink?: number;
  duration?: number;
  attention: { column: number; correctAnswer: string }[];
}

/**
 * Checks a mapping against the header and resolves it to column indexes. Cost O(columns).
 * Throws TableError when a mapped column is missing from the header, when id, retest link or duration
 * is given to more than one column, when two columns claim the same item code, when an attention check
 * has no correct answer, or when no column is an item.
 */
export function resolveMapping(header: readonly string[], mapping: ColumnMapping): ResolvedMapping {
  const index = new Map(header.map((h, i) => [h, i]));
  const resolved: ResolvedMapping = { items: [], criteria: [], groups: [], attention: [] };
  const singles = new Map<RoleName, string>();
  const codes = new Map<string, string>();
  for (const [name, role] of Object.entries(mapping)) {
    const column = index.get(name);
    if (column === undefined) {
      throw new TableError(
        `the mapping names column '${name}', which is not in the file's header`,
        undefined,
        name,
      );
    }
    if (SINGLE_ROLES.includes(role.role)) {
      const earlier = singles.get(role.role);
      if (earlier !== undefined) {
        throw new TableError(
          `columns '${earlier}' and '${name}' are both mapped as ${role.role}; only one column may have that role`,
          undefined,
          name,
        );
      }
      singles.set(role.role, name);
    }
    switch (role.role) {
      case 'id':
        resolved.idColumn = column;
        break;
      case 'item': {
        const code = role.itemCode.trim();
        if (code === '')
          throw new TableError(`column '${name}' is mapped as an item without an item code`, undefined, name);
        const earlier = codes.get(fold(code));
        if (earlier !== undefined) {
          throw new TableError(
            `columns '${earlier}' and '${name}' are both mapped to item ${code}`,
            undefined,
            name,
          );
        }
        codes.set(fold(code), name);
        resolved.items.push({ column, itemCode: code });
        break;
      }
      case 'criterion':
        resolved.criteria.push(column);
        break;
      case 'group':
        resolved.groups.push(column);
        break;
      case 'retestLink':
        resolved.retestLink = column;
        break;
      case 'duration':
        resolved.duration = column;
        break;
      case 'attention':
        if (role.correctAnswer.trim() === '') {
          throw new TableError(`attention check '${name}' needs the correct answer`, undefined, name);
        }
        resolved.attention.push({ column, correctAnswer: role.correctAnswer.trim() });
        break;
      case 'ignored':
        break;
    }
  }
  if (resolved.items.length === 0) {
    throw new TableError('no column is mapped as an item: map at least one column to an item code');
  }
  resolved.items.sort((a, b) => a.column - b.column);
  resolved.criteria.sort((a, b) => a - b);
  resolved.groups.sort((a, b) => a - b);
  resolved.attention.sort((a, b) => a.column - b.column);
  return resolved;
}
