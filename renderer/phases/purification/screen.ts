import type { ReactElement } from 'react';
import { PurificationScreen } from './PurificationScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const purificationScreen: (() => ReactElement) | undefined = PurificationScreen;
