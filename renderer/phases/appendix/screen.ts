import type { ReactElement } from 'react';
import { AppendixScreen } from './AppendixScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const appendixScreen: (() => ReactElement) | undefined = AppendixScreen;
