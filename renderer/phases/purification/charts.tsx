import type { ReactElement, ReactNode } from 'react';
import {
  Bar,
  BarChart,
  CartesianGrid,
  Cell,
  ErrorBar,
  LabelList,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type {
  ReliabilityCriterion,
  RoundFactorView,
  RoundItemRow,
  RoundSummary,
} from '../../../app/api/contracts/purification.ts';
import { bounded, unbounded } from '../../../app/api/format.ts';
import { criterionName } from '../../shared/criterion.tsx';

const INK = '#4a5567';
const ACCENT = '#2f5d8a';
const WARN = '#c0792a';
const BAD = '#b23a3a';
const LINE = '#dde2ea';
const EDGE = '#9aa5b4';
/** Height of one item's row in the horizontal bar charts, in pixels. */
const ROW_PX = 18;
const AXIS_PX = 44;
const TICK = { fontSize: 11, fill: INK };
/** The item codes down the side of a horizontal bar chart, every one shown. */
const ITEM_AXIS = { type: 'category', dataKey: 'code', width: 46, tick: TICK, interval: 0 } as const;
/** Most eigenvalues the scree plot shows: the elbow and the crossing lie among the first few. */
const MAX_SCREE = 15;

function rowHeight(rows: number): number {
  return rows * ROW_PX + AXIS_PX;
}

/** An axis's title, set under the axis (`offset` pulls it below the ticks) in the ticks' type. */
function axisTitle(value: string, offset: number) {
  return { value, position: 'insideBottom', offset, fontSize: 11, fill: INK } as const;
}

/**
 * A chart as a figure: its accessible name, its caption with the muted notes that say how to read
 * it, and the chart filling the figure's width at the given height.
 */
function ChartFigure(props: {
  label: string;
  className?: string;
  caption: ReactNode;
  /** How to read it; a note that does not apply this time is `false`. */
  notes?: (string | false)[];
  height: number;
  children: ReactElement;
}) {
  return (
    <figure className={props.className ? `chart ${props.className}` : 'chart'} aria-label={props.label}>
      <figcaption>
        {props.caption}
        {props.notes?.map(
          (note) =>
            note && (
              <span key={note} className="muted">
                {' '}
                · {note}
              </span>
            ),
        )}
      </figcaption>
      <ResponsiveContainer width="100%" height={props.height}>
        {props.children}
      </ResponsiveContainer>
    </figure>
  );
}

/**
 * Alpha if deleted against the current alpha: each bar is the change in alpha when the item is
 * left out, so a bar to the right (red) means alpha would rise without the item.
 */
export function AlphaIfDeletedChart({ rows, alpha }: { rows: RoundItemRow[]; alpha: number }) {
  const data = rows.map((row) => ({
    code: row.code,
    change: row.stats.alphaIfDeleted === null ? 0 : row.stats.alphaIfDeleted - alpha,
    ifDeleted: row.stats.alphaIfDeleted,
  }));
  const reach = Math.max(0.01, ...data.map((d) => Math.abs(d.change)));
  const bound = Math.ceil(reach * 200) / 200;
  return (
    <ChartFigure
      label="Alpha if item deleted against the current alpha"
      caption={`Alpha if item deleted, as the change from the current α = ${bounded(alpha)}`}
      notes={['right of the line: α rises without the item']}
      height={rowHeight(rows.length)}
    >
      <BarChart data={data} layout="vertical" margin={{ top: 4, right: 16, bottom: 18, left: 4 }}>
        <CartesianGrid horizontal={false} stroke={LINE} />
        <XAxis
          type="number"
          domain={[-bound, bound]}
          tickFormatter={(v: number) => (v > 0 ? `+${bounded(v)}` : bounded(v))}
          tick={TICK}
          label={axisTitle('change in α if dropped', -10)}
        />
        <YAxis {...ITEM_AXIS} />
        <Tooltip
          formatter={(_value, _name, entry) => [
            `${bounded((entry.payload as { ifDeleted: number | null }).ifDeleted)} (now ${bounded(alpha)})`,
            'α without the item',
          ]}
        />
        <ReferenceLine x={0} stroke={INK} />
        <Bar dataKey="change" isAnimationActive={false} barSize={11}>
          {data.map((d) => (
            <Cell key={d.code} fill={d.change > 0 ? BAD : ACCENT} />
          ))}
        </Bar>
      </BarChart>
    </ChartFigure>
  );
}

/** Corrected item-total correlations with the common-practice line at .30. */
export function ItemTotalChart({ rows, threshold }: { rows: RoundItemRow[]; threshold: number }) {
  const data = rows.map((row) => ({ code: row.code, r: row.stats.correctedItemTotal ?? 0 }));
  const low = Math.min(0, ...data.map((d) => Math.floor(d.r * 5) / 5));
  const ticks = Array.from({ length: Math.round((1 - low) * 5) + 1 }, (_, i) => low + i / 5);
  return (
    <ChartFigure
      label="Corrected item-total correlations"
      caption="Corrected item-total correlation"
      notes={[`dashed line at ${bounded(threshold, 2)} (common practice)`]}
      height={rowHeight(rows.length)}
    >
      <BarChart data={data} layout="vertical" margin={{ top: 4, right: 16, bottom: 18, left: 4 }}>
        <CartesianGrid horizontal={false} stroke={LINE} />
        <XAxis
          type="number"
          domain={[low, 1]}
          ticks={ticks}
          tickFormatter={(v: number) => bounded(v, 1)}
          tick={TICK}
          label={axisTitle('r with the sum of the other items', -10)}
        />
        <YAxis {...ITEM_AXIS} />
        <Tooltip formatter={(value) => [bounded(Number(value)), 'corrected item-total r']} />
        <ReferenceLine
          x={threshold}
          stroke={WARN}
          strokeDasharray="4 3"
          label={{ value: bounded(threshold, 2), position: 'top', fontSize: 11, fill: WARN }}
        />
        <Bar dataKey="r" isAnimationActive={false} barSize={11}>
          {data.map((d) => (
            <Cell key={d.code} fill={d.r < threshold ? WARN : ACCENT} />
          ))}
        </Bar>
      </BarChart>
    </ChartFigure>
  );
}

/** Sequential blues from the lowest to the highest response category. */
function categoryColour(index: number, count: number): string {
  const t = count <= 1 ? 1 : index / (count - 1);
  const light = 82 - t * 56;
  return `hsl(210 45% ${light}%)`;
}

/** How each item was answered: one stacked bar per item, shares of the answered values. */
export function DistributionChart({
  rows,
  min,
  anchors,
}: {
  rows: RoundItemRow[];
  min: number;
  anchors: string[];
}) {
  const categories = rows[0]?.distribution.counts.length ?? 0;
  const keys = Array.from({ length: categories }, (_, i) => String(min + i));
  const data = rows.map((row) => {
    const answered = row.distribution.counts.reduce((a, b) => a + b, 0);
    const entry: Record<string, number | string> = {
      code: row.code,
      answered,
      missing: row.distribution.missing,
    };
    row.distribution.counts.forEach((count, i) => {
      entry[keys[i]] = answered === 0 ? 0 : (count / answered) * 100;
    });
    return entry;
  });
  return (
    <ChartFigure
      label="Response distributions per item"
      caption="Response distributions"
      notes={['share of answers in each category, after reverse keying']}
      height={rowHeight(rows.length) + 24}
    >
      <BarChart data={data} layout="vertical" margin={{ top: 4, right: 16, bottom: 4, left: 4 }}>
        <XAxis
          type="number"
          domain={[0, 100]}
          allowDataOverflow
          ticks={[0, 25, 50, 75, 100]}
          tickFormatter={(v: number) => `${Math.round(v)}%`}
          tick={TICK}
        />
        <YAxis {...ITEM_AXIS} />
        <Tooltip
          formatter={(value, name) => [
            `${unbounded(Number(value), 1)}%`,
            `${name}${anchors[Number(name) - min] ? ` (${anchors[Number(name) - min]})` : ''}`,
          ]}
        />
        <Legend
          verticalAlign="bottom"
          height={24}
          iconSize={10}
          wrapperStyle={{ fontSize: 11 }}
          formatter={(value: string) => (
            <span style={{ color: INK }}>
              {value}
              {anchors[Number(value) - min] ? ` ${anchors[Number(value) - min]}` : ''}
            </span>
          )}
        />
        {keys.map((key, i) => (
          <Bar
            key={key}
            dataKey={key}
            stackId="share"
            fill={categoryColour(i, keys.length)}
            isAnimationActive={false}
            barSize={12}
          />
        ))}
      </BarChart>
    </ChartFigure>
  );
}

/** Alpha across rounds with its confidence interval and the study's reliability criterion. */
export function AlphaHistoryChart({
  rounds,
  criterion,
}: {
  rounds: RoundSummary[];
  criterion: ReliabilityCriterion;
}) {
  const data = rounds.map((r) => ({
    round: `Round ${r.number}`,
    alpha: r.alpha,
    ci: [r.alpha - r.ci.lower, r.ci.upper - r.alpha],
    lower: r.ci.lower,
    upper: r.ci.upper,
    k: r.k,
  }));
  const lowest = Math.min(...rounds.map((r) => r.ci.lower));
  const floor = Math.max(0, Math.min(criterion.minimum - 0.1, Math.floor(lowest * 10) / 10));
  const ticks = Array.from({ length: Math.round((1 - floor) * 10) + 1 }, (_, i) => floor + i / 10);
  return (
    <ChartFigure
      label="Alpha across rounds"
      caption="Alpha across rounds"
      notes={[`whiskers: confidence interval (Feldt); dashed: criterion ${criterionName(criterion)}*`]}
      height={220}
    >
      <LineChart data={data} margin={{ top: 22, right: 110, bottom: 4, left: 0 }}>
        <CartesianGrid stroke={LINE} vertical={false} />
        <XAxis dataKey="round" tick={TICK} padding={{ left: 40, right: 40 }} />
        <YAxis
          domain={[floor, 1]}
          ticks={ticks}
          tickFormatter={(v: number) => bounded(v, 2)}
          tick={TICK}
          width={40}
        />
        <Tooltip
          formatter={(_value, _name, entry) => {
            const p = entry.payload as { alpha: number; lower: number; upper: number; k: number };
            return [`${bounded(p.alpha)} [${bounded(p.lower)}, ${bounded(p.upper)}], ${p.k} items`, 'α'];
          }}
        />
        <ReferenceLine
          y={criterion.minimum}
          stroke={EDGE}
          strokeDasharray="4 3"
          label={{
            value: `criterion ${bounded(criterion.minimum, 2)}*`,
            position: 'right',
            fontSize: 11,
            fill: INK,
          }}
        />
        <Line dataKey="alpha" stroke={ACCENT} strokeWidth={2} isAnimationActive={false} dot={{ r: 4 }}>
          <ErrorBar dataKey="ci" width={6} stroke={ACCENT} />
          <LabelList
            dataKey="alpha"
            position="top"
            offset={10}
            formatter={(v) => bounded(Number(v))}
            style={{ fontSize: 11, fill: INK }}
          />
        </Line>
      </LineChart>
    </ChartFigure>
  );
}

/**
 * The scree plot: eigenvalues of the correlation matrix in order, with the parallel analysis's
 * percentile of simulated eigenvalues overlaid and the line at 1 (Kaiser). Where the observed line
 * runs above the simulated one, a component beats chance.
 */
export function ScreeChart({ factor }: { factor: RoundFactorView }) {
  const { eigenvalues, parallel } = factor.evidence;
  const shown = Math.min(eigenvalues.length, MAX_SCREE);
  const data = eigenvalues.slice(0, shown).map((value, k) => ({
    k: k + 1,
    observed: value,
    simulated: parallel?.components.percentile[k] ?? null,
  }));
  const percentile = parallel?.percentile ?? 95;
  return (
    <ChartFigure
      label="Scree plot with parallel analysis"
      className="scree"
      caption="Scree plot: eigenvalues of R"
      notes={[
        parallel !== null &&
          `dashed: ${percentile}th percentile of ${parallel.iterations} simulated data sets (seed ${parallel.seed})`,
        eigenvalues.length > shown && `first ${shown} of ${eigenvalues.length}`,
      ]}
      height={260}
    >
      <LineChart data={data} margin={{ top: 8, right: 20, bottom: 22, left: 4 }}>
        <CartesianGrid stroke={LINE} />
        <XAxis dataKey="k" tick={TICK} interval={0} label={axisTitle('factor', -12)} />
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
    </ChartFigure>
  );
}
