import { useEffect, useRef, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import { call } from '../../api/client.ts';

/** Pause in typing after which the wording of a draft is checked again. */
const CHECK_IDLE_MS = 150;

export type WordingCheckResult = CommandOutput<'items.checkWording'>;

/**
 * Wording checks for a text as it is typed: asks the study after a short pause and keeps the
 * latest answer. `text === null` means "not editing" and clears the result.
 */
export function useLiveWording(text: string | null, itemId?: number) {
  const [result, setResult] = useState<WordingCheckResult | undefined>(undefined);
  const [error, setError] = useState<string | undefined>(undefined);
  const latest = useRef(0);
  useEffect(() => {
    if (text === null) {
      latest.current++;
      setResult(undefined);
      setError(undefined);
      return;
    }
    const ticket = ++latest.current;
    const timer = setTimeout(() => {
      call('items.checkWording', itemId === undefined ? { text } : { text, itemId }).then(
        (value) => {
          if (ticket !== latest.current) return;
          setResult(value);
          setError(undefined);
        },
        (e: Error) => ticket === latest.current && setError(e.message),
      );
    }, CHECK_IDLE_MS);
    return () => clearTimeout(timer);
  }, [text, itemId]);
  return { result, error };
}
