import { SNIFF_RECORDS } from './limits.ts';

/** Delimiters the reader detects, in the order used to break ties. */
export const CANDIDATE_DELIMITERS = [',', ';', '\t', '|'] as const;

/**
 * Splits the first `maxRecords` records of `text` into fields with the given delimiter and quote
 * (RFC 4180 rules: a quote opens a field only at its start, a doubled quote inside is a literal quote).
 * Blank records are dropped. Cost O(length of the sniffed part).
 */
export function sniffRecords(text: string, delimiter: string, quote: string, maxRecords: number): string[][] {
  if (!text.includes(quote)) return unquotedRecords(text, delimiter, maxRecords);
  const records: string[][] = [];
  let fields: string[] = [];
  let field = '';
  let inQuotes = false;
  let atFieldStart = true;
  const endRecord = () => {
    fields.push(field);
    if (!(fields.length === 1 && fields[0].trim() === '')) records.push(fields);
    fields = [];
    field = '';
    atFieldStart = true;
  };
  for (let i = 0; i < text.length && records.length < maxRecords; i++) {
    const c = text[i];
    if (inQuotes) {
      if (c === quote) {
        if (text[i + 1] === quote) {
          field += quote;
          i++;
        } else {
          inQuotes = false;
        }
      } else {
        field += c;
      }
      continue;
    }
    if (c === quote && atFieldStart) {
      inQuotes = true;
      atFieldStart = false;
    } else if (c === delimiter) {
      fields.push(field);
      field = '';
      atFieldStart = true;
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && text[i + 1] === '\n') i++;
      endRecord();
    } else {
      field += c;
      atFieldStart = false;
    }
  }
  if (records.length < maxRecords && (field !== '' || fields.length > 0)) endRecord();
  return records;
}

/**
 * sniffRecords of a text without the quote character: each line break (CRLF, LF or CR) ends a record
 * and each delimiter a field, so the records are the lines split at the delimiter. Cost O(length).
 */
function unquotedRecords(text: string, delimiter: string, maxRecords: number): string[][] {
  const records: string[][] = [];
  for (const line of text.split(/\r\n|\n|\r/)) {
    if (records.length >= maxRecords) break;
    const fields = line.split(delimiter);
    if (!(fields.length === 1 && fields[0].trim() === '')) records.push(fields);
  }
  return records;
}

export interface DelimiterGuess {
  delimiter: string;
  /** Fields in the header with this delimiter. */
  headerFields: number;
  /** Share of sniffed data records with as many fields as the header (1 when there are none). */
  consistency: number;
  /** Other delimiters that fit the sniffed records equally well. */
  alsoPlausible: string[];
}

/**
 * Guesses the delimiter: for each candidate, the header must split into at least two fields and the
 * winner is the one under which most of the first SNIFF_RECORDS records have the header's field count;
 * ties go to more header fields, then to the order of CANDIDATE_DELIMITERS. Counting against the header
 * (not between data rows) is what keeps comma decimals ("2,5;3,5") from voting for the comma: the
 * header has no decimals. Returns undefined when no candidate splits the header.
 */
export function detectDelimiter(text: string, quote = '"'): DelimiterGuess | undefined {
  const scored: { delimiter: string; headerFields: number; consistency: number }[] = [];
  for (const delimiter of CANDIDATE_DELIMITERS) {
    const records = sniffRecords(text, delimiter, quote, SNIFF_RECORDS);
    if (records.length === 0 || records[0].length < 2) continue;
    const headerFields = records[0].length;
    const data = records.slice(1);
    const matching = data.filter((r) => r.length === headerFields).length;
    scored.push({ delimiter, headerFields, consistency: data.length === 0 ? 1 : matching / data.length });
  }
  if (scored.length === 0) return undefined;
  scored.sort((a, b) => b.consistency - a.consistency || b.headerFields - a.headerFields);
  const best = scored[0];
  const alsoPlausible = scored
    .slice(1)
    .filter((s) => s.consistency === best.consistency && s.consistency === 1)
    .map((s) => s.delimiter);
  return { ...best, alsoPlausible };
}

/**
 * Guesses the quote character: the single quote wins only when the double quote never wraps a field
 * in the sniffed records and at least half of the header's fields are wrapped in single quotes, so an
 * apostrophe in a label ("don't") never switches the quote. Cost O(sniffed length).
 */
export function detectQuote(text: string, delimiter: string): string {
  const records = sniffRecords(text, delimiter, '\u0000', SNIFF_RECORDS);
  if (records.length === 0) return '"';
  const wrapped = (f: string, q: string) => f.length >= 2 && f.startsWith(q) && f.endsWith(q);
  const anyDouble = records.some((r) => r.some((f) => wrapped(f.trim(), '"')));
  if (anyDouble) return '"';
  const header = records[0];
  const singles = header.filter((f) => wrapped(f.trim(), "'")).length;
  return singles > 0 && singles * 2 >= header.length ? "'" : '"';
}

/** Human name of a delimiter for messages. */
export function delimiterName(delimiter: string): string {
  switch (delimiter) {
    case ',':
      return 'comma';
    case ';':
      return 'semicolon';
    case '\t':
      return 'tab';
    case '|':
      return 'pipe';
    default:
      return `"${delimiter}"`;
  }
}
