import type { Reference, RegistryEntry } from './types.ts';

const MEADE_CRAIG_2012: Reference = {
  authors: ['Meade, A. W.', 'Craig, S. B.'],
  year: 2012,
  title: 'Identifying careless responses in survey data',
  container: 'Psychological Methods',
  volume: '17',
  issue: '3',
  pages: '437–455',
  doi: '10.1037/a0028085',
};

const CURRAN_2016: Reference = {
  authors: ['Curran, P. G.'],
  year: 2016,
  title: 'Methods for the detection of carelessly invalid responses in survey data',
  container: 'Journal of Experimental Social Psychology',
  volume: '66',
  pages: '4–19',
  doi: '10.1016/j.jesp.2015.07.006',
  fromMemory: true,
};

/** Respondent screening: indices of careless or invalid responding, and the cut-offs that flag them. */
export const SCREENING_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'screening.longstring',
    name: 'Longstring (longest run of identical answers)',
    references: [
      {
        authors: ['Johnson, J. A.'],
        year: 2005,
        title: 'Ascertaining the validity of individual protocols from Web-based personality inventories',
        container: 'Journal of Research in Personality',
        volume: '39',
        issue: '1',
        pages: '103–129',
        doi: '10.1016/j.jrp.2004.09.009',
        fromMemory: true,
      },
      MEADE_CRAIG_2012,
      CURRAN_2016,
    ],
  },
  {
    kind: 'method',
    id: 'screening.irv',
    name: 'Intra-individual response variability (IRV)',
    references: [
      {
        authors: ['Dunn, A. M.', 'Heggestad, E. D.', 'Shanock, L. R.', 'Theilgard, N.'],
        year: 2018,
        title:
          'Intra-individual response variability as an indicator of insufficient effort responding: Comparison to other indicators and relationships with individual differences',
        container: 'Journal of Business and Psychology',
        volume: '33',
        issue: '1',
        pages: '105–121',
        doi: '10.1007/s10869-016-9479-0',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'screening.mahalanobis',
    name: 'Mahalanobis distance D² with its χ² probability',
    references: [
      {
        authors: ['Mahalanobis, P. C.'],
        year: 1936,
        title: 'On the generalised distance in statistics',
        container: 'Proceedings of the National Institute of Sciences of India',
        volume: '2',
        issue: '1',
        pages: '49–55',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'screening.attention-checks',
    name: 'Attention-check (instructed-response) items',
    references: [MEADE_CRAIG_2012],
  },
  {
    kind: 'method',
    id: 'screening.duplicate-ids',
    name: 'Duplicate respondent ids',
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'screening.mahalanobis-alpha',
    name: 'Multivariate outlier cut-off',
    wording:
      'A respondent whose D² has a χ² upper-tail probability below .001 is a possible multivariate outlier.',
    thresholds: { alpha: 0.001 },
    references: [
      {
        authors: ['Tabachnick, B. G.', 'Fidell, L. S.'],
        year: 2013,
        title: 'Using multivariate statistics',
        edition: '6th',
        publisher: 'Pearson',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'rule',
    id: 'screening.longstring-share',
    name: 'Longstring cut-off',
    wording:
      'A run of identical answers covering at least 50% of the items a respondent answered (with at least 4 answered items) is flagged; cut-offs in the literature vary with the scale.',
    thresholds: { share: 0.5, minimumItems: 4 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'screening.irv-floor',
    name: 'No response variability',
    wording:
      'A respondent who gave the same answer to every answered item (IRV of zero, at least 4 items) is flagged.',
    thresholds: { minimumItems: 4 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'screening.speeder',
    name: 'Speeders',
    wording: 'A response time below 50% of the median response time marks a speeder.',
    thresholds: { fractionOfMedian: 0.5 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'screening.missing-share',
    name: 'Too many missing answers',
    wording: 'A respondent who skipped more than 20% of the items is flagged.',
    thresholds: { maximumShare: 0.2 },
    commonPractice: true,
    references: [],
  },
];
