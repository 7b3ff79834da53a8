import { bounded, unbounded } from '../../api/format.ts';
import type { Shape } from './model.ts';

/**
 * The appendix's figures, drawn by us as vector shapes (see `Shape`) in grey scale with one accent,
 * so that they print: a scree plot with parallel analysis, alpha across rounds, a loadings heat map
 * and a path diagram of the confirmatory model.
 */

export const FIGURE_WIDTH = 430;
const INK = '#222222';
const GREY = '#777777';
const LIGHT = '#d9d9d9';
const ACCENT = '#1f5f99';
const FONT = 8.5;

interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
}

interface Axis {
  min: number;
  max: number;
  ticks: number[];
}

/** A tidy axis from min to max with about five ticks on 1, 2 or 5 steps. */
function niceAxis(lo: number, hi: number): Axis {
  const span = hi - lo || 1;
  const raw = span / 5;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? raw;
  const min = Math.floor(lo / step) * step;
  const max = Math.ceil(hi / step) * step;
  const ticks: number[] = [];
  for (let t = min; t <= max + step / 2; t += step) ticks.push(Number(t.toFixed(10)));
  return { min, max, ticks };
}

function text(
  x: number,
  y: number,
  value: string,
  anchor: 'start' | 'middle' | 'end' = 'middle',
  extra: Partial<Extract<Shape, { type: 'text' }>> = {},
): Shape {
  return { type: 'text', x, y, text: value, size: FONT, anchor, fill: INK, ...extra };
}

/** Axes with ticks, grid lines and titles; returns the shapes and the value-to-point maps. */
function axes(
  frame: Frame,
  x: Axis,
  y: Axis,
  titles: { x: string; y: string },
  labels: { x: (v: number) => string; y: (v: number) => string },
) {
  const px = (v: number) => frame.left + ((v - x.min) / (x.max - x.min || 1)) * frame.width;
  const py = (v: number) => frame.top + frame.height - ((v - y.min) / (y.max - y.min || 1)) * frame.height;
  const shapes: Shape[] = [];
  for (const t of y.ticks) {
    shapes.push({
      type: 'line',
      x1: frame.left,
      y1: py(t),
      x2: frame.left + frame.width,
      y2: py(t),
      stroke: LIGHT,
      width: 0.5,
    });
    shapes.push(text(frame.left - 4, py(t) + 3, labels.y(t), 'end'));
  }
  for (const t of x.ticks) shapes.push(text(px(t), frame.top + frame.height + 11, labels.x(t)));
  const bottom = frame.top + frame.height;
  shapes.push({
    type: 'line',
    x1: frame.left,
    y1: bottom,
    x2: frame.left + frame.width,
    y2: bottom,
    stroke: INK,
    width: 0.8,
  });
  shapes.push({
    type: 'line',
    x1: frame.left,
    y1: frame.top,
    x2: frame.left,
    y2: bottom,
    stroke: INK,
    width: 0.8,
  });
  shapes.push(text(frame.left + frame.width / 2, bottom + 25, titles.x));
  shapes.push(text(frame.left - 30, frame.top + frame.height / 2, titles.y, 'middle', { rotate: -90 }));
  return { shapes, px, py };
}

function legend(
  x: number,
  y: number,
  entries: { label: string; stroke: string; dash?: number; marker?: boolean }[],
): Shape[] {
  const shapes: Shape[] = [];
  entries.forEach((e, i) => {
    const yy = y + i * 12;
    shapes.push({
      type: 'line',
      x1: x,
      y1: yy,
      x2: x + 18,
      y2: yy,
      stroke: e.stroke,
      width: 1.2,
      dash: e.dash,
    });
    if (e.marker) shapes.push({ type: 'circle', cx: x + 9, cy: yy, r: 2.2, fill: e.stroke });
    shapes.push(text(x + 23, yy + 3, e.label, 'start'));
  });
  return shapes;
}

