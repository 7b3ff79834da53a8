import type { Reference, RegistryEntry } from './types.ts';
import { LORD_NOVICK_1968, PEARSON_1896, SPEARMAN_1904 } from './references.ts';

const JORESKOG_1969: Reference = {
  authors: ['Jöreskog, K. G.'],
  year: 1969,
  title: 'A general approach to confirmatory maximum likelihood factor analysis',
  container: 'Psychometrika',
  volume: '34',
  issue: '2',
  pages: '183–202',
  doi: '10.1007/BF02289343',
};
const HU_BENTLER_1999: Reference = {
  authors: ['Hu, L.', 'Bentler, P. M.'],
  year: 1999,
  title:
    'Cutoff criteria for fit indexes in covariance structure analysis: Conventional criteria versus new alternatives',
  container: 'Structural Equation Modeling',
  volume: '6',
  issue: '1',
  pages: '1–55',
  doi: '10.1080/10705519909540118',
  fromMemory: true,
};
const BROWNE_CUDECK_1993: Reference = {
  authors: ['Browne, M. W.', 'Cudeck, R.'],
  year: 1993,
  title: 'Alternative ways of assessing model fit',
  container: 'Testing structural equation models (K. A. Bollen & J. S. Long, Eds.)',
  pages: '136–162',
  publisher: 'Sage',
};
const FORNELL_LARCKER_1981: Reference = {
  authors: ['Fornell, C.', 'Larcker, D. F.'],
  year: 1981,
  title: 'Evaluating structural equation models with unobservable variables and measurement error',
  container: 'Journal of Marketing Research',
  volume: '18',
  issue: '1',
  pages: '39–50',
  doi: '10.1177/002224378101800104',
};
const COHEN_1988: Reference = {
  authors: ['Cohen, J.'],
  year: 1988,
  title: 'Statistical power analysis for the behavioral sciences',
  edition: '2nd',
  publisher: 'Lawrence Erlbaum Associates',
};
const SHROUT_FLEISS_1979: Reference = {
  authors: ['Shrout, P. E.', 'Fleiss, J. L.'],
  year: 1979,
  title: 'Intraclass correlations: Uses in assessing rater reliability',
  container: 'Psychological Bulletin',
  volume: '86',
  issue: '2',
  pages: '420–428',
  doi: '10.1037/0033-2909.86.2.420',
};
const MCGRAW_WONG_1996: Reference = {
  authors: ['McGraw, K. O.', 'Wong, S. P.'],
  year: 1996,
  title: 'Forming inferences about some intraclass correlation coefficients',
  container: 'Psychological Methods',
  volume: '1',
  issue: '1',
  pages: '30–46',
  doi: '10.1037/1082-989X.1.1.30',
};

/**
 * Validity evidence: confirmatory factor analysis and its fit, reliability from loadings,
 * discriminant validity, invariance, relations to other variables, known groups, and test–retest and
 * inter-rater reliability.
 */
