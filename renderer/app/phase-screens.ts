import type { ReactElement } from 'react';
import type { PhaseId } from '../../db/repos/phase-state.ts';
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
  validity: validityScreen,
};
