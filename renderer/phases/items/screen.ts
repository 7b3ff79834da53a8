import type { ReactElement } from 'react';
import { ItemsScreen } from './ItemsScreen.tsx';

/** This phase's screen (see renderer/app/phase-screens.ts). */
export const itemsScreen: (() => ReactElement) | undefined = ItemsScreen;
