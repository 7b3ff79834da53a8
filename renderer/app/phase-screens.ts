import type { ReactElement } from 'react';
import type { PhaseId } from '../../app/api/contracts/phases.ts';
import { appendixScreen } from '../phases/appendix/screen.ts';
import { ConstructScreen } from '../phases/construct/ConstructScreen.tsx';
import { itemsScreen } from '../phases/items/screen.ts';
import { pilotScreen } from '../phases/pilot/screen.ts';
import { purificationScreen } from '../phases/purification/screen.ts';
import { reviewScreen } from '../phases/review/screen.ts';
import { validityScreen } from '../phases/validity/screen.ts';

/** The screen of each phase; a phase without one shows what it will need. */
export const PHASE_SCREENS: Partial<Record<PhaseId, () => ReactElement>> = {
  construct: ConstructScreen,
  items: itemsScreen,
  review: reviewScreen,
  pilot: pilotScreen,
  purification: purificationScreen,
  appendix: appendixScreen,
  validity: validityScreen,
};