/** Eigenvalues in order, with the parallel-analysis eigenvalues (at their percentile) when present. */
export function screePlot(eigenvalues: number[], parallel: number[] | null, percentile: number | null) {
  const height = 220;
  const frame: Frame = { left: 50, top: 12, width: FIGURE_WIDTH - 70, height: height - 55 };
  const top = Math.max(...eigenvalues, ...(parallel ?? []), 1);
  const x = niceAxis(1, eigenvalues.length);
  x.min = 1;
  x.max = Math.max(eigenvalues.length, 2);
  x.ticks = eigenvalues.map((_, i) => i + 1);
  const y = niceAxis(0, top);
  const { shapes, px, py } = axes(
    frame,
    x,
    y,
    { x: 'Component', y: 'Eigenvalue' },
    {
      x: (v) => String(v),
      y: (v) => unbounded(v, 1),
    },
  );
  shapes.push({
    type: 'line',
    x1: frame.left,
    y1: py(1),
    x2: frame.left + frame.width,
    y2: py(1),
    stroke: GREY,
    width: 0.6,
    dash: 2,
  });
  shapes.push({
    type: 'polyline',
    points: eigenvalues.map((v, i) => [px(i + 1), py(v)]),
    stroke: INK,
    width: 1.2,
  });
  for (const [i, v] of eigenvalues.entries())
    shapes.push({ type: 'circle', cx: px(i + 1), cy: py(v), r: 2.4, fill: INK });
  const entries: { label: string; stroke: string; dash?: number; marker?: boolean }[] = [
    { label: 'Observed eigenvalues', stroke: INK, marker: true },
    { label: 'Eigenvalue of 1', stroke: GREY, dash: 2 },
  ];
  if (parallel) {
    shapes.push({
      type: 'polyline',
      points: parallel.map((v, i) => [px(i + 1), py(v)]),
      stroke: ACCENT,
      width: 1.2,
      dash: 4,
    });
    entries.push({ label: `Random data, ${percentile ?? 95}th percentile`, stroke: ACCENT, dash: 4 });
  }
  shapes.push(...legend(frame.left + frame.width - 150, frame.top + 8, entries));
  return { width: FIGURE_WIDTH, height, shapes };
}

/** Alpha of each round with its confidence interval, and the study's criterion as a line. */
export function alphaAcrossRounds(
  rounds: { number: number; alpha: number; lower: number; upper: number }[],
  criterion: number,
) {
  const height = 200;
  const frame: Frame = { left: 50, top: 12, width: FIGURE_WIDTH - 70, height: height - 55 };
  const lo = Math.min(criterion, ...rounds.map((r) => r.lower));
  const hi = Math.max(criterion, ...rounds.map((r) => r.upper));
  const y = niceAxis(Math.max(0, lo - 0.02), Math.min(1, hi + 0.02));
  const x: Axis = { min: 0.5, max: rounds.length + 0.5, ticks: rounds.map((_, i) => i + 1) };
  const { shapes, px, py } = axes(
    frame,
    x,
    y,
    { x: 'Purification round', y: 'Cronbach’s α' },
    {
      x: (v) => String(rounds[v - 1]?.number ?? v),
      y: (v) => bounded(v, 2),
    },
  );
  shapes.push({
    type: 'line',
    x1: frame.left,
    y1: py(criterion),
    x2: frame.left + frame.width,
    y2: py(criterion),
    stroke: GREY,
    width: 0.8,
    dash: 3,
  });
  shapes.push(
    text(frame.left + frame.width - 2, py(criterion) - 3, `criterion ${bounded(criterion, 2)}`, 'end', {
      fill: GREY,
    }),
  );
  shapes.push({
    type: 'polyline',
    points: rounds.map((r, i) => [px(i + 1), py(r.alpha)]),
    stroke: ACCENT,
    width: 1,
  });
  for (const [i, r] of rounds.entries()) {
    const cx = px(i + 1);
    shapes.push({ type: 'line', x1: cx, y1: py(r.lower), x2: cx, y2: py(r.upper), stroke: INK, width: 0.9 });
    shapes.push({
      type: 'line',
      x1: cx - 4,
      y1: py(r.lower),
      x2: cx + 4,
      y2: py(r.lower),
      stroke: INK,
      width: 0.9,
    });
    shapes.push({
      type: 'line',
      x1: cx - 4,
      y1: py(r.upper),
      x2: cx + 4,
      y2: py(r.upper),
      stroke: INK,
      width: 0.9,
    });
    shapes.push({ type: 'circle', cx, cy: py(r.alpha), r: 2.8, fill: ACCENT });
    shapes.push(text(cx + 7, py(r.alpha) + 3, bounded(r.alpha, 3), 'start'));
  }
  return { width: FIGURE_WIDTH, height, shapes };
}

