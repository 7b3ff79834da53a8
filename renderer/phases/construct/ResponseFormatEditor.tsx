import { useEffect, useState } from 'react';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';

export function ResponseFormatEditor(props: { points: number; min: number; anchors: string[] }) {
  const save = useMutation('construct.setResponseFormat');
  const [points, setPoints] = useState(props.points);
  const [min, setMin] = useState(props.min);
  const [anchors, setAnchors] = useState(props.anchors);
  useEffect(() => {
    setPoints(props.points);
    setMin(props.min);
    setAnchors(props.anchors);
  }, [props.points, props.min, props.anchors]);

  const resized = Array.from({ length: points }, (_, i) => anchors[i] ?? '');
  const dirty =
    points !== props.points || min !== props.min || resized.some((a, i) => a !== props.anchors[i]);
  return (
    <Panel title="Response format">
      <div className="format-row">
        <label>
          Points
          <input
            type="number"
            min={2}
            max={11}
            value={points}
            onChange={(e) => setPoints(Math.max(2, Math.min(11, Number(e.target.value))))}
          />
        </label>
        <label>
          Lowest value
          <input
            type="number"
            min={-10}
            max={10}
            value={min}
            onChange={(e) => setMin(Number(e.target.value))}
          />
        </label>
        <span className="muted">
          Scored {min} to {min + points - 1}; reverse-keyed items score as {min} + {min + points - 1} − x.
        </span>
      </div>
      <ol className="anchor-list">
        {resized.map((anchor, i) => (
          // biome-ignore lint/suspicious/noArrayIndexKey: anchors are positional
          <li key={i}>
            <span className="anchor-value">{min + i}</span>
            <input
              aria-label={`Label for ${min + i}`}
              value={anchor}
              placeholder={i === 0 || i === points - 1 ? 'label (required at the ends)' : 'label (optional)'}
              onChange={(e) => setAnchors(resized.map((a, j) => (j === i ? e.target.value : a)))}
            />
          </li>
        ))}
      </ol>
      <button
        type="button"
        className="secondary"
        disabled={!dirty || save.busy}
        onClick={() => save.run({ points, min, anchors: resized })}
      >
        Save response format
      </button>
      <ErrorNote message={save.error} />
    </Panel>
  );
}
