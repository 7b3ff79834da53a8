/**
 * Addresses inside the study's history (the decision log screen): one log row, an item's life
 * story, a stored analysis run. Screens link to them; a link, not an import, crosses between screens.
 */
export const historyLink = {
  row: (seq: number) => `#/log/row/${seq}`,
  item: (code: string) => `#/log/item/${encodeURIComponent(code)}`,
  run: (id: number) => `#/log/run/${id}`,
};
