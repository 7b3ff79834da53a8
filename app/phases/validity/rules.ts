import { currentValidityDecisions, insertValidityDecision } from '../../../db/repos/validity.ts';
import type { Study } from '../../../db/study.ts';
import type { CfaJobOutput } from '../../workers/validity.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import type { ChecklistItem, PhaseRules } from '../types.ts';
import { PHASE } from './data.ts';
import { EVIDENCE_SOURCES, type EvidenceSourceId, evidenceSources, latestRelations } from './evidence.ts';
import { latestRun } from './structure.ts';

interface Acknowledgement {
  fingerprint: string;
  state: string;
}

/** The acknowledgement in force for each source, and whether it still matches what was found. */
export function acknowledgements(study: Study) {
  const acks = currentValidityDecisions<Acknowledgement>(study, 'acknowledge');
  return evidenceSources(study).map((s) => {
    const a = acks.get(s.id);
    return {
      source: s.id,
      note: a?.rationale ?? null,
      at: a?.decidedAt ?? null,
      by: a?.decidedBy ?? null,
      current: a !== undefined && a.body.fingerprint === s.fingerprint,
      stale: a !== undefined && a.body.fingerprint !== s.fingerprint,
    };
  });
}

/**
 * Acknowledges what a source of evidence holds now (what was found and what is missing), with a
 * note; logged. The acknowledgement lapses when the finding changes (a new run, new data).
 */
export function acknowledgeSource(study: Study, sourceId: EvidenceSourceId, note: string): number {
  const s = evidenceSources(study).find((x) => x.id === sourceId);
  if (!s)
    throw new RuleError(
      `"${sourceId}" is not a source of validity evidence; use ${EVIDENCE_SOURCES.map((x) => x.id).join(', ')}`,
    );
  if (note.trim() === '')
    throw new RuleError(`say what "${s.title}" shows, or why what is missing is acceptable`);
  const ack = acknowledgements(study).find((a) => a.source === sourceId);
  if (ack?.current) throw new RuleError(`"${s.title}" is already acknowledged as it stands`);
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: 'evidence-acknowledged',
      target: s.title,
      rationale: note.trim(),
      detail: { source: s.id, state: s.state, found: s.found, missing: s.missing },
    },
    () =>
      insertValidityDecision(study, {
        kind: 'acknowledge',
        subject: s.id,
        body: { fingerprint: s.fingerprint, state: s.state },
        rationale: note.trim(),
      }),
  );
}

function checklist(study: Study): ChecklistItem[] {
  const out: ChecklistItem[] = [];
  const cfa = latestRun<CfaJobOutput>(study, 'cfa');
  out.push({
    id: 'cfa-on-current-data',
    label: 'A CFA of the measurement model on the current validation data',
    met: cfa !== null && cfa.outOfDate === null,
    detail: !cfa
      ? 'no CFA yet'
      : cfa.outOfDate
        ? `run ${cfa.run.id} is out of date: ${cfa.outOfDate}; run it again`
        : `run ${cfa.run.id} on "${cfa.inputs.source.datasetName}", n = ${cfa.inputs.n}${cfa.results.fit.converged ? '' : ' (did not converge)'}`,
  });
  const rel = latestRelations(study);
  out.push({
    id: 'hypotheses-evaluated',
    label: 'The planned relations are tested on the current validation data',
    met: rel !== null && rel.outOfDate === null,
    detail: !rel
      ? 'not tested yet'
      : rel.outOfDate
        ? `run ${rel.run.id} is out of date: ${rel.outOfDate}; test them again`
        : `run ${rel.run.id}: ${rel.results.hypotheses.filter((h) => h.outcome).length} of ${rel.results.hypotheses.length} tested`,
  });
  const sources = evidenceSources(study);
  const acks = acknowledgements(study);
  const open = sources.filter((s) => !acks.find((a) => a.source === s.id)?.current);
  const missing = sources.filter((s) => s.state === 'missing').map((s) => s.title);
  out.push({
    id: 'sources-acknowledged',
    label: 'Each source of validity evidence is acknowledged as it stands',
    met: open.length === 0,
    detail:
      (open.length === 0
        ? 'every source acknowledged'
        : `not acknowledged (or changed since): ${open.map((s) => s.title).join(', ')}`) +
      (missing.length > 0 ? `; no evidence from: ${missing.join(', ')}` : ''),
  });
  return out;
}

export const validityRules: PhaseRules = {
  id: PHASE,
  purpose: 'Gather validity evidence on the retained items, source by source, on new data.',
  holds(study) {
    const sources = evidenceSources(study);
    const n = (state: string) => sources.filter((s) => s.state === state).length;
    const cfa = latestRun<CfaJobOutput>(study, 'cfa');
    return [
      ...(cfa ? [`CFA run ${cfa.run.id}${cfa.outOfDate ? ' (out of date)' : ''}`] : []),
      `${n('found')} sources found, ${n('partial')} partly, ${n('missing')} missing`,
    ];
  },
  checklist,
};
