import type { Reference } from './types.ts';

/**
 * References cited by more than one area of the registry, written once. Whether a reference's
 * details were recalled rather than checked (`fromMemory`) is said here, on the reference itself, so
 * every area cites it with the same mark.
 */

export const HARMAN_1976: Reference = {
  authors: ['Harman, H. H.'],
  year: 1976,
  title: 'Modern factor analysis',
  edition: '3rd',
  publisher: 'University of Chicago Press',
  fromMemory: true,
};

export const LORD_NOVICK_1968: Reference = {
  authors: ['Lord, F. M.', 'Novick, M. R.'],
  year: 1968,
  title: 'Statistical theories of mental test scores',
  publisher: 'Addison-Wesley',
  fromMemory: true,
};

export const MCDONALD_1999: Reference = {
  authors: ['McDonald, R. P.'],
  year: 1999,
  title: 'Test theory: A unified treatment',
  publisher: 'Lawrence Erlbaum Associates',
  fromMemory: true,
};

export const NUNNALLY_BERNSTEIN_1994: Reference = {
  authors: ['Nunnally, J. C.', 'Bernstein, I. H.'],
  year: 1994,
  title: 'Psychometric theory',
  edition: '3rd',
  publisher: 'McGraw-Hill',
};

export const PEARSON_1896: Reference = {
  authors: ['Pearson, K.'],
  year: 1896,
  title: 'Mathematical contributions to the theory of evolution. III. Regression, heredity, and panmixia',
  container: 'Philosophical Transactions of the Royal Society of London, Series A',
  volume: '187',
  pages: '253–318',
  doi: '10.1098/rsta.1896.0007',
};

export const SPEARMAN_1904: Reference = {
  authors: ['Spearman, C.'],
  year: 1904,
  title: 'The proof and measurement of association between two things',
  container: 'American Journal of Psychology',
  volume: '15',
  issue: '1',
  pages: '72–101',
  doi: '10.2307/1412159',
};
