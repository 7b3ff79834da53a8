import { useEffect, useState } from 'react';
import type { MeasurementModel } from '../../../app/api/contracts/validity.ts';
import { ErrorNote, Panel, ReasonAction } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import type { View } from './common.tsx';

function plain(view: View): MeasurementModel {
  return {
    factors: view.model.factors.map((f) => ({ name: f.name, items: [...f.items] })),
    orthogonal: view.model.orthogonal,
    residualCovariances: view.model.residualCovariances.map((r) => ({ ...r })),
  };
}

/**
 * The measurement model: items to factors, whether the factors correlate, and the residual
 * covariances freed (each with its reason). Built from purification's outcome until changed; every
 * change is saved with a reason and logged.
 */
export function ModelEditor({ view, locked }: { view: View; locked: boolean }) {
  const save = useMutation('validity.setModel');
  const [draft, setDraft] = useState<MeasurementModel>(() => plain(view));
  const key = JSON.stringify(plain(view));
  // biome-ignore lint/correctness/useExhaustiveDependencies: reset the draft when the stored model changes
  useEffect(() => setDraft(plain(view)), [key]);
  const changed = JSON.stringify(draft) !== key;
  const moveItem = (code: string, to: string) =>
    setDraft((d) => ({
      ...d,
      factors: d.factors.map((f) => ({
        ...f,
        items:
          f.name === to ? [...f.items.filter((i) => i !== code), code] : f.items.filter((i) => i !== code),
      })),
    }));
  return (
    <Panel
      title="Measurement model"
      aside={
        <span className="muted">
          {view.model.source === 'purification'
            ? `built from purification’s round ${view.retained.round ?? '–'}`
            : 'set with a reason'}
        </span>
      }
    >
      {view.model.withoutFacet.length > 0 && (
        <p className="stale">
          Retained items without a facet, left out: {view.model.withoutFacet.join(', ')}
        </p>
      )}
      <div className="model-factors">
        {draft.factors.map((f) => (
          <div key={f.name} className="model-factor">
            <h3>{f.name}</h3>
            <ul>
              {f.items.map((code) => (
                <li key={code}>
                  <span className="item-code">{code}</span>
                  {!locked && (
                    <select
                      aria-label={`Factor of ${code}`}
                      value={f.name}
                      onChange={(e) => moveItem(code, e.target.value)}
                    >
                      {draft.factors.map((o) => (
                        <option key={o.name} value={o.name}>
                          {o.name}
                        </option>
                      ))}
                    </select>
                  )}
                </li>
              ))}
            </ul>
          </div>
        ))}
      </div>
      <label className="inline-check">
        <input
          type="checkbox"
          disabled={locked}
          checked={!draft.orthogonal}
          onChange={(e) => setDraft((d) => ({ ...d, orthogonal: !e.target.checked }))}
        />{' '}
        Factors correlate
      </label>
      <h3 className="sub-head">Residual covariances freed</h3>
      {draft.residualCovariances.length === 0 ? (
        <p className="muted">None: each item’s unique part is independent of the others’.</p>
      ) : (
        <ul className="residual-list">
          {draft.residualCovariances.map((r) => (
            <li key={`${r.a}~${r.b}`}>
              <strong>
                {r.a} with {r.b}
              </strong>
              : {r.rationale}
              {!locked && (
                <button
                  type="button"
                  className="link"
                  onClick={() =>
                    setDraft((d) => ({
                      ...d,
                      residualCovariances: d.residualCovariances.filter((x) => x !== r),
                    }))
                  }
                >
                  Fix at zero
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
      <p className="muted">
        Residual covariances are added from the modification hints, each with its reason.
      </p>
      {!locked && changed && (
        <div className="model-save">
          <ReasonAction
            label="Save the model…"
            confirm="Save"
            placeholder="Why the model changes"
            onConfirm={(rationale) => save.run({ model: draft, rationale })}
          />
          <button type="button" className="link" onClick={() => setDraft(plain(view))}>
            Discard changes
          </button>
        </div>
      )}
      <ErrorNote message={save.error} />
    </Panel>
  );
}
