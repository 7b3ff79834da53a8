import type { ReactElement } from 'react';
import { ReviewScreen } from './ReviewScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const reviewScreen: (() => ReactElement) | undefined = ReviewScreen;
