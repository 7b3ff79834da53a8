/**
 * The shapes of the methods registry: every published method and every rule of thumb the engine
 * uses has one entry, with its full reference, so that the screens' notes, the command line's
 * `methods` field and the appendix's reference list all render from one place.
 */

/** One publication, in enough detail for a reference list. */
export interface Reference {
  /** Each author as "Surname, I. I." (an organization as its name), in the publication's order. */
  authors: string[];
  year: number;
  title: string;
  /** Journal name for an article; book title for a chapter; omitted for a book. */
  container?: string;
  volume?: string;
  issue?: string;
  pages?: string;
  /** For books and chapters. */
  publisher?: string;
  edition?: string;
  doi?: string;
  /** True where the details were recalled rather than checked against the publication itself. */
  fromMemory?: boolean;
}

/** A published method the engine computes (an estimator, a test, a rotation, an index). */
export interface MethodEntry {
  kind: 'method';
  /** Stable id, cited in doc comments and stored with results: `alpha.cronbach`, `efa.varimax`. */
  id: string;
  /** The method's usual name, as the trade writes it. */
  name: string;
  /** A procedure of the trade with no single source (reverse keying, duplicate ids). */
  commonPractice?: boolean;
  references: Reference[];
}

/** A rule of thumb: a threshold the screens and the appendix show beside a value. */
export interface RuleEntry {
  kind: 'rule';
  id: string;
  name: string;
  /** What the rule says, in one sentence a researcher understands. */
  wording: string;
  /** The cut-offs the engine applies, by name (`minimum: 0.4`). */
  thresholds: Record<string, number>;
  /** A rule of the trade with no single source. */
  commonPractice?: boolean;
  references: Reference[];
}

export type RegistryEntry = MethodEntry | RuleEntry;
