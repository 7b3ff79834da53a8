/**
 * The pilot data screens: reading settings, column roles and mapping, previews, checks, datasets, missing data and screening.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { ReadCheck } from '../commands/pilot.ts';
export type { ScreeningCheck } from '../../engine/screening.ts';
export type { ColumnMapping, ColumnRole, RoleName } from '../../import/mapping.ts';
export type { ReadSettings } from '../../import/read-data-file.ts';
export type {
  DataFilePreview,
  DatasetListEntry,
  MissingData,
  ScreenedRespondent,
} from '../../phases/pilot/index.ts';
export type { DatasetRole } from '../../../db/repos/datasets.ts';
