import { useCallback, useRef, useState } from 'react';
import type { RoundSummary } from '../../../app/api/contracts/purification.ts';
import type { TaskStatus } from '../../../app/api/contracts/tasks.ts';
import { call } from '../../api/client.ts';
import { ErrorNote } from '../../shared/components.tsx';
import { TaskProgress } from '../../shared/task-progress.tsx';
import { useMutation } from '../../shared/use-command.ts';

const DEFAULT_RESAMPLES = 1000;
const ROTATIONS = ['oblimin', 'promax', 'geomin', 'varimax', 'quartimax', 'none'] as const;
type Rotation = (typeof ROTATIONS)[number];

/**
 * Runs the next round in a worker: the options that are stored with it, a progress bar with
 * Cancel while it runs, and the stored round when it is done.
 */
export function RoundRunner(props: {
  nextNumber: number;
  items: number;
  disabled: boolean;
  /** Facets among the next round's items: the default number of factors. */
  facets: number;
  /** A round started earlier and not yet collected (after a reload or a visit elsewhere). */
  running: { taskId: string; round: number } | undefined;
  onStored(round: RoundSummary): void;
}) {
  const collect = useMutation('purification.collectRound');
  const [missing, setMissing] = useState<'listwise' | 'pairwise'>('listwise');
  const [bootstrap, setBootstrap] = useState(true);
  const [resamples, setResamples] = useState(DEFAULT_RESAMPLES);
  const [seed, setSeed] = useState('');
  const [factorAnalysis, setFactorAnalysis] = useState(true);
  const [factors, setFactors] = useState('');
  const [extraction, setExtraction] = useState<'paf' | 'minres' | 'ml'>('ml');
  const [rotation, setRotation] = useState<Rotation>('oblimin');
  const [correlation, setCorrelation] = useState<'pearson' | 'polychoric'>('pearson');
  const [task, setTask] = useState<{ id: string; round: number } | undefined>(
    props.running && { id: props.running.taskId, round: props.running.round },
  );
  const [error, setError] = useState<string | undefined>(undefined);
  const { onStored } = props;
  /** The task whose result is being collected: collected once even if polling reports twice. */
  const collecting = useRef<string | undefined>(undefined);

  async function start() {
    setError(undefined);
    collect.clearError();
    try {
      const started = await call('purification.startRound', {
        missing,
        bootstrap: bootstrap ? { resamples, seed: seed.trim() === '' ? undefined : Number(seed) } : null,
        factor: factorAnalysis
          ? {
              factors: factors.trim() === '' ? undefined : Number(factors),
              extraction,
              rotation,
              correlation,
            }
          : null,
      });
      setTask({ id: started.taskId, round: started.round });
    } catch (e) {
      setError((e as Error).message);
    }
  }

  const finished = useCallback(
    async (_status: TaskStatus) => {
      if (!task || collecting.current === task.id) return;
      collecting.current = task.id;
      const round = await collect.run({ taskId: task.id });
      setTask(undefined);
      if (round) onStored(round);
    },
    [task, collect.run, onStored],
  );

  if (task) {
    return (
      <div className="round-runner">
        <TaskProgress taskId={task.id} label={`Running round ${task.round}…`} onFinished={finished} />
      </div>
    );
  }
  return (
    <div className="round-runner">
      <div className="runner-options">
        <label>
          Missing answers
          <select value={missing} onChange={(e) => setMissing(e.target.value as 'listwise' | 'pairwise')}>
            <option value="listwise">listwise deletion</option>
            <option value="pairwise">pairwise deletion</option>
          </select>
        </label>
        <label className="check">
          <input type="checkbox" checked={bootstrap} onChange={(e) => setBootstrap(e.target.checked)} />
          Bootstrap CI
        </label>
        {bootstrap && (
          <>
            <label>
              Resamples
              <input
                type="number"
                min={200}
                max={20000}
                step={100}
                value={resamples}
                onChange={(e) => setResamples(Number(e.target.value))}
              />
            </label>
            <label>
              Seed
              <input
                type="number"
                min={0}
                placeholder={String(props.nextNumber)}
                value={seed}
                onChange={(e) => setSeed(e.target.value)}
                title="Blank: the round number, so a rerun repeats the resamples"
              />
            </label>
          </>
        )}
      </div>
      <div className="runner-options factor-options">
        <label className="check">
          <input
            type="checkbox"
            checked={factorAnalysis}
            onChange={(e) => setFactorAnalysis(e.target.checked)}
          />
          Factor analysis
        </label>
        {factorAnalysis && (
          <>
            <label>
              Factors
              <input
                type="number"
                min={1}
                value={factors}
                placeholder={String(Math.max(1, props.facets))}
                onChange={(e) => setFactors(e.target.value)}
                title="Blank: as many factors as facets; the round shows every count rule beside the choice"
              />
            </label>
            <label>
              Extraction
              <select
                value={extraction}
                onChange={(e) => setExtraction(e.target.value as 'paf' | 'minres' | 'ml')}
              >
                <option value="ml">maximum likelihood</option>
                <option value="paf">principal axis</option>
                <option value="minres">minimum residual</option>
              </select>
            </label>
            <label>
              Rotation
              <select value={rotation} onChange={(e) => setRotation(e.target.value as Rotation)}>
                {ROTATIONS.map((r) => (
                  <option key={r} value={r}>
                    {r === 'none' ? 'none (unrotated)' : r}
                  </option>
                ))}
              </select>
            </label>
            <label>
              Correlations
              <select
                value={correlation}
                onChange={(e) => setCorrelation(e.target.value as 'pearson' | 'polychoric')}
              >
                <option value="pearson">Pearson</option>
                <option value="polychoric">polychoric</option>
              </select>
            </label>
          </>
        )}
        <button type="button" className="primary" disabled={props.disabled} onClick={start}>
          Run round {props.nextNumber}
        </button>
      </div>
      <ErrorNote message={error ?? collect.error} />
    </div>
  );
}
