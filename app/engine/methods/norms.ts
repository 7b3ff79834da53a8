import type { RegistryEntry } from './types.ts';

/** Norms from a sample and the scoring rule of a final instrument. */
export const NORMS_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'norms.percentile-rank',
    name: 'Percentile rank (mid-point definition)',
    references: [
      {
        authors: ['Crocker, L.', 'Algina, J.'],
        year: 1986,
        title: 'Introduction to classical and modern test theory',
        publisher: 'Holt, Rinehart and Winston',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'norms.standard-scores',
    name: 'z scores from the sample mean and SD (divisor n − 1), and T = 50 + 10z',
    references: [
      {
        authors: ['McCall, W. A.'],
        year: 1922,
        title: 'How to measure in education',
        publisher: 'Macmillan',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'scoring.prorated',
    name: 'Scale score from the answered items when enough were answered (mean of the answered items; a sum is that mean times the number of items)',
    commonPractice: true,
    references: [],
  },
];
