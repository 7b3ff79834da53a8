import type { RegistryEntry } from './types.ts';

/** Reliability: coefficients, intervals and the criteria shown beside them. */
export const RELIABILITY_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'alpha.cronbach',
    name: "Cronbach's alpha",
    references: [
      {
        authors: ['Cronbach, L. J.'],
        year: 1951,
        title: 'Coefficient alpha and the internal structure of tests',
        container: 'Psychometrika',
        volume: '16',
        issue: '3',
        pages: '297–334',
        doi: '10.1007/BF02310555',
      },
    ],
  },
  {
    kind: 'method',
    id: 'alpha.feldt-ci',
    name: "Feldt's confidence interval for alpha",
    references: [
      {
        authors: ['Feldt, L. S.'],
        year: 1965,
        title: 'The approximate sampling distribution of Kuder-Richardson reliability coefficient twenty',
        container: 'Psychometrika',
        volume: '30',
        issue: '3',
        pages: '357–370',
        doi: '10.1007/BF02289499',
      },
    ],
  },
  {
    kind: 'method',
    id: 'omega.total',
    name: "McDonald's omega total",
    references: [
      {
        authors: ['McDonald, R. P.'],
        year: 1999,
        title: 'Test theory: A unified treatment',
        publisher: 'Lawrence Erlbaum Associates',
      },
    ],
  },
];