/** Grey level of a loading's size: white at 0, dark at |1|. */
function shade(value: number): string {
  const level = Math.round(255 - Math.min(1, Math.abs(value)) * 190);
  const hex = level.toString(16).padStart(2, '0');
  return `#${hex}${hex}${hex}`;
}

/** Items by factors, each cell shaded by the loading's size and printed with its value. */
export function loadingsHeatmap(items: string[], factors: string[], loadings: number[][]) {
  const cellW = Math.min(70, (FIGURE_WIDTH - 80) / Math.max(1, factors.length));
  const cellH = 14;
  const left = 70;
  const top = 22;
  const shapes: Shape[] = [];
  for (const [j, f] of factors.entries())
    shapes.push(text(left + j * cellW + cellW / 2, top - 8, f, 'middle', { bold: true }));
  items.forEach((item, i) => {
    const y = top + i * cellH;
    shapes.push(text(left - 6, y + cellH / 2 + 3, item, 'end'));
    factors.forEach((_, j) => {
      const v = loadings[i]?.[j] ?? 0;
      shapes.push({
        type: 'rect',
        x: left + j * cellW,
        y,
        w: cellW,
        h: cellH,
        fill: shade(v),
        stroke: '#ffffff',
        width: 0.5,
      });
      shapes.push(
        text(left + j * cellW + cellW / 2, y + cellH / 2 + 3, bounded(v, 2), 'middle', {
          fill: Math.abs(v) > 0.55 ? '#ffffff' : INK,
          bold: Math.abs(v) >= 0.4,
        }),
      );
    });
  });
  return {
    width: Math.max(200, left + factors.length * cellW + 10),
    height: top + items.length * cellH + 8,
    shapes,
  };
}

/** A path diagram: each factor as a box on the left, its items on the right, the standardized loading beside each item. */
export function cfaDiagram(factors: { name: string; items: { name: string; loading: number | null }[] }[]) {
  const rowH = 15;
  const itemX = 250;
  const longest = Math.max(...factors.map((f) => f.name.length));
  const factorW = Math.min(200, Math.max(90, longest * 5.1 + 16));
  const factorX = 40;
  const shapes: Shape[] = [];
  let y = 8;
  for (const f of factors) {
    const start = y;
    for (const item of f.items) {
      shapes.push({
        type: 'rect',
        x: itemX,
        y,
        w: 56,
        h: rowH - 3,
        stroke: INK,
        fill: '#ffffff',
        width: 0.7,
      });
      shapes.push(text(itemX + 28, y + rowH / 2 + 1.5, item.name));
      if (item.loading !== null)
        shapes.push(text(itemX + 64, y + rowH / 2 + 1.5, bounded(item.loading, 2), 'start'));
      y += rowH;
    }
    const centre = (start + y - 3) / 2;
    for (const [i] of f.items.entries()) {
      const iy = start + i * rowH + (rowH - 3) / 2;
      shapes.push({
        type: 'line',
        x1: factorX + factorW,
        y1: centre,
        x2: itemX,
        y2: iy,
        stroke: GREY,
        width: 0.6,
      });
    }
    shapes.push({
      type: 'rect',
      x: factorX,
      y: centre - 10,
      w: factorW,
      h: 20,
      stroke: INK,
      fill: '#eef3f8',
      width: 1,
    });
    shapes.push(text(factorX + factorW / 2, centre + 3, f.name, 'middle', { bold: true }));
    y += 10;
  }
  return { width: 340, height: y, shapes };
}
