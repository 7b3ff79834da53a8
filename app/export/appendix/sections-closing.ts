import path from 'node:path';
import { count } from '../../api/format.ts';
import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { listDatasets } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { breakPlace, type VerifyReport } from '../../../db/verify.ts';
import { ENGINE_VERSION } from '../../engine/version.ts';
import { referenceInlines } from './citations.ts';
import { code } from './model.ts';
import type { Writer } from './writer.ts';

/** Section: what the scale may and may not be used for, and the care human-subject data need. */
export function cautionsSection(w: Writer): void {
  w.section('Cautions on use');
  w.notice(
    'caution',
    { text: 'This is a new scale. ', strong: true },
    'The evidence above supports research use of its scores. It does not validate the scale for diagnosis, hiring, admission, or any other high-stakes decision about an individual; such a use needs evidence gathered for that purpose ',
    w.cite('validity.standards'),
    '.',
  );
  w.list([
    [
      'Data from human participants need the approval of an ethics committee or review board before collection, informed consent, and protection of personal data in storage and sharing.',
    ],
    [
      'Follow local regulations on research with human participants and on personal data; where they differ from what is said here, they take precedence.',
    ],
    [
      'Interpreting an individual’s score for care, counselling or selection belongs to licensed professional practice, not to this appendix.',
    ],
    [
      'Rules of thumb cited above (cut-offs for α, loadings, fit indices) are conventions of the trade, shown as guides; none decides on its own whether the scale is adequate.',
    ],
  ]);
}

/** Section: everything needed to repeat and check the analyses, and the file's verification now. */
export function reproducibilitySection(
  w: Writer,
  study: Study,
  facts: { appVersion: string; report: VerifyReport; exportedAt: string },
): void {
  w.section('Reproducibility');
  const { report } = facts;
  const file = path.basename(study.path);
  w.para(
    `Rendered by Scalewright ${facts.appVersion} (statistics engine ${ENGINE_VERSION}) on ${facts.exportedAt.slice(0, 10)} from the study file `,
    code(file),
    ` (file format version ${study.version}). Every number above is read from the analysis runs stored in that file, each with its inputs, options, seed and engine version.`,
  );
  const datasets = listDatasets(study);
  w.table(
    'Data files held in the study, with their SHA-256',
    [
      ['Dataset', 'left'],
      ['Rows', 'right'],
      ['SHA-256', 'left'],
    ],
    datasets.map((d) => [`${d.name} (${d.fileName})`, count(d.respondents), d.fileSha256]),
    {
      empty: 'The study holds no data files.',
      note: ['SHA-256 as defined by the Secure Hash Standard ', w.cite('integrity.sha256'), '.'],
    },
  );
  const runs = listRuns(study);
  w.table(
    'Stored analysis runs',
    [
      ['Run', 'right'],
      ['Phase', 'left'],
      ['Kind', 'left'],
      ['Date', 'left'],
      ['Seed', 'right'],
      ['Engine', 'left'],
    ],
    runs.map((r) => [
      String(r.id),
      r.phase,
      r.kind,
      r.createdAt.slice(0, 10),
      r.seed === null ? '–' : String(r.seed),
      r.engineVersion,
    ]),
    {
      empty: 'The study holds no analysis runs yet.',
      note: [
        'A seed is stored for every randomized computation (bootstrap, parallel analysis); the same seed repeats it exactly.',
      ],
    },
  );
  const head = report.head ?? 'none';
  w.para(
    `The decision log holds ${count(report.logRows)} hash-chained rows; its head at export was `,
    code(head),
    '. Record it outside the file (a preregistration, an e-mail); anyone holding the file can then check that its history was not rewritten since:',
  );
  w.para(code(`scalewright project verify ${file} --head ${head}`));
  if (report.intact) {
    w.notice(
      'verified',
      { text: 'At export: ', strong: true },
      'the file’s integrity, the log’s hash chain, every stored data file against its SHA-256, every analysis run against the digest its log row holds, and the content against the state the last log row recorded — no break found.',
    );
  } else {
    w.notice(
      'break',
      {
        text: `Verification at export FAILED (${report.breaks.length} break${report.breaks.length === 1 ? '' : 's'}): `,
        strong: true,
      },
      'the study file was changed outside the app after the log recorded it, so the numbers above cannot be trusted as the record of the study.',
    );
    w.list(
      report.breaks
        .slice(0, 20)
        .map((b) => [`${b.check}: ${[breakPlace(b), b.problem].filter(Boolean).join(': ')}`]),
    );
  }
}

/** The reference list: every publication behind every registry id cited above. */
export function referencesSection(w: Writer): void {
  w.heading(2, 'References');
  w.blocks.push({ kind: 'references', entries: w.cites.references().map(referenceInlines) });
}
