/** Why a study file could not be opened or written. The message is shown to the user as is. */
export type StudyFileProblem =
  | 'not-found'
  | 'not-readable'
  | 'exists'
  | 'not-sqlite'
  | 'not-a-study'
  | 'corrupt'
  | 'interrupted'
  | 'foreign-wal'
  | 'not-writable'
  | 'newer-version'
  | 'older-version'
  | 'locked'
  | 'read-only';

export class StudyFileError extends Error {
  override name = 'StudyFileError';
  constructor(
    readonly problem: StudyFileProblem,
    message: string,
  ) {
    super(message);
  }
}
