import { bounded } from '../../../app/api/format.ts';
import type { CfaJobOutput, MeasurementModel } from '../../../app/api/contracts/validity.ts';

const ROW = 24;
const FACTOR_GAP = 14;
const TOP = 20;
const FACTOR_X = 270;
/** Horizontal room each further level of nesting takes for a factor-correlation arc. */
const ARC_STEP = 34;
const RX = 78;
const RY = 22;
const ITEM_X = 500;
const ITEM_W = 64;
const ITEM_H = 18;
const INK = '#33404f';
const ACCENT = '#2f5d8a';
const WARM = '#a4541c';

function shortName(name: string): string {
  return name.length > 20 ? `${name.slice(0, 19)}…` : name;
}

/**
 * The fitted model as a path figure drawn here: factors (ellipses) with single-headed arrows to
 * their items (boxes), labelled with standardized loadings; factor correlations as curved
 * double-headed lines on the left; freed residual covariances as curves on the right, with their
 * correlations; each item's standardized residual variance beside it.
 */
export function PathFigure({ output, model }: { output: CfaJobOutput; model: MeasurementModel }) {
  const { fit } = output;
  const sol = fit.groups[0];
  const order = model.factors.flatMap((f) => f.items).filter((i) => fit.items.includes(i));
  const y = new Map<string, number>();
  let cursor = TOP;
  for (const f of model.factors) {
    for (const item of f.items) {
      if (!fit.items.includes(item)) continue;
      y.set(item, cursor);
      cursor += ROW;
    }
    cursor += FACTOR_GAP;
  }
  const height = cursor + 10;
  const factorY = fit.factors.map((name) => {
    const items = model.factors.find((f) => f.name === name)?.items ?? [];
    const ys = items.map((i) => y.get(i) ?? 0);
    return ys.reduce((a, b) => a + b, 0) / Math.max(ys.length, 1) + ITEM_H / 2;
  });
  const itemIndex = (code: string) => fit.items.indexOf(code);
  const arcs: { a: number; b: number; value: number }[] = [];
  for (let j = 0; j < fit.factors.length; j++)
    for (let k = 0; k < j; k++) arcs.push({ a: k, b: j, value: sol.factorCorrelations[j][k] });
  const residualCorr = (a: string, b: string) => {
    const p = fit.parameters.find(
      (x) => x.label === `cov(e.${a}, e.${b})` || x.label === `cov(e.${b}, e.${a})`,
    );
    const ia = itemIndex(a);
    const ib = itemIndex(b);
    if (!p || ia < 0 || ib < 0) return null;
    return p.estimate / Math.sqrt(sol.residualVariances[ia] * sol.residualVariances[ib]);
  };
  return (
    <figure className="path-figure">
      <figcaption>
        Standardized solution: loadings on the arrows, factor correlations on the left, residual covariances
        on the right (as correlations), and each item’s unexplained share beside it.
      </figcaption>
      <svg
        viewBox={`0 0 720 ${height}`}
        width="100%"
        role="img"
        aria-label={`Path figure of ${fit.factors.length} factors and ${order.length} items`}
      >
        <defs>
          <marker
            id="arrow"
            viewBox="0 0 10 10"
            refX="9"
            refY="5"
            markerWidth="7"
            markerHeight="7"
            orient="auto-start-reverse"
          >
            <path d="M 0 0 L 10 5 L 0 10 z" fill={INK} />
          </marker>
        </defs>
        {arcs.map(({ a, b, value }) => {
          const ya = factorY[a];
          const yb = factorY[b];
          const edge = FACTOR_X - RX;
          // Arcs between factors further apart bend further out, so that they nest without crossing labels.
          const bend = edge - 2 * ARC_STEP * (b - a);
          const mid = (ya + yb) / 2;
          return (
            <g key={`${a}-${b}`}>
              <path
                d={`M ${edge} ${ya} Q ${bend} ${mid} ${edge} ${yb}`}
                fill="none"
                stroke={ACCENT}
                strokeWidth={1}
                markerStart="url(#arrow)"
                markerEnd="url(#arrow)"
              />
              <text
                x={(bend + edge) / 2 - 3}
                y={mid + 4 + (b - a) * 2}
                fontSize={10}
                fill={ACCENT}
                textAnchor="end"
              >
                {bounded(value, 2)}
              </text>
            </g>
          );
        })}
        {fit.factors.map((name, j) => (
          <g key={name}>
            <ellipse cx={FACTOR_X} cy={factorY[j]} rx={RX} ry={RY} fill="#eef3f9" stroke={INK} />
            <text x={FACTOR_X} y={factorY[j] + 4} fontSize={11} textAnchor="middle" fill={INK}>
              {shortName(name)}
            </text>
          </g>
        ))}
        {order.map((item) => {
          const i = itemIndex(item);
          const owner = model.factors.find((x) => x.items.includes(item))?.name;
          const j = owner === undefined ? -1 : fit.factors.indexOf(owner);
          const iy = (y.get(item) ?? 0) + ITEM_H / 2;
          const loading = j >= 0 ? sol.standardizedLoadings[i][j] : 0;
          return (
            <g key={item}>
              <line
                x1={FACTOR_X + RX}
                y1={factorY[j]}
                x2={ITEM_X - 2}
                y2={iy}
                stroke={INK}
                strokeWidth={0.8}
                markerEnd="url(#arrow)"
              />
              <text x={ITEM_X - 8} y={iy - 3} fontSize={10} textAnchor="end" fill={INK}>
                {bounded(loading, 2)}
              </text>
              <rect x={ITEM_X} y={iy - ITEM_H / 2} width={ITEM_W} height={ITEM_H} fill="#fff" stroke={INK} />
              <text x={ITEM_X + ITEM_W / 2} y={iy + 4} fontSize={11} textAnchor="middle" fill={INK}>
                {item}
              </text>
              <text x={ITEM_X + ITEM_W + 6} y={iy + 4} fontSize={9} fill="#6b7787">
                {bounded(sol.standardizedResidualVariances[i], 2)}
              </text>
            </g>
          );
        })}
        {model.residualCovariances.map((r) => {
          const ya = (y.get(r.a) ?? 0) + ITEM_H / 2;
          const yb = (y.get(r.b) ?? 0) + ITEM_H / 2;
          const x = ITEM_X + ITEM_W + 34;
          const bend = x + 30 + Math.abs(yb - ya) * 0.12;
          return (
            <g key={`${r.a}~${r.b}`}>
              <path
                d={`M ${x} ${ya} Q ${bend} ${(ya + yb) / 2} ${x} ${yb}`}
                fill="none"
                stroke={WARM}
                markerStart="url(#arrow)"
                markerEnd="url(#arrow)"
              />
              <text x={(x + bend) / 2 + 6} y={(ya + yb) / 2 + 4} fontSize={10} fill={WARM}>
                {bounded(residualCorr(r.a, r.b), 2)}
              </text>
            </g>
          );
        })}
      </svg>
    </figure>
  );
}
