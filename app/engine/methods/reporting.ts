import type { RegistryEntry } from './types.ts';

/** Reporting: what the methods appendix cites beyond the statistics (how stored files are fingerprinted). */
export const REPORTING_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'integrity.sha256',
    name: 'SHA-256',
    references: [
      {
        authors: ['National Institute of Standards and Technology'],
        year: 2015,
        title: 'Secure Hash Standard (SHS) (FIPS PUB 180-4)',
        publisher: 'U.S. Department of Commerce',
        doi: '10.6028/NIST.FIPS.180-4',
      },
    ],
  },
];
