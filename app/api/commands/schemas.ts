import { z } from 'zod';
import { PHASE_IDS } from '../../../db/repos/phase-state.ts';

/** Pieces of input schema shared by several commands. */
export const id = z.number().int().positive();
export const text = (max: number) => z.string().max(max);
export const rationale = z.string().trim().min(1, 'a rationale is required').max(10_000);
export const phase = z.enum(PHASE_IDS);
