import type { ReactElement } from 'react';
import { ValidityScreen } from './ValidityScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const validityScreen: (() => ReactElement) | undefined = ValidityScreen;
