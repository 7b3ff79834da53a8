/** Expert-review ratings files: reading them (either layout), and matching them to a review round. */
export * from './match.ts';
export * from './read.ts';
