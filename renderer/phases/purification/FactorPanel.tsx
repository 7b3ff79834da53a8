import type { CSSProperties } from 'react';
import type { RoundDetail, RoundFactorView } from '../../../app/api/contracts/purification.ts';
import { bounded, NO_VALUE, plural, pValue, unbounded } from '../../../app/api/format.ts';
import { Panel } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { ScreeChart } from './charts.tsx';

const EXTRACTION_NAMES: Record<string, string> = {
  paf: 'principal axis',
  minres: 'minimum residual',
  ml: 'maximum likelihood',
};

/** Background of a loading cell: the stronger the loading, the deeper the blue. */
function heat(value: number): CSSProperties {
  const a = Math.min(1, Math.abs(value));
  return {
    backgroundColor: `rgba(47, 93, 138, ${(a * 0.55).toFixed(3)})`,
    color: a > 0.6 ? '#fff' : undefined,
  };
}

function settingsText(f: RoundFactorView): string {
  const r = f.request;
  return `${plural(r.factors, 'factor')} · ${EXTRACTION_NAMES[r.extraction] ?? r.extraction} · ${r.rotation === 'none' ? 'unrotated' : r.rotation} · ${r.correlation} correlations · n = ${f.n}`;
}

/**
 * A round's factor analysis: factorability, the factor-count evidence side by side with the scree
 * plot, the chosen solution's loading table with heat shading and flags, factor correlations, the
 * facet-by-factor table, and which model each omega rests on.
 */
