import { useEffect, useState } from 'react';

/** Which part of the history the address shows: the log, one row, an item's life story, or a run. */
export type HistoryPath =
  | { view: 'list' }
  | { view: 'row'; seq: number }
  | { view: 'item'; code: string }
  | { view: 'run'; id: number };

/** `#/log`, `#/log/row/12`, `#/log/item/TR05`, `#/log/run/4`. */
export function parseHistoryPath(hash: string): HistoryPath {
  const m = /^#\/log\/(row|item|run)\/([^/?#]+)/.exec(hash);
  if (!m) return { view: 'list' };
  const value = decodeURIComponent(m[2]);
  if (m[1] === 'item') return { view: 'item', code: value };
  const n = Number(value);
  if (!Number.isSafeInteger(n) || n < 1) return { view: 'list' };
  return m[1] === 'row' ? { view: 'row', seq: n } : { view: 'run', id: n };
}

export function useHistoryPath(): HistoryPath {
  const [hash, setHash] = useState(window.location.hash);
  useEffect(() => {
    const onChange = () => setHash(window.location.hash);
    window.addEventListener('hashchange', onChange);
    return () => window.removeEventListener('hashchange', onChange);
  }, []);
  return parseHistoryPath(hash);
}
