import type { Reference, RegistryEntry } from './types.ts';
import {
  HARMAN_1976,
  LORD_NOVICK_1968,
  MCDONALD_1999,
  NUNNALLY_BERNSTEIN_1994,
  SPEARMAN_1904,
} from './references.ts';

const CRONBACH_1951: Reference = {
  authors: ['Cronbach, L. J.'],
  year: 1951,
  title: 'Coefficient alpha and the internal structure of tests',
  container: 'Psychometrika',
  volume: '16',
  issue: '3',
  pages: '297–334',
  doi: '10.1007/BF02310555',
};

const SPEARMAN_1910: Reference = {
  authors: ['Spearman, C.'],
  year: 1910,
  title: 'Correlation calculated from faulty data',
  container: 'British Journal of Psychology',
  volume: '3',
  issue: '3',
  pages: '271–295',
  doi: '10.1111/j.2044-8295.1910.tb00206.x',
};

const BROWN_1910: Reference = {
  authors: ['Brown, W.'],
  year: 1910,
  title: 'Some experimental results in the correlation of mental abilities',
  container: 'British Journal of Psychology',
  volume: '3',
  issue: '3',
  pages: '296–322',
  doi: '10.1111/j.2044-8295.1910.tb00207.x',
};

/** Reliability: coefficients, intervals, item statistics and the rules of thumb shown beside them. */
export const RELIABILITY_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'alpha.cronbach',
    name: "Cronbach's alpha",
    references: [CRONBACH_1951],
  },
  {
    kind: 'method',
    id: 'alpha.standardized',
    name: 'Standardized alpha (from the mean inter-item correlation)',
    references: [CRONBACH_1951],
  },
  {
    kind: 'method',
    id: 'alpha.if-item-deleted',
    name: 'Alpha if item deleted',
    references: [CRONBACH_1951, NUNNALLY_BERNSTEIN_1994],
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
    id: 'alpha.bootstrap-ci',
    name: 'Bootstrap percentile confidence interval',
    references: [
      {
        authors: ['Efron, B.', 'Tibshirani, R. J.'],
        year: 1993,
        title: 'An introduction to the bootstrap',
        publisher: 'Chapman & Hall',
      },
    ],
  },
  {
    kind: 'method',
    id: 'omega.total',
    name: "McDonald's omega total",
    references: [MCDONALD_1999],
  },
  {
    kind: 'method',
    id: 'omega.one-factor-fit',
    name: 'One-factor model by iterated principal axes (for omega)',
    references: [HARMAN_1976],
  },
  {
    kind: 'method',
    id: 'split-half.spearman-brown',
    name: 'Split-half reliability with the Spearman–Brown correction',
    references: [SPEARMAN_1910, BROWN_1910],
  },
  {
    kind: 'method',
    id: 'spearman-brown.prophecy',
    name: 'Spearman–Brown prophecy formula',
    references: [SPEARMAN_1910, BROWN_1910],
  },
  {
    kind: 'method',
    id: 'sem.classical',
    name: 'Standard error of measurement',
    references: [LORD_NOVICK_1968],
  },
  {
    kind: 'method',
    id: 'sem.mdc95',
    name: 'Minimal detectable change (MDC95 = 1.96·√2·SEM)',
    references: [
      {
        authors: ['Weir, J. P.'],
        year: 2005,
        title: 'Quantifying test-retest reliability using the intraclass correlation coefficient and the SEM',
        container: 'Journal of Strength and Conditioning Research',
        volume: '19',
        issue: '1',
        pages: '231–240',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'attenuation.spearman',
    name: 'Correction for attenuation',
    references: [SPEARMAN_1904],
  },
  {
    kind: 'method',
    id: 'items.corrected-item-total',
    name: 'Corrected item-total correlation',
    references: [NUNNALLY_BERNSTEIN_1994],
  },
  {
    kind: 'rule',
    id: 'items.kurtosis',
    name: 'Excess kurtosis of an item',
    wording: 'An item whose excess kurtosis exceeds 7 in absolute value is far from normal in its tails.',
    thresholds: { maxAbs: 7 },
    references: [
      {
        authors: ['West, S. G.', 'Finch, J. F.', 'Curran, P. J.'],
        year: 1995,
        title: 'Structural equation models with nonnormal variables: Problems and remedies',
        container: 'Structural equation modeling: Concepts, issues, and applications (R. H. Hoyle, Ed.)',
        pages: '56–75',
        publisher: 'Sage',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'items.descriptives',
    name: 'Item mean, SD, skewness and excess kurtosis (bias-adjusted sample estimators)',
    references: [
      {
        authors: ['Joanes, D. N.', 'Gill, C. A.'],
        year: 1998,
        title: 'Comparing measures of sample skewness and kurtosis',
        container: 'Journal of the Royal Statistical Society: Series D (The Statistician)',
        volume: '47',
        issue: '1',
        pages: '183–189',
        doi: '10.1111/1467-9884.00122',
      },
    ],
  },
  {
    kind: 'method',
    id: 'scoring.reverse-keying',
    name: 'Reverse keying with the declared scale bounds (min + max − x)',
    commonPractice: true,
    references: [],
  },
  {
    kind: 'method',
    id: 'scoring.sum-and-mean',
    name: 'Sum and mean scale scores',
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'reliability.few-respondents',
    name: 'Too few respondents for stable reliability estimates',
    wording: 'Reliability estimates from fewer than 30 respondents are unstable.',
    thresholds: { minimum: 30 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'bootstrap.minimum-resamples',
    name: 'Minimum bootstrap resamples',
    wording:
      'A percentile interval rests on the resamples in its tails; with fewer than 200 only a handful lie beyond the 2.5th and 97.5th percentiles (about 1,000 or more is the usual advice for intervals).',
    thresholds: { minimum: 200 },
    commonPractice: true,
    references: [],
  },
];