export const VALIDITY_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'validity.standards',
    name: 'Sources of validity evidence',
    references: [
      {
        authors: [
          'American Educational Research Association',
          'American Psychological Association',
          'National Council on Measurement in Education',
        ],
        year: 2014,
        title: 'Standards for educational and psychological testing',
        publisher: 'American Educational Research Association',
      },
    ],
  },
  {
    kind: 'method',
    id: 'cfa.ml',
    name: 'Maximum-likelihood confirmatory factor analysis',
    references: [
      JORESKOG_1969,
      {
        authors: ['Lee, S.-Y.', 'Jennrich, R. I.'],
        year: 1979,
        title:
          'A study of algorithms for covariance structure analysis with specific comparisons using factor analysis',
        container: 'Psychometrika',
        volume: '44',
        issue: '1',
        pages: '99–113',
        doi: '10.1007/BF02293789',
      },
    ],
  },
  {
    kind: 'method',
    id: 'cfa.chi-square',
    name: 'Likelihood-ratio χ² test of model fit',
    references: [JORESKOG_1969],
  },
  {
    kind: 'method',
    id: 'fit.cfi',
    name: 'Comparative fit index (CFI)',
    references: [
      {
        authors: ['Bentler, P. M.'],
        year: 1990,
        title: 'Comparative fit indexes in structural models',
        container: 'Psychological Bulletin',
        volume: '107',
        issue: '2',
        pages: '238–246',
        doi: '10.1037/0033-2909.107.2.238',
      },
    ],
  },
  {
    kind: 'method',
    id: 'fit.tli',
    name: 'Tucker–Lewis index (TLI)',
    references: [
      {
        authors: ['Tucker, L. R.', 'Lewis, C.'],
        year: 1973,
        title: 'A reliability coefficient for maximum likelihood factor analysis',
        container: 'Psychometrika',
        volume: '38',
        issue: '1',
        pages: '1–10',
        doi: '10.1007/BF02291170',
      },
    ],
  },
  {
    kind: 'method',
    id: 'rmsea.steiger',
    name: 'Root mean square error of approximation (RMSEA) with 90% interval',
    references: [
      {
        authors: ['Steiger, J. H.'],
        year: 1990,
        title: 'Structural model evaluation and modification: An interval estimation approach',
        container: 'Multivariate Behavioral Research',
        volume: '25',
        issue: '2',
        pages: '173–180',
        doi: '10.1207/s15327906mbr2502_4',
      },
      BROWNE_CUDECK_1993,
    ],
  },
  {
    kind: 'method',
    id: 'fit.srmr',
    name: 'Standardized root mean square residual (SRMR)',
    references: [HU_BENTLER_1999],
  },
  {
    kind: 'rule',
    id: 'cfa.cutoffs',
    name: 'Fit index cut-offs',
    wording: 'Good fit: CFI and TLI at least .95, RMSEA at most .06, SRMR at most .08.',
    thresholds: { cfi: 0.95, tli: 0.95, rmsea: 0.06, srmr: 0.08 },
    references: [HU_BENTLER_1999],
  },
  {
    kind: 'rule',
    id: 'rmsea.bands',
    name: 'RMSEA bands',
    wording: 'RMSEA at most .05 indicates close fit, at most .08 reasonable fit.',
    thresholds: { close: 0.05, reasonable: 0.08 },
    references: [BROWNE_CUDECK_1993],
  },
  {
    kind: 'method',
    id: 'cfa.modification-indices',
    name: 'Modification indices and expected parameter change',
    references: [
      {
        authors: ['Sörbom, D.'],
        year: 1989,
        title: 'Model modification',
        container: 'Psychometrika',
        volume: '54',
        issue: '3',
        pages: '371–384',
        doi: '10.1007/BF02294623',
      },
    ],
  },
  {
    kind: 'method',
    id: 'cr.composite',
    name: 'Composite reliability',
    references: [
      {
        authors: ['Jöreskog, K. G.'],
        year: 1971,
        title: 'Statistical analysis of sets of congeneric tests',
        container: 'Psychometrika',
        volume: '36',
        issue: '2',
        pages: '109–133',
        doi: '10.1007/BF02291393',
      },
      FORNELL_LARCKER_1981,
    ],
  },
  { kind: 'method', id: 'ave', name: 'Average variance extracted (AVE)', references: [FORNELL_LARCKER_1981] },
  {
    kind: 'rule',
    id: 'fornell-larcker',
    name: 'Fornell–Larcker criterion',
    wording:
      "A factor's AVE is at least .50, and the square root of its AVE exceeds its correlation with every other factor.",
    thresholds: { aveMinimum: 0.5 },
    references: [FORNELL_LARCKER_1981],
  },
  {
    kind: 'rule',
    id: 'cr.criterion',
    name: 'Composite reliability criterion',
    wording: 'Composite reliability of at least .70.',
    thresholds: { minimum: 0.7 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'htmt',
    name: 'Heterotrait–monotrait ratio (HTMT)',
    wording: 'Two factors are distinct when their HTMT is below .85 (strict) or below .90 (lenient).',
    thresholds: { strict: 0.85, lenient: 0.9 },
    references: [
      {
        authors: ['Henseler, J.', 'Ringle, C. M.', 'Sarstedt, M.'],
        year: 2015,
        title:
          'A new criterion for assessing discriminant validity in variance-based structural equation modeling',
        container: 'Journal of the Academy of Marketing Science',
        volume: '43',
        issue: '1',
        pages: '115–135',
        doi: '10.1007/s11747-014-0403-8',
      },
    ],
  },
  {
    kind: 'method',
    id: 'cfa.invariance',
    name: 'Measurement invariance: configural, metric and scalar models',
    references: [
      {
        authors: ['Meredith, W.'],
        year: 1993,
        title: 'Measurement invariance, factor analysis and factorial invariance',
        container: 'Psychometrika',
        volume: '58',
        issue: '4',
        pages: '525–543',
        doi: '10.1007/BF02294825',
      },
    ],
  },
  {
    kind: 'rule',
    id: 'invariance.delta-cfi',
    name: 'ΔCFI criterion for invariance',
    wording: 'A step of the invariance sequence holds when CFI drops by at most .01 from the step before.',
    thresholds: { maximumDrop: 0.01 },
    references: [
      {
        authors: ['Cheung, G. W.', 'Rensvold, R. B.'],
        year: 2002,
        title: 'Evaluating goodness-of-fit indexes for testing measurement invariance',
        container: 'Structural Equation Modeling',
        volume: '9',
        issue: '2',
        pages: '233–255',
        doi: '10.1207/S15328007SEM0902_5',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'correlation.pearson',
    name: 'Pearson correlation',
    references: [PEARSON_1896],
  },
  {
    kind: 'method',
    id: 'correlation.fisher-z',
    name: 'Fisher-z confidence interval of a correlation',
    references: [
      {
        authors: ['Fisher, R. A.'],
        year: 1921,
        title: 'On the "probable error" of a coefficient of correlation deduced from a small sample',
        container: 'Metron',
        volume: '1',
        pages: '3–32',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'validity.disattenuation',
    name: 'Correction for attenuation',
    references: [SPEARMAN_1904],
  },
  {
    kind: 'method',
    id: 'regression.ols',
    name: 'Least-squares regression of a criterion on the scale score',
    references: [
      {
        authors: ['Draper, N. R.', 'Smith, H.'],
        year: 1998,
        title: 'Applied regression analysis',
        edition: '3rd',
        publisher: 'Wiley',
      },
    ],
  },
  {
    kind: 'method',
    id: 't.welch',
    name: "Welch's t test",
    references: [
      {
        authors: ['Welch, B. L.'],
        year: 1947,
        title:
          "The generalization of 'Student's' problem when several different population variances are involved",
        container: 'Biometrika',
        volume: '34',
        issue: '1–2',
        pages: '28–35',
        doi: '10.1093/biomet/34.1-2.28',
      },
    ],
  },
  { kind: 'method', id: 'd.cohen', name: "Cohen's d", references: [COHEN_1988] },
  {
    kind: 'method',
    id: 'g.hedges',
    name: "Hedges' g",
    references: [
      {
        authors: ['Hedges, L. V.'],
        year: 1981,
        title: "Distribution theory for Glass's estimator of effect size and related estimators",
        container: 'Journal of Educational Statistics',
        volume: '6',
        issue: '2',
        pages: '107–128',
        doi: '10.3102/10769986006002107',
      },
    ],
  },
  {
    kind: 'method',
    id: 'anova.one-way',
    name: 'One-way analysis of variance',
    references: [
      {
        authors: ['Fisher, R. A.'],
        year: 1925,
        title: 'Statistical methods for research workers',
        publisher: 'Oliver and Boyd',
      },
    ],
  },
  {
    kind: 'rule',
    id: 'effect.bands',
    name: 'Effect size bands',
    wording:
      'Correlations of .10, .30 and .50, and standardized mean differences of .20, .50 and .80, are weak, moderate and strong.',
    thresholds: { rWeak: 0.1, rModerate: 0.3, rStrong: 0.5, dWeak: 0.2, dModerate: 0.5, dStrong: 0.8 },
    commonPractice: true,
    references: [COHEN_1988],
  },
  {
    kind: 'method',
    id: 'validity.hypotheses',
    name: 'Testing construct validity hypotheses stated in advance',
    references: [
      {
        authors: ['Cronbach, L. J.', 'Meehl, P. E.'],
        year: 1955,
        title: 'Construct validity in psychological tests',
        container: 'Psychological Bulletin',
        volume: '52',
        issue: '4',
        pages: '281–302',
        doi: '10.1037/h0040957',
      },
      {
        authors: ['Campbell, D. T.', 'Fiske, D. W.'],
        year: 1959,
        title: 'Convergent and discriminant validation by the multitrait-multimethod matrix',
        container: 'Psychological Bulletin',
        volume: '56',
        issue: '2',
        pages: '81–105',
        doi: '10.1037/h0046016',
      },
    ],
  },
  {
    kind: 'rule',
    id: 'scoring.reverse-keys',
    name: 'Reverse keying from declared bounds',
    wording: 'A reverse-keyed answer x is scored min + max − x with the scale’s declared bounds.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'method',
    id: 'icc.shrout-fleiss',
    name: 'Intraclass correlations (six forms)',
    references: [SHROUT_FLEISS_1979],
  },
  {
    kind: 'method',
    id: 'icc.mcgraw-wong-ci',
    name: 'Confidence intervals and F tests of intraclass correlations',
    references: [MCGRAW_WONG_1996],
  },
  {
    kind: 'method',
    id: 'icc.sem',
    name: 'Standard error of measurement from test–retest reliability',
    references: [LORD_NOVICK_1968],
  },
  {
    kind: 'rule',
    id: 'icc.mdc95',
    name: 'Minimal detectable change (95%)',
    wording:
      'A change smaller than 1.96·√2·SEM cannot be told apart from measurement error with 95% confidence.',
    thresholds: { z: 1.96 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'method',
    id: 'rmsea.multigroup',
    name: 'RMSEA of a multi-group model (√G convention: √(G·max(χ² − df, 0)/(df·(N − G))))',
    references: [
      {
        authors: ['Steiger, J. H.'],
        year: 1998,
        title: 'A note on multiple sample extensions of the RMSEA fit index',
        container: 'Structural Equation Modeling',
        volume: '5',
        issue: '4',
        pages: '411–419',
        doi: '10.1080/10705519809540115',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'rule',
    id: 'invariance.partial',
    name: 'Constraints to consider freeing for partial invariance',
    wording:
      'When a step of the invariance sequence fails, the loadings (metric step) or intercepts (scalar step) whose estimates differ most between the groups in the configural model are the first candidates to free (the 5 largest are listed), one at a time, keeping at least 2 invariant items per factor.',
    thresholds: { candidates: 5, invariantItemsPerFactor: 2 },
    references: [
      {
        authors: ['Byrne, B. M.', 'Shavelson, R. J.', 'Muthén, B.'],
        year: 1989,
        title:
          'Testing for the equivalence of factor covariance and mean structures: The issue of partial measurement invariance',
        container: 'Psychological Bulletin',
        volume: '105',
        issue: '3',
        pages: '456–466',
        doi: '10.1037/0033-2909.105.3.456',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'rule',
    id: 'cfa.residual-hint',
    name: 'Freeing a residual covariance',
    wording:
      'A residual covariance suggested by a modification index is freed only when a reason outside the data explains it (shared wording, a shared situation, adjacent position); the reason is recorded with the model.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
];
