import type { ReactElement } from 'react';

/** This phase's screen, once it exists (see renderer/app/phase-screens.ts). */
export const itemsScreen: (() => ReactElement) | undefined = undefined;
