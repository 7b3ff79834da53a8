import { useState } from 'react';
import type { DecisionView, RoundDetail } from '../../../app/api/contracts/purification.ts';
import { plural } from '../../../app/api/format.ts';
import { useMutation } from '../../shared/use-command.ts';
import { ItemChecklist, ReasonsForm, useReasons } from './ReasonsForm.tsx';

/**
 * One pair of reasons for several flagged items that still wait for a decision: each chosen item
 * gets its own decision and log row, all with these reasons.
 */
export function BatchDecision(props: { detail: RoundDetail; decisions: DecisionView[] }) {
  const decideMany = useMutation('purification.decideMany');
  const waiting = props.detail.rows.filter(
    (row) => row.flags.length > 0 && !row.droppedNow && !props.decisions.some((d) => d.itemId === row.itemId),
  );
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(waiting.map((r) => r.code)));
  const [action, setAction] = useState<'keep' | 'drop'>('keep');
  const reasons = useReasons();
  if (waiting.length < 2) return null;
  const picked = waiting.filter((r) => chosen.has(r.code)).map((r) => r.code);
  return (
    <ReasonsForm
      title="One reason for several flagged items"
      className="batch-decision"
      reasons={reasons}
      domainField={{ id: 'batch-domain', label: 'How these items relate to the construct’s domain' }}
      statisticalField={{ id: 'batch-statistical', label: 'What the statistics show' }}
      submitLabel={`Record ${plural(picked.length, 'decision')}`}
      disabled={decideMany.busy || picked.length === 0}
      error={decideMany.error}
      onSubmit={async () => {
        const done = await decideMany.run({
          roundId: props.detail.summary.id,
          itemCodes: picked,
          action,
          domainRationale: reasons.domain,
          statisticalRationale: reasons.statistical,
        });
        if (done) reasons.clear();
      }}
    >
      <p className="hint">
        {plural(waiting.length, 'flagged item')} without a decision. Each item you tick gets its own decision
        and its own row in the decision log, with the reasons below.
      </p>
      <ItemChecklist
        rows={waiting}
        chosen={chosen}
        onChange={setChosen}
        note={(row) => <span className="muted">({row.flags.map((f) => f.text).join('; ')})</span>}
      />
      <div className="button-row">
        <label className="inline-radio">
          <input type="radio" checked={action === 'keep'} onChange={() => setAction('keep')} /> Keep them
        </label>
        <label className="inline-radio">
          <input type="radio" checked={action === 'drop'} onChange={() => setAction('drop')} /> Drop them
        </label>
      </div>
    </ReasonsForm>
  );
}
