import type { Reference, RegistryEntry } from './types.ts';

const LYNN_1986: Reference = {
  authors: ['Lynn, M. R.'],
  year: 1986,
  title: 'Determination and quantification of content validity',
  container: 'Nursing Research',
  volume: '35',
  issue: '6',
  pages: '382–385',
  doi: '10.1097/00006199-198611000-00017',
};

const POLIT_BECK_2006: Reference = {
  authors: ['Polit, D. F.', 'Beck, C. T.'],
  year: 2006,
  title:
    "The content validity index: Are you sure you know what's being reported? Critique and recommendations",
  container: 'Research in Nursing & Health',
  volume: '29',
  issue: '5',
  pages: '489–497',
  doi: '10.1002/nur.20147',
};

const POLIT_BECK_OWEN_2007: Reference = {
  authors: ['Polit, D. F.', 'Beck, C. T.', 'Owen, S. V.'],
  year: 2007,
  title: 'Is the CVI an acceptable indicator of content validity? Appraisal and recommendations',
  container: 'Research in Nursing & Health',
  volume: '30',
  issue: '4',
  pages: '459–467',
  doi: '10.1002/nur.20199',
};

const LAWSHE_1975: Reference = {
  authors: ['Lawshe, C. H.'],
  year: 1975,
  title: 'A quantitative approach to content validity',
  container: 'Personnel Psychology',
  volume: '28',
  issue: '4',
  pages: '563–575',
  doi: '10.1111/j.1744-6570.1975.tb01393.x',
};

/** Content validity from an expert panel: indices, agreement coefficients and their benchmarks. */
export const CONTENT_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'content.i-cvi',
    name: 'Item-level content validity index (I-CVI)',
    references: [LYNN_1986, POLIT_BECK_2006],
  },
  {
    kind: 'method',
    id: 'content.s-cvi',
    name: 'Scale-level content validity index (S-CVI/Ave and S-CVI/UA)',
    references: [POLIT_BECK_2006],
  },
  {
    kind: 'method',
    id: 'content.modified-kappa',
    name: 'Modified kappa (I-CVI adjusted for chance agreement)',
    references: [POLIT_BECK_OWEN_2007],
  },
  {
    kind: 'method',
    id: 'content.cvr',
    name: "Lawshe's content validity ratio (CVR)",
    references: [LAWSHE_1975],
  },
  {
    kind: 'method',
    id: 'content.cvr-critical',
    name: 'Critical CVR from the exact one-tailed binomial test',
    references: [
      LAWSHE_1975,
      {
        authors: ['Wilson, F. R.', 'Pan, W.', 'Schumsky, D. A.'],
        year: 2012,
        title: "Recalculation of the critical values for Lawshe's content validity ratio",
        container: 'Measurement and Evaluation in Counseling and Development',
        volume: '45',
        issue: '3',
        pages: '197–210',
        doi: '10.1177/0748175612440286',
        fromMemory: true,
      },
      {
        authors: ['Ayre, C.', 'Scally, A. J.'],
        year: 2014,
        title:
          "Critical values for Lawshe's content validity ratio: Revisiting the original methods of calculation",
        container: 'Measurement and Evaluation in Counseling and Development',
        volume: '47',
        issue: '1',
        pages: '79–86',
        doi: '10.1177/0748175613513808',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'content.aiken-v',
    name: "Aiken's V",
    references: [
      {
        authors: ['Aiken, L. R.'],
        year: 1985,
        title: 'Three coefficients for analyzing the reliability and validity of ratings',
        container: 'Educational and Psychological Measurement',
        volume: '45',
        issue: '1',
        pages: '131–142',
        doi: '10.1177/0013164485451012',
      },
    ],
  },
  {
    kind: 'method',
    id: 'agreement.fleiss-kappa',
    name: "Fleiss' kappa",
    references: [
      {
        authors: ['Fleiss, J. L.'],
        year: 1971,
        title: 'Measuring nominal scale agreement among many raters',
        container: 'Psychological Bulletin',
        volume: '76',
        issue: '5',
        pages: '378–382',
        doi: '10.1037/h0031619',
      },
    ],
  },
  {
    kind: 'method',
    id: 'agreement.cohen-kappa',
    name: "Cohen's kappa",
    references: [
      {
        authors: ['Cohen, J.'],
        year: 1960,
        title: 'A coefficient of agreement for nominal scales',
        container: 'Educational and Psychological Measurement',
        volume: '20',
        issue: '1',
        pages: '37–46',
        doi: '10.1177/001316446002000104',
      },
    ],
  },
  {
    kind: 'rule',
    id: 'content.relevant-ratings',
    name: 'Which relevance ratings count as relevant',
    wording:
      'On a 1–4 relevance scale, ratings of 3 or 4 count as relevant; on another scale, the upper half.',
    thresholds: { relevantFrom: 3, scaleMax: 4 },
    references: [LYNN_1986, POLIT_BECK_2006],
  },
  {
    kind: 'rule',
    id: 'content.i-cvi-benchmark',
    name: 'I-CVI benchmark by panel size',
    wording:
      'With 3 to 5 experts every expert should rate the item relevant (I-CVI 1.00); with 6 or more, I-CVI should reach .78. Panels under 3 get no benchmark.',
    thresholds: { smallPanelMinimum: 1, largePanelMinimum: 0.78, largePanelFrom: 6, minimumPanel: 3 },
    references: [LYNN_1986, POLIT_BECK_2006],
  },
  {
    kind: 'rule',
    id: 'content.s-cvi-ave-benchmark',
    name: 'S-CVI/Ave benchmark',
    wording: 'The average of the item CVIs should reach .90.',
    thresholds: { minimum: 0.9 },
    references: [POLIT_BECK_2006],
  },
  {
    kind: 'rule',
    id: 'content.modified-kappa-bands',
    name: 'Modified kappa bands',
    wording: 'Modified kappa above .74 is excellent, .60 to .74 good, .40 to .59 fair and below .40 poor.',
    thresholds: { excellentAbove: 0.74, goodFrom: 0.6, fairFrom: 0.4 },
    references: [POLIT_BECK_OWEN_2007],
  },
  {
    kind: 'rule',
    id: 'content.cvr-significance',
    name: 'CVR significance level',
    wording:
      'An item is kept as essential when its CVR reaches the critical value of the exact one-tailed binomial test at .05 for the panel size.',
    thresholds: { alpha: 0.05, chance: 0.5 },
    references: [LAWSHE_1975],
  },
  {
    kind: 'rule',
    id: 'pool.items-per-facet',
    name: 'Items per facet',
    wording:
      'Every facet should hold at least 3 items, in the pool (draft several times the number the final scale will keep) and after purification.',
    thresholds: { minimum: 3 },
    commonPractice: true,
    references: [],
  },
];
