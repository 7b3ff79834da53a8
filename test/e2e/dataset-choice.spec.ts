import fs from 'node:fs';
import path from 'node:path';
import { generateDemoPilot } from '../../app/demo/pilot.ts';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

// The demo up to purification, which it leaves open.
test.use({ demoThrough: 'purification' });

const SPRING = 'Pilot survey, spring (demo)';
const LATE = 'Late returns';

test('a second pilot file does not silently become current; making current and back are logged choices', async ({
  page,
  app,
}) => {
  // A second, smaller pilot file: the first 40 respondents of the demo file.
  const lines = generateDemoPilot().pilotCsv.split('\n');
  const file = path.join(app.dataDir, 'late-returns.csv');
  fs.writeFileSync(file, `${lines.slice(0, 41).join('\n')}\n`);

  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/pilot"]').click();
  await expect(page.locator('h1')).toHaveText('Pilot data');
  const spring = page.locator(`.dataset-table tr[data-dataset="${SPRING}"]`);
  await expect(spring.locator('.badge.current')).toHaveText('current pilot data');
  await expect(spring.getByTestId('dataset-standing')).toContainText('made current on import');
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page
    .locator('#note-pilot')
    .fill('Forty late paper returns arrived after the spring file was closed.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();

  await page.getByRole('button', { name: 'Import a data file…' }).click();
  await page.getByLabel('Data file').setInputFiles(file);
  await expect(page.getByTestId('import-preview')).toBeVisible();
  await page.getByRole('button', { name: 'Next: columns' }).click();
  await page.getByRole('button', { name: 'Next: missing values' }).click();
  const missing = page.getByTestId('import-missing');
  await missing.getByLabel('New missing-value code').fill('-9');
  await missing.getByRole('button', { name: 'Add code' }).click();
  await page.getByRole('button', { name: 'Read the whole file' }).click();
  const check = page.getByTestId('import-check');
  // The file is read in a worker; on a busy machine that takes a while.
  await expect(check.getByTestId('check-respondents')).toHaveText('40 respondents', { timeout: 60_000 });
  await check.getByRole('button', { name: 'Next: confirm' }).click();

  // The import asks, with the safe answer preselected and the effect of each answer spelled out.
  const confirm = page.getByTestId('import-confirm');
  await confirm.getByLabel('Name of the dataset').fill(LATE);
  const question = confirm.getByTestId('current-question');
  await expect(question.getByLabel(`Keep “${SPRING}” current`)).toBeChecked();
  await expect(question).toContainText(`rounds 1, 2 ran on "${SPRING}" and will be marked out of date`);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'dataset-choice-import.png'), fullPage: true });
  await confirm.getByRole('button', { name: 'Import 40 respondents' }).click();
  await expect(page.getByTestId('import-confirm')).toHaveCount(0);

  const late = page.locator(`.dataset-table tr[data-dataset="${LATE}"]`);
  await expect(late.getByTestId('dataset-counts')).toHaveText('40 respondents, 0 excluded');
  await expect(late.locator('.badge.not-current')).toHaveText('not current');
  await expect(late.getByTestId('dataset-standing')).toContainText('Never made current.');
  await expect(spring.locator('.badge.current')).toHaveText('current pilot data');

  // Purification still works on the spring file: its rounds are current.
  await page.locator('.sidebar a[href="#/phase/purification"]').click();
  await expect(page.locator('.stale')).toHaveCount(0);

  // The researcher makes the late file current, with a reason.
  await page.locator('.sidebar a[href="#/phase/pilot"]').click();
  await late.getByRole('button', { name: 'Make current…' }).click();
  await late
    .getByLabel(`Why do the analyses of pilot data use “${LATE}” from now on?`)
    .fill('Checking the items on the late returns alone before pooling them.');
  await late.getByRole('button', { name: 'Make current', exact: true }).click();
  await expect(late.locator('.badge.current')).toHaveText('current pilot data');
  await expect(late.getByTestId('dataset-standing')).toContainText(
    'Checking the items on the late returns alone before pooling them.',
  );
  await expect(spring.locator('.badge.not-current')).toHaveText('not current');
  await expect(spring.getByTestId('dataset-standing')).toContainText(
    'until another dataset was made current',
  );
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'dataset-choice-list.png'), fullPage: true });

  // The rounds on the spring file are now out of date, and say why.
  await page.locator('.sidebar a[href="#/phase/purification"]').click();
  const stale = page.locator('.stale');
  await expect(stale).toHaveCount(2);
  await expect(stale.first()).toHaveAttribute('title', /the current pilot data is now "Late returns"/);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'dataset-choice-rounds.png'), fullPage: true });

  // Reversible: the spring file is made current again, and its rounds are current again.
  await page.locator('.sidebar a[href="#/phase/pilot"]').click();
  await spring.getByRole('button', { name: 'Make current…' }).click();
  await spring
    .getByLabel(`Why do the analyses of pilot data use “${SPRING}” from now on?`)
    .fill('Back to the full spring sample for purification.');
  await spring.getByRole('button', { name: 'Make current', exact: true }).click();
  await expect(spring.locator('.badge.current')).toHaveText('current pilot data');
  await page.locator('.sidebar a[href="#/phase/purification"]').click();
  await expect(page.locator('.stale')).toHaveCount(0);

  await page.locator('.sidebar a[href="#/log"]').click();
  await expect(page.locator('.log-table')).toContainText('Back to the full spring sample for purification.');
  await expect(page.locator('.log-table')).toContainText('dataset made current');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'dataset-choice-log.png'), fullPage: true });
});