export function FactorPanel({ detail }: { detail: RoundDetail }) {
  const f = detail.factor;
  if (!f) {
    return (
      <Panel title={`Factor analysis, round ${detail.summary.number}`}>
        <p className="muted">{detail.factorNote}</p>
      </Panel>
    );
  }
  const ids = ['efa.kmo', 'efa.bartlett', 'efa.kaiser', 'efa.parallel', 'efa.parallel-factors', 'efa.map'];
  ids.push(
    `efa.${f.request.extraction}`,
    'rule.primary-loading',
    'rule.cross-loading',
    'rule.intended-facet',
  );
  return (
    <Panel
      title={`Factor analysis, round ${detail.summary.number}`}
      aside={<span className="muted">{settingsText(f)}</span>}
    >
      <div className="factor-top">
        <Factorability factor={f} />
        <CountEvidence factor={f} />
      </div>
      <ScreeChart factor={f} />
      {f.solution ? (
        <>
          <LoadingTable factor={f} />
          <FactorCorrelations factor={f} />
          <Correspondence factor={f} />
          <OmegaModels detail={detail} factor={f} />
        </>
      ) : (
        <p className="error-note">The solution could not be computed: {f.refused}</p>
      )}
      {f.warnings.length > 0 && (
        <details className="warnings">
          <summary>{plural(f.warnings.length, 'note')} from the factor analysis</summary>
          <ul>
            {f.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </details>
      )}
      <SourceNotes ids={ids} />
    </Panel>
  );
}

function Factorability({ factor }: { factor: RoundFactorView }) {
  const fa = factor.factorability;
  const low = fa.msa.filter((m) => m.value < 0.5);
  const lowest = [...fa.msa].sort((a, b) => a.value - b.value)[0];
  return (
    <section className="factorability" aria-label="Factorability">
      <h3>Factorability</h3>
      <dl className="stat-grid">
        <div>
          <dt title="Kaiser–Meyer–Olkin measure of sampling adequacy">KMO</dt>
          <dd data-testid="kmo">
            {bounded(fa.kmo)} <span className="muted">{fa.kmoLabel}</span>
          </dd>
        </div>
        <div>
          <dt>Bartlett’s test</dt>
          <dd>
            {fa.bartlett
              ? `χ² = ${unbounded(fa.bartlett.chiSquare, 1)}, df = ${fa.bartlett.df}, ${pValue(fa.bartlett.p)}`
              : 'not defined (singular R)'}
          </dd>
        </div>
        <div>
          <dt title="Per-item measure of sampling adequacy">Lowest MSA</dt>
          <dd>
            {lowest ? `${bounded(lowest.value)} (${lowest.code})` : NO_VALUE}
            {low.length > 0 && <span className="flag"> below .50: {low.map((m) => m.code).join(', ')}</span>}
          </dd>
        </div>
      </dl>
      {factor.smoothed && <p className="hint">The correlation matrix was smoothed to positive definite.</p>}
    </section>
  );
}

function CountEvidence({ factor }: { factor: RoundFactorView }) {
  const s = factor.evidence.suggested;
  const rows: [string, number | null][] = [
    ['Facets in the round (default)', factor.facetCount],
    ['Kaiser: eigenvalues above 1', s.kaiser],
    ['Parallel analysis, components', s.parallel],
    ['Parallel analysis, common factors', s.parallelFactors],
    ['MAP, squared partials', s.map],
    ['MAP, 4th-power partials', s.mapFourth],
  ];
  return (
    <section className="count-evidence" aria-label="How many factors">
      <h3>How many factors</h3>
      <table className="data-table">
        <tbody>
          {rows.map(([label, value]) => (
            <tr key={label}>
              <td>{label}</td>
              <td className="num">{value ?? NO_VALUE}</td>
            </tr>
          ))}
          <tr className="chosen">
            <td>
              <strong>Chosen for this round</strong>
            </td>
            <td className="num">
              <strong>{factor.request.factors}</strong>
            </td>
          </tr>
        </tbody>
      </table>
      <p className="hint">All the evidence is shown; the count is your choice when you run a round.</p>
    </section>
  );
}

function LoadingTable({ factor }: { factor: RoundFactorView }) {
  const sol = factor.solution;
  if (!sol) return null;
  const ks = Array.from({ length: sol.factors }, (_, k) => k);
  const t = factor.thresholds;
  return (
    <section aria-label="Loadings">
      <h3>
        {sol.oblique ? 'Pattern loadings' : 'Loadings'}{' '}
        <span className="muted">
          · bold: the item’s largest loading · flags at primary &lt; {bounded(t.primaryLoadingMin, 2)}, cross
          ≥ {bounded(t.crossLoadingMin, 2)} (common practice)
        </span>
      </h3>
      <div className="table-scroll">
        <table className="data-table loading-table">
          <thead>
            <tr>
              <th>Item</th>
              <th>Facet</th>
              {ks.map((k) => (
                <th key={k} className="num">
                  F{k + 1}
                </th>
              ))}
              <th className="num">h²</th>
              <th>Flags</th>
            </tr>
          </thead>
          <tbody>
            {sol.rows.map((row) => (
              <tr
                key={row.code}
                data-code={row.code}
                className={row.flags.length > 0 ? 'flagged' : undefined}
              >
                <td className="code">{row.code}</td>
                <td className="lt-facet">
                  {row.facetName ?? NO_VALUE}
                  {row.intended !== null && <span className="muted"> (F{row.intended})</span>}
                </td>
                {row.loadings.map((v, k) => (
                  <td
                    key={ks[k]}
                    className={k + 1 === row.primary ? 'num loading primary' : 'num loading'}
                    style={heat(v)}
                  >
                    {bounded(v, 2)}
                  </td>
                ))}
                <td className="num">{bounded(row.communality, 2)}</td>
                <td>
                  {row.flags.map((flag) => (
                    <span key={flag.rule} className={`flag flag-${flag.rule}`} title={flag.text}>
                      {flag.rule === 'low-primary'
                        ? 'low loading'
                        : flag.rule === 'cross-loading'
                          ? 'cross-loads'
                          : 'other factor'}
                    </span>
                  ))}
                </td>
              </tr>
            ))}
          </tbody>
          <tfoot>
            <tr>
              <td colSpan={2}>Sum of squared loadings</td>
              {sol.variance.map((v, k) => (
                <td key={ks[k]} className="num">
                  {unbounded(v.ss)}
                </td>
              ))}
              <td colSpan={2} />
            </tr>
          </tfoot>
        </table>
      </div>
      {sol.fit && (
        <p className="hint">
          Fit of the {plural(sol.factors, 'factor')}: χ² = {unbounded(sol.fit.chiSquare, 1)}, df ={' '}
          {sol.fit.df}
          {sol.fit.p !== null && `, ${pValue(sol.fit.p)}`}; RMSEA {bounded(sol.fit.rmsea)}; TLI{' '}
          {bounded(sol.fit.tli)}.
        </p>
      )}
      {sol.heywood.length > 0 && (
        <p className="error-note">Heywood case (communality at 1): {sol.heywood.join(', ')}.</p>
      )}
    </section>
  );
}

function FactorCorrelations({ factor }: { factor: RoundFactorView }) {
  const sol = factor.solution;
  if (!sol?.oblique || sol.factors < 2) return null;
  const ks = Array.from({ length: sol.factors }, (_, k) => k);
  return (
    <section aria-label="Factor correlations">
      <h3>Factor correlations</h3>
      <table className="data-table compact-table">
        <thead>
          <tr>
            <th />
            {ks.map((k) => (
              <th key={k} className="num">
                F{k + 1}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {sol.factorCorrelations.map((row, i) => (
            <tr key={ks[i]}>
              <th>F{i + 1}</th>
              {row.map((v, k) => (
                <td key={ks[k]} className="num">
                  {k <= i ? bounded(v, 2) : ''}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

function Correspondence({ factor }: { factor: RoundFactorView }) {
  const sol = factor.solution;
  if (!sol) return null;
  const ks = Array.from({ length: sol.factors }, (_, k) => k);
  return (
    <section aria-label="Facets and factors">
      <h3>
        Facets and factors{' '}
        <span className="muted">· items whose largest loading falls on each factor (mean |loading|)</span>
      </h3>
      <table className="data-table compact-table correspondence-table">
        <thead>
          <tr>
            <th>Facet</th>
            <th className="num">Items</th>
            {ks.map((k) => (
              <th key={k} className="num">
                F{k + 1}
              </th>
            ))}
            <th>Matched factor</th>
          </tr>
        </thead>
        <tbody>
          {factor.correspondence.map((row) => (
            <tr key={row.facetId}>
              <td>{row.facetName}</td>
              <td className="num">{row.items}</td>
              {row.primaryCounts.map((c, k) => (
                <td key={ks[k]} className={row.factor === k + 1 ? 'num matched' : 'num'}>
                  {c} <span className="muted">({bounded(row.meanAbsLoading[k], 2)})</span>
                </td>
              ))}
              <td>{row.factor === null ? 'none (more facets than factors)' : `F${row.factor}`}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

function OmegaModels({ detail, factor }: { detail: RoundDetail; factor: RoundFactorView }) {
  const omega = factor.solution?.omega;
  const one = detail.scale.omegaTotal;
  return (
    <section aria-label="Omega and its models">
      <h3>Omega, and the model each rests on</h3>
      <table className="data-table compact-table omega-table">
        <tbody>
          <tr>
            <td>ω total</td>
            <td className="num">{bounded(one?.value)}</td>
            <td className="muted">one-factor model of the {one?.items.length ?? detail.scale.k} items</td>
          </tr>
          {omega ? (
            <>
              <tr>
                <td>ω hierarchical</td>
                <td className="num">{bounded(omega.omegaHierarchical)}</td>
                <td className="muted">general factor of the {omega.model}</td>
              </tr>
              <tr>
                <td>ω total</td>
                <td className="num">{bounded(omega.omegaTotal)}</td>
                <td className="muted">general and group factors of the same solution</td>
              </tr>
            </>
          ) : (
            <tr>
              <td>ω hierarchical</td>
              <td className="num">{NO_VALUE}</td>
              <td className="muted">needs a solution with two or more factors</td>
            </tr>
          )}
          {detail.facets.map((f) => (
            <tr key={f.facetId}>
              <td>ω total, {f.name}</td>
              <td className="num">{bounded(f.analysis?.omegaTotal?.value)}</td>
              <td className="muted">one-factor model of the facet’s {f.items.length} items</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
