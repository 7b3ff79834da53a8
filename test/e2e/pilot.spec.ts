import fs from 'node:fs';
import path from 'node:path';
import {
  DEMO_ATTENTION_ANSWER,
  DEMO_COLUMNS,
  DEMO_PILOT_FILE,
  DEMO_STRAIGHT_LINERS,
  generateDemoPilot,
} from '../../app/demo/pilot.ts';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('imports the demo pilot file through the wizard, screens it and excludes the straight-liners with a reason', async ({
  page,
  app,
}) => {
  const demo = generateDemoPilot();
  const file = path.join(app.dataDir, DEMO_PILOT_FILE);
  fs.writeFileSync(file, demo.pilotCsv);

  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/pilot"]').click();
  await expect(page.locator('h1')).toHaveText('Pilot data');
  // The demo imported and screened the same file already (with its validation and retest files) and signed the phase off.
  await expect(page.locator('.dataset-table tbody tr')).toHaveCount(3);
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page
    .locator('#note-pilot')
    .fill('A second copy of the pilot file, imported to check the import path.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await expect(page.locator('.column-side .badge')).toHaveText('Reopened');

  // Step 1–2: choose the file; the preview says how it was read.
  await page.getByRole('button', { name: 'Import a data file…' }).click();
  await page.getByLabel('Data file').setInputFiles(file);
  const preview = page.getByTestId('import-preview');
  await expect(preview).toBeVisible();
  await expect(preview.getByTestId('detected-encoding')).toHaveText('utf-8');
  await expect(preview.getByTestId('detected-delimiter')).toHaveText('comma');
  await expect(preview.getByTestId('detected-decimal')).toHaveText('point');
  await expect(preview.locator('.preview-table tbody tr')).toHaveCount(20);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'pilot-wizard-preview.png'), fullPage: true });

  // Step 3: items were matched by code; the researcher maps the other columns.
  await page.getByRole('button', { name: 'Next: columns' }).click();
  const columns = page.getByTestId('import-columns');
  await expect(columns.locator('tr[data-column="TR01"] .badge.matched')).toHaveText('matched by code');
  await expect(columns.getByLabel(`Role of column ${DEMO_COLUMNS.id}`)).toHaveValue('id');
  await expect(columns.getByLabel(`Role of column ${DEMO_COLUMNS.duration}`)).toHaveValue('duration');
  await columns.getByLabel(`Role of column ${DEMO_COLUMNS.attention}`).selectOption('attention');
  await expect(columns.locator('.warning-list')).toContainText(
    `correct answer of attention check '${DEMO_COLUMNS.attention}'`,
  );
  await columns
    .getByLabel(`Correct answer of attention check ${DEMO_COLUMNS.attention}`)
    .fill(String(DEMO_ATTENTION_ANSWER));
  await columns.getByLabel(`Role of column ${DEMO_COLUMNS.criterion}`).selectOption('criterion');
  await columns.getByLabel(`Role of column ${DEMO_COLUMNS.group}`).selectOption('group');
  await columns.getByLabel(`Role of column ${DEMO_COLUMNS.retestLink}`).selectOption('retestLink');
  await expect(columns.locator('.warning-list')).toHaveCount(0);
  await expect(columns).toContainText(
    '31 columns answer items of the pool, and every item of the pool has a column.',
  );
  await page.screenshot({ path: path.join(SCREENSHOTS, 'pilot-wizard-columns.png'), fullPage: true });

  // Step 4: -9 is suggested from the first rows; without it the check lists every -9 cell.
  await page.getByRole('button', { name: 'Next: missing values' }).click();
  const missing = page.getByTestId('import-missing');
  await expect(missing.locator('.suggestions')).toContainText('-9');
  await page.getByRole('button', { name: 'Read the whole file' }).click();
  const check = page.getByTestId('import-check');
  await expect(check.getByTestId('check-respondents')).toHaveText('480 respondents', { timeout: 60_000 });
  await expect(check.locator('.problem-head')).toContainText('cells need a look');
  await expect(check.locator('.problem-table tbody tr').first()).toContainText(
    'value -9 is outside the declared scale 1 to 5',
  );
  await check.getByRole('button', { name: 'Back to missing values' }).click();
  await missing.getByLabel('New missing-value code').fill('-9');
  await missing.getByRole('button', { name: 'Add code' }).click();
  await expect(missing.locator('.code-chips')).toContainText('-9');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'pilot-wizard-missing.png'), fullPage: true });

  // Step 5: the whole file read in a worker; no problems now.
  await page.getByRole('button', { name: 'Read the whole file' }).click();
  await expect(check.getByTestId('check-respondents')).toHaveText('480 respondents', { timeout: 60_000 });
  await expect(check.getByTestId('no-problems')).toBeVisible();
  await expect(check).toContainText('This very file (same SHA-256) is already in the study');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'pilot-wizard-check.png'), fullPage: true });

  // Step 6: confirm under a new name.
  await check.getByRole('button', { name: 'Next: confirm' }).click();
  const confirm = page.getByTestId('import-confirm');
  await confirm.getByLabel('Name of the dataset').fill('Pilot survey, second copy');
  // The study has current pilot data, so keeping it is preselected; this copy replaces it, with a reason.
  await confirm.getByLabel('Make the new file the current pilot data').check();
  await expect(confirm.getByRole('button', { name: 'Import 480 respondents' })).toBeDisabled();
  await confirm
    .getByLabel('Why does it replace “Pilot survey, spring (demo)”? (goes into the decision log)')
    .fill('The second copy is screened afresh to check the import path.');
  await confirm.getByRole('button', { name: 'Import 480 respondents' }).click();
  await expect(page.getByTestId('import-confirm')).toHaveCount(0);
  const row = page.locator('.dataset-table tr[data-dataset="Pilot survey, second copy"]');
  await expect(row.getByTestId('dataset-counts')).toHaveText('480 respondents, 0 excluded');
  await expect(row.locator('.badge.current')).toHaveText('current pilot data');

  // Screening: run it, review the flags, exclude the straight-liners by rule with a reason.
  const counts = page.getByTestId('screening-counts');
  await expect(counts).toHaveText('480 respondents, 0 excluded');
  await page.getByRole('button', { name: 'Screen respondents' }).click();
  const chip = page.locator('.check-chip[data-check="irv"]');
  await expect(chip).toContainText(`no variation: ${DEMO_STRAIGHT_LINERS}`);
  await chip.getByRole('button', { name: `no variation: ${DEMO_STRAIGHT_LINERS}` }).click();
  await expect(page.getByTestId('shown-count')).toHaveText(`${DEMO_STRAIGHT_LINERS} respondents shown`);
  const shownRows = page.locator('.screening-table tbody tr');
  await expect(shownRows).toHaveCount(DEMO_STRAIGHT_LINERS);
  const rows = (
    await shownRows.evaluateAll((trs) => trs.map((tr) => Number(tr.getAttribute('data-row'))))
  ).sort((a, b) => a - b);
  expect(rows).toEqual(demo.straightLinerRows);
  await expect(shownRows.first().locator('.respondent-flags')).toContainText(
    'no variation: the same answer to all 31 answered items',
  );
  await chip.getByRole('button', { name: `Exclude all ${DEMO_STRAIGHT_LINERS}…` }).click();
  await page
    .getByLabel('Reason: Exclude everyone flagged for no variation')
    .fill('Straight-lining: one answer to every item, in a fraction of the usual time.');
  await page.getByRole('button', { name: 'Exclude everyone flagged for no variation' }).click();
  await expect(counts).toHaveText(`480 respondents, ${DEMO_STRAIGHT_LINERS} excluded`);
  await expect(row.getByTestId('dataset-counts')).toHaveText(
    `480 respondents, ${DEMO_STRAIGHT_LINERS} excluded`,
  );
  await expect(shownRows.locator('.badge.excluded')).toHaveCount(DEMO_STRAIGHT_LINERS);
  await expect(page.getByTestId('missing-summary')).toContainText(
    `Of the ${480 - DEMO_STRAIGHT_LINERS} respondents in the analyses`,
  );

  // A later decision brings one back, and the counts follow.
  const first = shownRows.first();
  await first.getByRole('button', { name: 'Bring back…' }).click();
  await first
    .getByLabel('Reason: Bring back')
    .fill('Checked the paper form: this respondent did answer with care.');
  await first.getByRole('button', { name: 'Bring back', exact: true }).click();
  await expect(counts).toHaveText(`480 respondents, ${DEMO_STRAIGHT_LINERS - 1} excluded`);
  await expect(page.locator('.column-side .checklist .unmet')).toHaveCount(0);

  await page.getByLabel('Show respondents').selectOption('flagged');
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'pilot-screening.png'), fullPage: true });

  // Every decision is in the log.
  await page.locator('.sidebar a[href="#/log"]').click();
  await expect(page.locator('.log-table')).toContainText('exclusions reversed');
  await expect(page.locator('.log-table')).toContainText('respondents excluded');
  await expect(page.locator('.log-table')).toContainText('dataset imported');
  await expect(page.locator('.log-table')).toContainText('dataset made current');
});
