import { EngineError } from '../errors.ts';
import { CRITERIA_METHODS } from './criteria.ts';
import { CONTENT_METHODS } from './content.ts';
import { NUMERICS_METHODS } from './numerics.ts';
import { FACTOR_ANALYSIS_METHODS } from './factor-analysis.ts';
import { NORMS_METHODS } from './norms.ts';
import { RELIABILITY_METHODS } from './reliability.ts';
import { REPORTING_METHODS } from './reporting.ts';
import { SCREENING_METHODS } from './screening.ts';
import { WORDING_METHODS } from './wording.ts';
import type { Reference, RegistryEntry } from './types.ts';
import { VALIDITY_METHODS } from './validity.ts';

export type { MethodEntry, Reference, RegistryEntry, RuleEntry } from './types.ts';

/**
 * Every entry of the methods registry, by id. Each area of the engine keeps its entries in a file of
 * its own beside this one and lists them here.
 */
export const METHODS: ReadonlyMap<string, RegistryEntry> = buildRegistry([
  ...RELIABILITY_METHODS,
  ...CONTENT_METHODS,
  ...WORDING_METHODS,
  ...SCREENING_METHODS,
  ...NUMERICS_METHODS,
  ...VALIDITY_METHODS,
  ...FACTOR_ANALYSIS_METHODS,
  ...CRITERIA_METHODS,
  ...NORMS_METHODS,
  ...REPORTING_METHODS,
]);

function buildRegistry(entries: RegistryEntry[]): ReadonlyMap<string, RegistryEntry> {
  const map = new Map<string, RegistryEntry>();
  for (const entry of entries) {
    if (map.has(entry.id)) throw new EngineError(`methods registry: id "${entry.id}" appears twice`);
    if (entry.references.length === 0 && !entry.commonPractice)
      throw new EngineError(`methods registry: "${entry.id}" has no reference`);
    map.set(entry.id, entry);
  }
  return map;
}

/** The entry for an id; throws EngineError for an id the registry does not hold. */
export function methodEntry(id: string): RegistryEntry {
  const entry = METHODS.get(id);
  if (!entry) throw new EngineError(`methods registry has no entry "${id}"`);
  return entry;
}

/**
 * One reference in the registry's one style (author–year, sentence-case title, journal in full):
 * `Cronbach, L. J. (1951). Coefficient alpha and the internal structure of tests. Psychometrika,
 * 16(3), 297–334. https://doi.org/10.1007/BF02310555`. Plain text; a renderer adds italics.
 */
export function formatReference(ref: Reference): string {
  const parts = [`${authorList(ref.authors)} (${ref.year}). ${ref.title}.`];
  if (ref.container) {
    let where = ref.container;
    if (ref.volume) where += `, ${ref.volume}${ref.issue ? `(${ref.issue})` : ''}`;
    if (ref.pages) where += `, ${ref.pages}`;
    parts.push(`${where}.`);
  }
  if (ref.edition) parts.push(`${ref.edition} ed.`);
  if (ref.publisher) parts.push(`${ref.publisher}.`);
  if (ref.doi) parts.push(`https://doi.org/${ref.doi}`);
  if (ref.fromMemory) parts.push('[Details from memory.]');
  return parts.join(' ');
}

function authorList(authors: string[]): string {
  if (authors.length <= 1) return authors.join('');
  return `${authors.slice(0, -1).join(', ')}, & ${authors[authors.length - 1]}`;
}

/** Who an in-text citation names: "Cronbach", "Polit & Beck", "Polit et al."; an organization by its name. */
export function citedAuthors(ref: Reference): string {
  const surnames = ref.authors.map((a) => a.split(',')[0].trim());
  if (surnames.length === 1) return surnames[0];
  return surnames.length === 2 ? `${surnames[0]} & ${surnames[1]}` : `${surnames[0]} et al.`;
}

/** Short in-text citation: "Cronbach (1951)", "Polit & Beck (2006)", "Polit et al. (2007)". */
export function citation(ref: Reference): string {
  return `${citedAuthors(ref)} (${ref.year})`;
}

/** The `methods` field of an analysis's JSON: each id with its references in the one style. */
export function methodsField(ids: readonly string[]): { id: string; reference: string }[] {
  return [...new Set(ids)].map((id) => {
    const entry = methodEntry(id);
    const references = entry.references.map(formatReference).join(' ');
    const practice = entry.commonPractice ? 'Common practice of the trade (no single published source).' : '';
    return { id, reference: [practice, references].filter((part) => part !== '').join(' ') };
  });
}

/**
 * A rule's cut-off by name, so that the engine applies exactly the threshold its registry entry shows:
 * `ruleThreshold('screening.speeder', 'fractionOfMedian')` is 0.5. Throws EngineError for an id that is
 * not a rule or a name the rule does not define.
 */
export function ruleThreshold(id: string, name: string): number {
  const entry = methodEntry(id);
  if (entry.kind !== 'rule') throw new EngineError(`methods registry: "${id}" is a method, not a rule`);
  const value = entry.thresholds[name];
  if (value === undefined) throw new EngineError(`methods registry: rule "${id}" has no threshold "${name}"`);
  return value;
}
