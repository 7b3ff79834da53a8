import Papa from 'papaparse';

/**
 * A blank ratings sheet in the long layout the ratings reader takes: one row per expert and item (in
 * packet order), with the columns the round's form asks for and the answers left empty.
 */
export function blankRatingsCsv(
  roundNumber: number,
  form: { asksEssential: boolean; asksFacet: boolean; asksComment: boolean },
  itemCodes: readonly string[],
  expertCodes: readonly string[],
): { fileName: string; text: string } {
  const columns = ['item', 'expert', 'relevance'];
  if (form.asksEssential) columns.push('essential');
  if (form.asksFacet) columns.push('facet');
  if (form.asksComment) columns.push('comment');
  const rows = expertCodes.flatMap((expert) =>
    itemCodes.map((code) => [code, expert, ...columns.slice(2).map(() => '')]),
  );
  return {
    fileName: `ratings-sheet-round-${roundNumber}.csv`,
    text: `${Papa.unparse({ fields: columns, data: rows }, { newline: '\r\n' })}\r\n`,
  };
}
