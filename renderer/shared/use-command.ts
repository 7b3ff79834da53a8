import { createContext, useCallback, useContext, useEffect, useState } from 'react';
import type { CommandInput, CommandName, CommandOutput } from '../../app/api/commands.ts';
import { call } from '../api/client.ts';

/**
 * A counter that every successful change bumps, so that every view reading the study loads
 * again; one mechanism instead of per-screen cache rules.
 */
export const StudyRevision = createContext<{ revision: number; bump(): void }>({ revision: 0, bump() {} });

export function useQuery<K extends CommandName>(name: K, input: CommandInput<K>) {
  const { revision } = useContext(StudyRevision);
  const [data, setData] = useState<CommandOutput<K> | undefined>(undefined);
  const [error, setError] = useState<string | undefined>(undefined);
  const key = JSON.stringify(input);
  // biome-ignore lint/correctness/useExhaustiveDependencies: the input is compared by its JSON text
  useEffect(() => {
    let live = true;
    call(name, JSON.parse(key) as CommandInput<K>).then(
      (value) => {
        if (!live) return;
        setData(value);
        setError(undefined);
      },
      (e: Error) => live && setError(e.message),
    );
    return () => {
      live = false;
    };
  }, [name, key, revision]);
  return { data, error };
}

/** Runs a change; on success every query reloads, on failure the message is kept for the form. */
export function useMutation<K extends CommandName>(name: K) {
  const { bump } = useContext(StudyRevision);
  const [error, setError] = useState<string | undefined>(undefined);
  const [busy, setBusy] = useState(false);
  const run = useCallback(
    async (input: CommandInput<K>): Promise<CommandOutput<K> | undefined> => {
      setBusy(true);
      try {
        const value = await call(name, input);
        setError(undefined);
        bump();
        return value;
      } catch (e) {
        setError((e as Error).message);
        return undefined;
      } finally {
        setBusy(false);
      }
    },
    [name, bump],
  );
  return { run, error, busy, clearError: () => setError(undefined) };
}
