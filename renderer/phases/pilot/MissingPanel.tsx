import type { MissingData } from '../../../app/api/contracts/pilot.ts';
import { Panel } from '../../shared/components.tsx';
import { percentOf, plural } from '../../../app/api/format.ts';

/**
 * Missing answers of a dataset, as the analyses see it (the file minus the current exclusions): per
 * item, per respondent, and what listwise deletion keeps; pairwise deletion uses every answer given.
 */
export function MissingPanel({ missing, all }: { missing: MissingData; all: MissingData }) {
  const most = Math.max(1, ...missing.perItem.map((i) => i.missing));
  const lastCount = missing.perRespondent.findLastIndex((n) => n > 0);
  return (
    <Panel title="Missing answers">
      <p data-testid="missing-summary">
        Of the {plural(missing.respondents, 'respondent')} in the analyses,{' '}
        <strong>{missing.completeCases.toLocaleString('en')}</strong> answered every item: listwise deletion
        keeps them ({percentOf(missing.completeCases, missing.respondents)}); pairwise deletion uses every
        answer given. Each analysis run stores which of the two it used.
        {all.respondents !== missing.respondents &&
          ` Over the whole file (${plural(all.respondents, 'respondent')}), ${all.completeCases.toLocaleString('en')} are complete.`}
      </p>
      <h3 className="step-title">Per item</h3>
      <ul className="missing-items" aria-label="Missing answers per item">
        {missing.perItem.map((item) => (
          <li key={item.column} title={item.column !== item.itemCode ? `column ${item.column}` : undefined}>
            <span className="missing-code">{item.itemCode}</span>
            <span className="bar-track">
              <span className="bar" style={{ width: `${(100 * item.missing) / most}%` }} />
            </span>
            <span className="num">{item.missing}</span>
            <span className="num muted">{percentOf(item.missing, missing.respondents)}</span>
          </li>
        ))}
      </ul>
      <h3 className="step-title">Per respondent</h3>
      <table className="data-table missing-table">
        <thead>
          <tr>
            <th>Items unanswered</th>
            {missing.perRespondent.slice(0, lastCount + 1).map((n, unanswered) =>
              n === 0 && unanswered > 0 ? null : (
                // biome-ignore lint/suspicious/noArrayIndexKey: the index is the number of unanswered items
                <th key={unanswered} className="num">
                  {unanswered}
                </th>
              ),
            )}
          </tr>
        </thead>
        <tbody>
          <tr>
            <td>Respondents</td>
            {missing.perRespondent.slice(0, lastCount + 1).map((n, unanswered) =>
              n === 0 && unanswered > 0 ? null : (
                // biome-ignore lint/suspicious/noArrayIndexKey: the index is the number of unanswered items
                <td key={unanswered} className="num">
                  {n}
                </td>
              ),
            )}
          </tr>
        </tbody>
      </table>
    </Panel>
  );
}
