import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { RoundFactorView } from '../../../app/api/contracts/purification.ts';
import { unbounded } from '../../../app/api/format.ts';

const INK = '#4a5567';
const ACCENT = '#2f5d8a';
const WARN = '#c0792a';
const LINE = '#dde2ea';
const TICK = { fontSize: 11, fill: INK };
/** Most eigenvalues the plot shows: the elbow and the crossing lie among the first few. */
const MAX_SHOWN = 15;

/**
 * The scree plot: eigenvalues of the correlation matrix in order, with the parallel analysis's
 * percentile of simulated eigenvalues overlaid and the line at 1 (Kaiser). Where the observed line
 * runs above the simulated one, a component beats chance.
 */
export function ScreeChart({ factor }: { factor: RoundFactorView }) {
  const { eigenvalues, parallel } = factor.evidence;
  const shown = Math.min(eigenvalues.length, MAX_SHOWN);
  const data = eigenvalues.slice(0, shown).map((value, k) => ({
    k: k + 1,
    observed: value,
    simulated: parallel?.components.percentile[k] ?? null,
  }));
  const percentile = parallel?.percentile ?? 95;
  return (
    <figure className="chart scree" aria-label="Scree plot with parallel analysis">
      <figcaption>
        Scree plot: eigenvalues of R
        {parallel && (
          <span className="muted">
            {' '}
            · dashed: {percentile}th percentile of {parallel.iterations} simulated data sets (seed{' '}
            {parallel.seed})
          </span>
        )}
        {eigenvalues.length > shown && (
          <span className="muted">
            {' '}
            · first {shown} of {eigenvalues.length}
          </span>
        )}
      </figcaption>
      <ResponsiveContainer width="100%" height={260}>
        <LineChart data={data} margin={{ top: 8, right: 20, bottom: 22, left: 4 }}>
          <CartesianGrid stroke={LINE} />
          <XAxis
            dataKey="k"
            tick={TICK}
            interval={0}
            label={{ value: 'factor', position: 'insideBottom', offset: -12, fontSize: 11, fill: INK }}
          />
          <YAxis tick={TICK} width={36} tickFormatter={(v: number) => unbounded(v, 1)} />
          <Tooltip formatter={(v) => (typeof v === 'number' ? unbounded(v, 3) : String(v))} />
          <Legend verticalAlign="top" height={24} wrapperStyle={{ fontSize: 12 }} />
          <ReferenceLine y={1} stroke={INK} strokeDasharray="2 4" />
          <Line
            name="observed"
            dataKey="observed"
            stroke={ACCENT}
            strokeWidth={2}
            isAnimationActive={false}
            dot={{ r: 3 }}
          />
          {parallel && (
            <Line
              name={`parallel analysis (${percentile}th)`}
              dataKey="simulated"
              stroke={WARN}
              strokeWidth={2}
              strokeDasharray="6 4"
              isAnimationActive={false}
              dot={false}
            />
          )}
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
