import type { Reference, RegistryEntry } from './types.ts';
import { HARMAN_1976, MCDONALD_1999 } from './references.ts';

/** Every reference below was written down from recall, not checked against the publication. */
function ref(
  authors: string[],
  year: number,
  title: string,
  rest: Omit<Reference, 'authors' | 'year' | 'title'> = {},
): Reference {
  return { authors, year, title, ...rest, fromMemory: true };
}

const KAISER_1958 = ref(
  ['Kaiser, H. F.'],
  1958,
  'The varimax criterion for analytic rotation in factor analysis',
  {
    container: 'Psychometrika',
    volume: '23',
    issue: '3',
    pages: '187–200',
  },
);
const GUTTMAN_1945 = ref(['Guttman, L.'], 1945, 'A basis for analyzing test-retest reliability', {
  container: 'Psychometrika',
  volume: '10',
  issue: '4',
  pages: '255–282',
});
const KAISER_1970 = ref(['Kaiser, H. F.'], 1970, 'A second generation little jiffy', {
  container: 'Psychometrika',
  volume: '35',
  issue: '4',
  pages: '401–415',
});
const KAISER_RICE_1974 = ref(['Kaiser, H. F.', 'Rice, J.'], 1974, 'Little jiffy, mark IV', {
  container: 'Educational and Psychological Measurement',
  volume: '34',
  issue: '1',
  pages: '111–117',
});
const KAISER_1974 = ref(['Kaiser, H. F.'], 1974, 'An index of factorial simplicity', {
  container: 'Psychometrika',
  volume: '39',
  issue: '1',
  pages: '31–36',
});
const HORN_1965 = ref(
  ['Horn, J. L.'],
  1965,
  'A rationale and test for the number of factors in factor analysis',
  {
    container: 'Psychometrika',
    volume: '30',
    issue: '2',
    pages: '179–185',
  },
);
const GLORFELD_1995 = ref(
  ['Glorfeld, L. W.'],
  1995,
  "An improvement on Horn's parallel analysis methodology for selecting the correct number of factors to retain",
  { container: 'Educational and Psychological Measurement', volume: '55', issue: '3', pages: '377–393' },
);
const LAWLEY_MAXWELL_1971 = ref(
  ['Lawley, D. N.', 'Maxwell, A. E.'],
  1971,
  'Factor analysis as a statistical method',
  {
    edition: '2nd',
    publisher: 'Butterworths',
  },
);
const JENNRICH_2001 = ref(['Jennrich, R. I.'], 2001, 'A simple general procedure for orthogonal rotation', {
  container: 'Psychometrika',
  volume: '66',
  issue: '2',
  pages: '289–306',
});
const JENNRICH_2002 = ref(['Jennrich, R. I.'], 2002, 'A simple general method for oblique rotation', {
  container: 'Psychometrika',
  volume: '67',
  issue: '1',
  pages: '7–19',
});
const BERNAARDS_JENNRICH_2005 = ref(
  ['Bernaards, C. A.', 'Jennrich, R. I.'],
  2005,
  'Gradient projection algorithms and software for arbitrary rotation criteria in factor analysis',
  { container: 'Educational and Psychological Measurement', volume: '65', issue: '5', pages: '676–696' },
);
const BROWNE_2001 = ref(
  ['Browne, M. W.'],
  2001,
  'An overview of analytic rotation in exploratory factor analysis',
  {
    container: 'Multivariate Behavioral Research',
    volume: '36',
    issue: '1',
    pages: '111–150',
  },
);
/** Dimensionality, exploratory factor analysis, rotation, polychoric correlations and their omegas. */
export const FACTOR_ANALYSIS_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'linalg.symmetric-eigen',
    name: 'Symmetric eigenvalues by Householder tridiagonalization and implicit QL',
    references: [
      ref(
        ['Bowdler, H.', 'Martin, R. S.', 'Reinsch, C.', 'Wilkinson, J. H.'],
        1968,
        'The QR and QL algorithms for symmetric matrices',
        {
          container: 'Numerische Mathematik',
          volume: '11',
          issue: '4',
          pages: '293–306',
        },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'linalg.smoothing',
    name: 'Smoothing a non-positive-definite correlation matrix by eigenvalue clipping',
    references: [
      ref(['Wothke, W.'], 1993, 'Nonpositive definite matrices in structural modeling', {
        container: 'Testing structural equation models (K. A. Bollen & J. S. Long, Eds.)',
        pages: '256–293',
        publisher: 'Sage',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.smc',
    name: 'Squared multiple correlations as communality estimates',
    references: [
      ref(['Guttman, L.'], 1956, '"Best possible" systematic estimates of communalities', {
        container: 'Psychometrika',
        volume: '21',
        issue: '3',
        pages: '273–285',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.kmo',
    name: 'Kaiser–Meyer–Olkin measure of sampling adequacy (KMO and per-item MSA)',
    references: [KAISER_1970, KAISER_RICE_1974],
  },
  {
    kind: 'rule',
    id: 'efa.kmo-labels',
    name: "Kaiser's labels for KMO",
    wording:
      'KMO of .90 or more is marvelous, .80s meritorious, .70s middling, .60s mediocre, .50s miserable, below .50 unacceptable.',
    thresholds: { marvelous: 0.9, meritorious: 0.8, middling: 0.7, mediocre: 0.6, miserable: 0.5 },
    references: [KAISER_1974],
  },
  {
    kind: 'method',
    id: 'efa.bartlett',
    name: "Bartlett's test of sphericity",
    references: [
      ref(['Bartlett, M. S.'], 1950, 'Tests of significance in factor analysis', {
        container: 'British Journal of Psychology (Statistical Section)',
        volume: '3',
        issue: '2',
        pages: '77–85',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.kaiser',
    name: "Kaiser's eigenvalue-greater-than-one rule",
    references: [
      ref(['Kaiser, H. F.'], 1960, 'The application of electronic computers to factor analysis', {
        container: 'Educational and Psychological Measurement',
        volume: '20',
        issue: '1',
        pages: '141–151',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.map',
    name: "Velicer's minimum average partial test",
    references: [
      ref(
        ['Velicer, W. F.'],
        1976,
        'Determining the number of components from the matrix of partial correlations',
        {
          container: 'Psychometrika',
          volume: '41',
          issue: '3',
          pages: '321–327',
        },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'efa.map-fourth',
    name: 'Minimum average partial test with 4th powers',
    references: [
      ref(
        ['Velicer, W. F.', 'Eaton, C. A.', 'Fava, J. L.'],
        2000,
        'Construct explication through factor or component analysis: A review and evaluation of alternative procedures for determining the number of factors or components',
        {
          container: 'Problems and solutions in human assessment (R. D. Goffin & E. Helmes, Eds.)',
          pages: '41–71',
          publisher: 'Kluwer',
        },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'efa.parallel',
    name: "Horn's parallel analysis (components, percentile criterion)",
    references: [HORN_1965, GLORFELD_1995],
  },
  {
    kind: 'method',
    id: 'efa.parallel-factors',
    name: 'Parallel analysis for common factors (squared multiple correlations on the diagonal)',
    references: [
      ref(
        ['Humphreys, L. G.', 'Ilgen, D. R.'],
        1969,
        'Note on a criterion for the number of common factors',
        {
          container: 'Educational and Psychological Measurement',
          volume: '29',
          issue: '3',
          pages: '571–578',
        },
      ),
      HORN_1965,
    ],
  },
  {
    kind: 'method',
    id: 'rng.wishart-bartlett',
    name: "Wishart matrices by Bartlett's decomposition",
    references: [
      ref(['Smith, W. B.', 'Hocking, R. R.'], 1972, 'Algorithm AS 53: Wishart variate generator', {
        container: 'Journal of the Royal Statistical Society, Series C (Applied Statistics)',
        volume: '21',
        issue: '3',
        pages: '341–345',
      }),
      ref(['Marsaglia, G.', 'Tsang, W. W.'], 2000, 'A simple method for generating gamma variables', {
        container: 'ACM Transactions on Mathematical Software',
        volume: '26',
        issue: '3',
        pages: '363–372',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.paf',
    name: 'Iterated principal axis factoring',
    references: [HARMAN_1976],
  },
  {
    kind: 'method',
    id: 'efa.minres',
    name: 'Minimum residual (unweighted least squares) factoring',
    references: [
      ref(['Harman, H. H.', 'Jones, W. H.'], 1966, 'Factor analysis by minimizing residuals (minres)', {
        container: 'Psychometrika',
        volume: '31',
        issue: '3',
        pages: '351–368',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'efa.ml',
    name: 'Maximum likelihood factor analysis',
    references: [
      ref(['Jöreskog, K. G.'], 1967, 'Some contributions to maximum likelihood factor analysis', {
        container: 'Psychometrika',
        volume: '32',
        issue: '4',
        pages: '443–482',
      }),
      LAWLEY_MAXWELL_1971,
    ],
  },
  {
    kind: 'method',
    id: 'efa.ml-chisquare',
    name: 'Likelihood-ratio χ² of the factor model with Bartlett’s correction',
    references: [LAWLEY_MAXWELL_1971],
  },
  {
    kind: 'method',
    id: 'rotation.varimax',
    name: 'Varimax rotation',
    references: [KAISER_1958, JENNRICH_2001],
  },
  {
    kind: 'method',
    id: 'rotation.quartimax',
    name: 'Quartimax rotation',
    references: [
      ref(
        ['Neuhaus, J. O.', 'Wrigley, C.'],
        1954,
        'The quartimax method: An analytical approach to orthogonal simple structure',
        {
          container: 'British Journal of Statistical Psychology',
          volume: '7',
          issue: '2',
          pages: '81–91',
        },
      ),
      JENNRICH_2001,
    ],
  },
  {
    kind: 'method',
    id: 'rotation.promax',
    name: 'Promax rotation',
    references: [
      ref(
        ['Hendrickson, A. E.', 'White, P. O.'],
        1964,
        'Promax: A quick method for rotation to oblique simple structure',
        {
          container: 'British Journal of Statistical Psychology',
          volume: '17',
          issue: '1',
          pages: '65–70',
        },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'rotation.oblimin',
    name: 'Oblimin rotation by gradient projection',
    references: [HARMAN_1976, JENNRICH_2002, BERNAARDS_JENNRICH_2005],
  },
  {
    kind: 'method',
    id: 'rotation.geomin',
    name: 'Geomin rotation by gradient projection',
    references: [
      ref(
        ['Yates, A.'],
        1987,
        'Multivariate exploratory data analysis: A perspective on exploratory factor analysis',
        {
          publisher: 'State University of New York Press',
        },
      ),
      BROWNE_2001,
      JENNRICH_2002,
      BERNAARDS_JENNRICH_2005,
    ],
  },
  {
    kind: 'method',
    id: 'rotation.kaiser-normalization',
    name: 'Kaiser row normalization before rotation',
    references: [KAISER_1958],
  },
  {
    kind: 'method',
    id: 'polychoric.two-step',
    name: 'Polychoric correlation, two-step maximum likelihood',
    references: [
      ref(['Olsson, U.'], 1979, 'Maximum likelihood estimation of the polychoric correlation coefficient', {
        container: 'Psychometrika',
        volume: '44',
        issue: '4',
        pages: '443–460',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'polychoric.bivariate-normal',
    name: 'Bivariate normal probabilities by Gauss–Legendre quadrature',
    references: [
      ref(['Drezner, Z.', 'Wesolowsky, G. O.'], 1990, 'On the computation of the bivariate normal integral', {
        container: 'Journal of Statistical Computation and Simulation',
        volume: '35',
        issue: '1–2',
        pages: '101–107',
      }),
      ref(
        ['Genz, A.'],
        2004,
        'Numerical computation of rectangular bivariate and trivariate normal and t probabilities',
        {
          container: 'Statistics and Computing',
          volume: '14',
          issue: '3',
          pages: '251–260',
        },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'omega.schmid-leiman',
    name: 'Schmid–Leiman transformation',
    references: [
      ref(['Schmid, J.', 'Leiman, J. M.'], 1957, 'The development of hierarchical factor solutions', {
        container: 'Psychometrika',
        volume: '22',
        issue: '1',
        pages: '53–61',
      }),
    ],
  },
  {
    kind: 'method',
    id: 'omega.hierarchical',
    name: 'Omega hierarchical',
    references: [
      MCDONALD_1999,
      ref(
        ['Zinbarg, R. E.', 'Revelle, W.', 'Yovel, I.', 'Li, W.'],
        2005,
        "Cronbach's α, Revelle's β, and McDonald's ωH: Their relations with each other and two alternative conceptualizations of reliability",
        { container: 'Psychometrika', volume: '70', issue: '1', pages: '123–133' },
      ),
    ],
  },
  {
    kind: 'method',
    id: 'reliability.guttman-lambda2',
    name: "Guttman's lambda 2",
    references: [GUTTMAN_1945],
  },
  {
    kind: 'method',
    id: 'reliability.guttman-lambda6',
    name: "Guttman's lambda 6",
    references: [GUTTMAN_1945],
  },
  {
    kind: 'rule',
    id: 'rule.primary-loading',
    name: 'Primary loading',
    wording: 'An item should load at least .40 on its own factor.',
    thresholds: { minimum: 0.4 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'rule.cross-loading',
    name: 'Cross-loading',
    wording: 'A loading of .30 or more on a second factor is a cross-loading worth a look.',
    thresholds: { flag: 0.3 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'rule.intended-facet',
    name: 'Primary factor and intended facet',
    wording:
      'Each facet is matched to the factor its items load on most; an item whose largest loading lies on another factor than its facet’s is worth a look.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'rule.efa-sample-size',
    name: 'Sample size for factor analysis',
    wording: '100 respondents is poor, 200 fair, 300 good, 500 very good, 1000 or more excellent.',
    thresholds: { poor: 100, fair: 200, good: 300, veryGood: 500, excellent: 1000 },
    references: [
      ref(['Comrey, A. L.', 'Lee, H. B.'], 1992, 'A first course in factor analysis', {
        edition: '2nd',
        publisher: 'Lawrence Erlbaum Associates',
      }),
    ],
  },
];
