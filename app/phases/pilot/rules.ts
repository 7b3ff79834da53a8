import { currentExclusions, listDatasets, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import { listItems } from '../../../db/repos/items.ts';
import type { ScreeningResult } from '../../engine/screening.ts';
import { currentPilotDataset } from '../analysis-data.ts';
import type { ChecklistItem, PhaseRules } from '../types.ts';
import { latestScreening, list, plural, respondentCount } from './common.ts';

export const pilotRules: PhaseRules = {
  id: 'pilot',
  purpose: 'Import pilot responses, map columns, set missing codes, screen respondents.',
  holds(study) {
    const all = listDatasets(study);
    const pilots = all.filter((d) => d.role === 'pilot');
    const current = currentPilotDataset(study);
    const out = [plural(pilots.length, 'pilot dataset')];
    if (current) out.push(respondentCount(current.respondents, currentExclusions(study, current.id).size));
    const retest = all.filter((d) => d.role === 'retest');
    if (retest.length > 0) out.push(plural(retest.length, 'retest dataset'));
    return out;
  },
  checklist(study) {
    const current = currentPilotDataset(study);
    const pool = listItems(study).filter((it) => it.state !== 'retired');
    const encoded = current ? loadEncodedDataset(study, current.id) : undefined;
    const mapped = new Set(
      (encoded?.columns ?? []).filter((c) => c.role === 'item').map((c) => (c.itemCode ?? '').toLowerCase()),
    );
    const unmapped = pool.filter((it) => !mapped.has(it.code.toLowerCase())).map((it) => it.code);
    const run = current ? latestScreening(study, current.id) : undefined;
    const exclusions = current ? [...currentExclusions(study, current.id).values()] : [];
    const withoutReason = exclusions.filter((e) => e.reason.trim() === '').length;
    const items: ChecklistItem[] = [
      {
        id: 'imported',
        label: 'A pilot dataset is imported',
        met: current !== undefined,
        detail: current
          ? `"${current.name}": ${respondentCount(current.respondents, exclusions.length)}`
          : listDatasets(study, 'pilot').length > 0
            ? 'no pilot dataset is current; make one current'
            : 'no pilot data yet',
      },
      {
        id: 'mapped',
        label: 'Every item of the pool has a column in the pilot data',
        met: current !== undefined && pool.length > 0 && unmapped.length === 0,
        detail: !current
          ? 'no pilot data yet'
          : pool.length === 0
            ? 'the pool holds no items'
            : unmapped.length === 0
              ? `all ${pool.length} mapped`
              : `no column for ${list(unmapped)}`,
      },
      {
        id: 'screened',
        label: 'The pilot respondents have been screened (a logged screening run)',
        met: run !== undefined,
        detail: run
          ? `run ${run.id}: ${plural((run.results as ScreeningResult).flagged, 'respondent')} flagged`
          : 'not screened yet',
      },
      {
        id: 'reasons',
        label: 'Every exclusion states its reason',
        met: current !== undefined && withoutReason === 0,
        detail: !current
          ? 'no pilot data yet'
          : exclusions.length === 0
            ? 'nobody excluded'
            : withoutReason === 0
              ? `${exclusions.length} excluded, each with a reason`
              : `${withoutReason} without a reason`,
      },
    ];
    return items;
  },
};
