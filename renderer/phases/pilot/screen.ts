import type { ReactElement } from 'react';
import { PilotScreen } from './PilotScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const pilotScreen: (() => ReactElement) | undefined = PilotScreen;
