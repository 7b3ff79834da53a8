import type { Reference, RegistryEntry } from './types.ts';
import { PEARSON_1896 } from './references.ts';

const GOLUB_VAN_LOAN_2013: Reference = {
  authors: ['Golub, G. H.', 'Van Loan, C. F.'],
  year: 2013,
  title: 'Matrix computations',
  edition: '4th',
  publisher: 'Johns Hopkins University Press',
};

/**
 * Numerical building blocks the statistics rest on: decompositions, correlations, missing data (the
 * symmetric eigendecomposition and smoothing live with factor analysis).
 */
export const NUMERICS_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'linalg.lu',
    name: 'LU decomposition with partial pivoting',
    references: [GOLUB_VAN_LOAN_2013],
  },
  {
    kind: 'method',
    id: 'linalg.cholesky',
    name: 'Cholesky decomposition',
    references: [GOLUB_VAN_LOAN_2013],
  },
  {
    kind: 'method',
    id: 'corr.pearson',
    name: 'Pearson product-moment correlation',
    references: [PEARSON_1896],
  },
  {
    kind: 'method',
    id: 'missing.deletion',
    name: 'Listwise and pairwise deletion',
    references: [
      {
        authors: ['Little, R. J. A.', 'Rubin, D. B.'],
        year: 2002,
        title: 'Statistical analysis with missing data',
        edition: '2nd',
        publisher: 'Wiley',
      },
    ],
  },
];
