import { Fragment, useState } from 'react';
import { ExportButton } from '../../shared/export-button.tsx';
import type { RoundItemView, RoundView } from '../../../app/api/contracts/review.ts';
import type { Decision } from '../../../app/api/contracts/review.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { bounded, plural } from '../../../app/api/format.ts';

const DECISION_LABEL: Record<Decision, string> = { keep: 'Kept', revise: 'Revised', retire: 'Retired' };

/** The round's content-validity statistics: scale summary, facets, and the item table with decisions. */
export function StatsPanel(props: {
  round: RoundView;
  locked: boolean;
  benchmarks: { sCviAve: number; precision: number };
}) {
  const { round, locked, benchmarks } = props;
  const report = round.report;
  const [flaggedOnly, setFlaggedOnly] = useState(false);
  if (!report) return null;
  const panel = report.experts.length;
  const hasCvr = round.items.some((it) => it.stats?.cvr !== null && it.stats?.cvr !== undefined);
  const hasPlacement = round.items.some(
    (it) => it.stats?.facetAgreement !== null && it.stats?.facetAgreement !== undefined,
  );
  const shown = flaggedOnly ? round.items.filter((it) => (it.stats?.flags.length ?? 0) > 0) : round.items;
  const relevantFrom = Math.floor((report.scale.min + report.scale.max) / 2) + 1;
  return (
    <Panel
      title="Content validity"
      aside={
        <span className="muted">
          {plural(panel, 'expert')} · relevant = {relevantFrom}–{report.scale.max}
          {round.runId !== null && ` · stored as analysis run ${round.runId}`} ·{' '}
          <ExportButton request={{ kind: 'content-validity', roundId: round.id }} />
        </span>
      }
    >
      <StatLegend />
      <div className="stat-tiles">
        <Tile
          label="S-CVI/Ave"
          value={bounded(report.sCviAve, 2)}
          note={`mean I-CVI; benchmark ${bounded(benchmarks.sCviAve, 2)} (Polit & Beck 2006)`}
          state={report.flags.length > 0 ? 'bad' : 'good'}
        />
        <Tile
          label="S-CVI/UA"
          value={bounded(report.sCviUa, 2)}
          note="share of items every expert rated relevant"
        />
        <Tile
          label="Flagged items"
          value={String(round.flagged)}
          note={
            round.flagged === 0 ? 'none below a benchmark' : `${round.decided} of ${round.flagged} decided`
          }
          state={round.flagged > round.decided ? 'bad' : undefined}
        />
        {report.facetSorting && (
          <Tile
            label="Facet sorting"
            value={bounded(report.facetSorting.fleissKappa, 2)}
            note={
              report.facetSorting.fleissKappa === null
                ? 'Fleiss’ kappa not computed (see notes)'
                : `Fleiss’ kappa, ${plural(report.facetSorting.raters, 'expert')} × ${plural(report.facetSorting.itemsUsed, 'item')}`
            }
          />
        )}
        <Tile
          label="Critical CVR"
          value={round.form.asksEssential ? bounded(report.cvrCritical, 3) : 'not asked'}
          note={
            round.form.asksEssential
              ? `exact binomial, one-tailed .05, for ${plural(panel, 'expert')}`
              : 'the form did not ask the essential question'
          }
        />
      </div>
      {(report.flags.length > 0 || report.warnings.length > 0) && (
        <ul className="warning-list stat-notes">
          {report.flags.map((f) => (
            <li key={f} className="scale-flag">
              {f}
            </li>
          ))}
          {report.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      {report.facets.length > 0 && (
        <table className="data-table facet-cvi">
          <thead>
            <tr>
              <th>Facet</th>
              <th className="num">Items</th>
              <th className="num">S-CVI/Ave</th>
              <th className="num">S-CVI/UA</th>
            </tr>
          </thead>
          <tbody>
            {report.facets.map((f) => (
              <tr key={f.facet}>
                <td>{f.facet}</td>
                <td className="num">{f.items}</td>
                <td
                  className={`num${f.sCviAve < benchmarks.sCviAve - benchmarks.precision ? ' cell-flagged' : ''}`}
                >
                  {bounded(f.sCviAve, 2)}
                </td>
                <td className="num">{bounded(f.sCviUa, 2)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <div className="review-filters">
        <label className="inline-check">
          <input type="checkbox" checked={flaggedOnly} onChange={(e) => setFlaggedOnly(e.target.checked)} />{' '}
          Only flagged items
        </label>
      </div>
      <div className="table-scroll">
        <table className="data-table cvi-table">
          <thead>
            <tr>
              <th>Item</th>
              <th className="num" title="Experts who rated the item / panel size">
                Rated
              </th>
              <th className="num">I-CVI</th>
              <th className="num">k*</th>
              <th>Band</th>
              {hasCvr && <th className="num">CVR</th>}
              <th className="num">V</th>
              {hasPlacement && (
                <th className="num" title="Share of experts placing the item in its intended facet">
                  Placed
                </th>
              )}
              <th>Benchmarks and flags</th>
              <th>Decision</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((it) => (
              <ItemStatsRow
                key={it.itemId}
                item={it}
                round={round}
                panel={panel}
                hasCvr={hasCvr}
                hasPlacement={hasPlacement}
                locked={locked}
              />
            ))}
          </tbody>
        </table>
      </div>
    </Panel>
  );
}

function StatLegend() {
  return (
    <details className="stat-legend">
      <summary>Reading the statistics</summary>
      <dl>
        <dt>I-CVI</dt>
        <dd>
          Share of experts rating the item 3 or 4 (relevant). Benchmark 1.00 with 3–5 experts (Lynn 1986), .78
          or more with 6 or more (Polit &amp; Beck 2006).
        </dd>
        <dt>k* (modified kappa)</dt>
        <dd>
          I-CVI adjusted for chance agreement, Pc = C(N, A)·.5ᴺ (Polit, Beck &amp; Owen 2007). Bands: above
          .74 excellent, .60–.74 good, .40–.59 fair, below .40 poor.
        </dd>
        <dt>CVR</dt>
        <dd>
          Lawshe’s (1975) content validity ratio from the essential answers, (nₑ − N/2)/(N/2), against the
          exact one-tailed binomial critical value at .05 for the panel size (Wilson, Pan &amp; Schumsky
          2012).
        </dd>
        <dt>V</dt>
        <dd>Aiken’s (1985) V: the ratings rescaled to 0–1; 1 when every expert gives the top rating.</dd>
        <dt>Placed</dt>
        <dd>
          Share of experts who put the item in its intended facet; Fleiss’ (1971) kappa gives the sorting
          agreement across all items.
        </dd>
        <dt>S-CVI</dt>
        <dd>
          /Ave: the mean I-CVI, benchmark .90 (Polit &amp; Beck 2006). /UA: the share of items every expert
          rated relevant.
        </dd>
      </dl>
    </details>
  );
}

function Tile(props: { label: string; value: string; note: string; state?: 'good' | 'bad' }) {
  return (
    <div className={`stat-tile${props.state ? ` tile-${props.state}` : ''}`}>
      <span className="tile-label">{props.label}</span>
      <span className="tile-value">{props.value}</span>
      <span className="tile-note">{props.note}</span>
    </div>
  );
}

function ItemStatsRow(props: {
  item: RoundItemView;
  round: RoundView;
  panel: number;
  hasCvr: boolean;
  hasPlacement: boolean;
  locked: boolean;
}) {
  const { item, round } = props;
  const [open, setOpen] = useState(false);
  const s = item.stats;
  const flags = s?.flags ?? [];
  const columns = 8 + (props.hasCvr ? 1 : 0) + (props.hasPlacement ? 1 : 0);
  return (
    <Fragment>
      <tr className={flags.length > 0 ? 'row-flagged' : undefined} data-code={item.code}>
        <td className="item-cell">
          <strong>{item.code}</strong>{' '}
          <span className="muted">
            {item.facetName ?? 'no facet'} · #{item.packetNumber}
          </span>
          <span className="item-cell-text">{item.text}</span>
          {item.rewordedSince && <span className="tag-note">reworded since this round</span>}
          {item.comments.length > 0 && (
            <details className="comments">
              <summary>{plural(item.comments.length, 'comment')}</summary>
              <ul>
                {item.comments.map((c) => (
                  <li key={`${c.expert}-${c.text}`}>
                    <strong>{c.expert}:</strong> {c.text}
                  </li>
                ))}
              </ul>
            </details>
          )}
        </td>
        <td className="num nowrap">{s ? `${s.rated}/${props.panel}` : '–'}</td>
        <td className="num">{bounded(s?.iCvi, 2)}</td>
        <td className="num">{bounded(s?.modifiedKappa, 2)}</td>
        <td>{s?.kappaBand ? <span className={`band band-${s.kappaBand}`}>{s.kappaBand}</span> : '–'}</td>
        {props.hasCvr && (
          <td
            className="num"
            title={
              s?.cvrCritical === null
                ? 'no critical value for this number of answers'
                : `critical ${bounded(s?.cvrCritical, 3)}`
            }
          >
            {bounded(s?.cvr, 2)}
          </td>
        )}
        <td className="num">{bounded(s?.aikenV, 2)}</td>
        {props.hasPlacement && <td className="num">{bounded(s?.facetAgreement, 2)}</td>}
        <td className="flag-cell">
          {flags.length > 0 && (
            <ul>
              {flags.map((f) => (
                <li key={f}>{f}</li>
              ))}
            </ul>
          )}
          {flags.length === 0 && props.item.benchmarksMet.length > 0 && (
            <span className="muted benchmarks-met">meets {props.item.benchmarksMet.join('; ')}</span>
          )}
          {props.item.wordingFlags.length > 0 && (
            <span className="wording-stand">
              wording flags stand: {props.item.wordingFlags.join(', ')} (common practice)
            </span>
          )}
        </td>
        <td className="decision-cell">
          {item.decision ? (
            <div className="decision-made">
              <span className={`decision-badge decision-${item.decision.decision}`}>
                {DECISION_LABEL[item.decision.decision]}
              </span>
              {item.decision.newText && <span className="decision-text">now: “{item.decision.newText}”</span>}
              <span className="decision-rationale">{item.decision.rationale}</span>
            </div>
          ) : flags.length > 0 ? (
            <span className="needs-decision">needs a decision</span>
          ) : null}
          {!props.locked && !open && (
            <button type="button" className="link" onClick={() => setOpen(true)}>
              {item.decision ? 'Change…' : 'Decide…'}
            </button>
          )}
        </td>
      </tr>
      {open && (
        <tr className="decision-row">
          <td colSpan={columns}>
            <DecisionForm item={item} roundId={round.id} onDone={() => setOpen(false)} />
          </td>
        </tr>
      )}
    </Fragment>
  );
}

function DecisionForm({ item, roundId, onDone }: { item: RoundItemView; roundId: number; onDone(): void }) {
  const decide = useMutation('review.decide');
  const [decision, setDecision] = useState<Decision>(item.decision?.decision ?? 'keep');
  const [rationale, setRationale] = useState('');
  const [newText, setNewText] = useState(item.text);
  return (
    <form
      className="decision-form"
      aria-label={`Decision on ${item.code}`}
      onSubmit={async (e) => {
        e.preventDefault();
        const done = await decide.run({
          roundId,
          itemId: item.itemId,
          decision,
          rationale,
          ...(decision === 'revise' ? { newText } : {}),
        });
        if (done !== undefined) onDone();
      }}
    >
      <fieldset className="decision-choice">
        <legend>Decision on {item.code}</legend>
        {(['keep', 'revise', 'retire'] as const).map((d) => (
          <label key={d} className="inline-radio">
            <input
              type="radio"
              name={`decision-${item.itemId}`}
              value={d}
              checked={decision === d}
              onChange={() => setDecision(d)}
            />
            {d === 'keep' ? 'Keep as it is' : d === 'revise' ? 'Revise the wording' : 'Retire the item'}
          </label>
        ))}
      </fieldset>
      {decision === 'revise' && (
        <label className="decision-field">
          New wording (kept as a new revision; the rated wording stays in the history)
          <textarea rows={2} value={newText} onChange={(e) => setNewText(e.target.value)} />
        </label>
      )}
      <label className="decision-field">
        Rationale (goes into the decision log)
        <textarea
          rows={2}
          value={rationale}
          placeholder="Why: what the statistics and the comments show, and how the item relates to the construct"
          onChange={(e) => setRationale(e.target.value)}
        />
      </label>
      <div className="button-row">
        <button type="submit" className="primary" disabled={rationale.trim() === '' || decide.busy}>
          Record decision
        </button>
        <button type="button" className="link" onClick={onDone}>
          Cancel
        </button>
      </div>
      <ErrorNote message={decide.error} />
    </form>
  );
}
