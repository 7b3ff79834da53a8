import type { RoundDetail } from '../../../app/api/contracts/purification.ts';
import { Panel } from '../../shared/components.tsx';
import { STAT_LABELS, bounded, plural, unbounded } from '../../../app/api/format.ts';
import { CriterionFootnote, CriterionMark } from '../../shared/criterion.tsx';

/** Overall and per-facet reliability of one round, each alpha with its CI, the study's criterion, n and missing-data method. */
export function ReliabilityPanel({ detail }: { detail: RoundDetail }) {
  const { scale, summary, criterion } = detail;
  const level = Math.round(scale.alphaCI.level * 100);
  const missing = scale.missingData.method === 'listwise' ? 'listwise deletion' : 'pairwise deletion';
  return (
    <Panel
      title={`Reliability, round ${summary.number}`}
      aside={
        <span className="muted">
          n = {scale.n} · {missing}
        </span>
      }
    >
      <div className="headline" data-testid="round-alpha">
        <div className="headline-main">
          <span className="headline-label">{STAT_LABELS.alpha}</span>
          <span className="headline-value">{bounded(scale.alpha.value)}</span>
          <CriterionMark value={scale.alpha.value} criterion={criterion} />
        </div>
        <p className="headline-detail">
          Based on {plural(scale.n, 'respondent')} after {plural(summary.excluded, 'exclusion')} (
          {summary.respondentsInFile} in the file
          {scale.missingData.dropped > 0 &&
            `; ${scale.missingData.dropped} more left out with missing answers`}
          ).
          <br />
          {level}% CI {bounded(scale.alphaCI.lower)} to {bounded(scale.alphaCI.upper)} (Feldt)
          {scale.bootstrapCI && (
            <>
              {' '}
              · bootstrap {bounded(scale.bootstrapCI.lower)} to {bounded(scale.bootstrapCI.upper)} (
              {plural(scale.bootstrapCI.resamples, 'resample')}, seed {scale.bootstrapCI.seed})
            </>
          )}
          <br />k = {scale.k} items · {scale.missingData.description}
        </p>
      </div>
      <dl className="stat-grid">
        <div>
          <dt>{STAT_LABELS.alphaStandardized}</dt>
          <dd>{scale.alphaStandardized ? bounded(scale.alphaStandardized.value) : '—'}</dd>
        </div>
        <div>
          <dt
            title={`From a one-factor model of the ${scale.omegaTotal?.items.length ?? scale.k} items that vary`}
          >
            {STAT_LABELS.omegaTotal} <span className="model-note">one factor</span>
          </dt>
          <dd>
            {scale.omegaTotal ? (
              <>
                {bounded(scale.omegaTotal.value)}{' '}
                <CriterionMark value={scale.omegaTotal.value} criterion={criterion} />
              </>
            ) : (
              '—'
            )}
          </dd>
        </div>
        <div>
          <dt>{STAT_LABELS.meanInterItemR}</dt>
          <dd>{bounded(scale.meanInterItemR)}</dd>
        </div>
        <div>
          <dt title="Standard error of measurement of the sum score, SD·√(1 − α)">SEM (sum score)</dt>
          <dd>{unbounded(scale.measurementError?.sem)}</dd>
        </div>
        <div>
          <dt title="Minimal detectable change, 1.96·√2·SEM (common practice)">MDC95</dt>
          <dd>{unbounded(scale.measurementError?.mdc95)}</dd>
        </div>
        <div>
          <dt title="Odd–even split-half correlation stepped up with Spearman–Brown">Split-half (S–B)</dt>
          <dd>{bounded(scale.splitHalf?.spearmanBrown)}</dd>
        </div>
        <div>
          <dt title="Guttman’s lower bound λ₂ from the item covariances">Guttman’s λ₂</dt>
          <dd>{scale.lambda2 === undefined ? 'not in this round' : bounded(scale.lambda2?.value)}</dd>
        </div>
        <div>
          <dt title="Guttman’s λ₆: each item’s error variance from its regression on the other items">
            Guttman’s λ₆
          </dt>
          <dd>{scale.lambda6 === undefined ? 'not in this round' : bounded(scale.lambda6?.value)}</dd>
        </div>
      </dl>

      <table className="data-table facet-table">
        <thead>
          <tr>
            <th>Facet</th>
            <th className="num">Items</th>
            <th className="num">n</th>
            <th className="num">α</th>
            <th>{level}% CI (Feldt)</th>
            <th>Criterion</th>
            <th className="num" title="From a one-factor model of the facet's own items">
              ω total (one factor)
            </th>
            <th>Note</th>
          </tr>
        </thead>
        <tbody>
          {detail.facets.map((f) => (
            <tr key={f.facetId}>
              <td title={f.definition}>{f.name}</td>
              <td className="num">{f.items.length}</td>
              <td className="num">{f.analysis?.n ?? '—'}</td>
              <td className="num">{bounded(f.analysis?.alpha.value)}</td>
              <td className="nowrap">
                {f.analysis
                  ? `${bounded(f.analysis.alphaCI.lower)} to ${bounded(f.analysis.alphaCI.upper)}`
                  : '—'}
              </td>
              <td>
                <CriterionMark value={f.analysis?.alpha.value} criterion={criterion} />
              </td>
              <td className="num">{bounded(f.analysis?.omegaTotal?.value)}</td>
              <td className="muted">{f.note ?? ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <CriterionFootnote criterion={criterion} />
      {scale.warnings.length > 0 && (
        <details className="warnings">
          <summary>{plural(scale.warnings.length, 'note')} from the analysis</summary>
          <ul>
            {scale.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </details>
      )}
      <p className="provenance muted">
        Stored as analysis run {summary.runId} (engine {detail.engineVersion}) on “{summary.datasetName}”,{' '}
        {summary.respondentsInFile} respondents in the file, {summary.excluded} excluded; declared range{' '}
        {detail.bounds.min}–{detail.bounds.max}.
      </p>
    </Panel>
  );
}
