import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

/** The residual covariance planted in the demo's validation wave (app/demo/validation-data.ts). */
const PLANTED = ['RR01', 'RR05'];

test('walks the validity phase on the demo: reopen, run the CFA again, acknowledge what changed, sign off', async ({
  page,
  app,
}) => {
  test.setTimeout(180_000);
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/validity"]').click();
  const side = page.locator('.column-side');
  await expect(side.locator('.badge')).toHaveText('Signed off');

  // The sources of evidence: five, each acknowledged; consequences named as missing.
  await expect(page.locator('.evidence')).toHaveCount(5);
  await expect(page.getByTestId('source-consequences')).toContainText('Missing');
  await expect(page.getByTestId('source-internal-structure')).toContainText('Acknowledged');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'validity-overview.png'), fullPage: true });

  // Reopen it with a reason.
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-validity').fill('Check the model once more before the appendix.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await expect(side.locator('.badge')).toHaveText('Reopened');

  // Internal structure: the freed residual covariance with its reason, the fit, the figure.
  await page.getByRole('button', { name: 'Internal structure' }).click();
  await expect(page.locator('.residual-list')).toContainText(`${PLANTED[0]} with ${PLANTED[1]}`);
  const results = page.getByTestId('cfa-results');
  await expect(results.locator('.fit-table')).toContainText('CFI');
  await expect(results.locator('.path-figure svg')).toBeVisible();
  const before = (await results.locator('.run-note').textContent()) ?? '';
  await page.getByRole('button', { name: 'Run the CFA again' }).click();
  await expect(results.locator('.run-note')).not.toHaveText(before, { timeout: 60_000 });
  await page.screenshot({ path: path.join(SCREENSHOTS, 'validity-cfa.png'), fullPage: true });
  await results.locator('.path-figure').screenshot({ path: path.join(SCREENSHOTS, 'validity-path.png') });

  // The new run changed what internal structure shows: its acknowledgement lapsed.
  await page.getByRole('button', { name: 'Sources of evidence' }).click();
  const internal = page.getByTestId('source-internal-structure');
  await expect(internal).toContainText('has changed since');
  await expect(side.locator('.checklist')).toContainText('Internal structure');
  await internal.getByRole('button', { name: 'Acknowledge…' }).click();
  await internal.getByRole('textbox').fill('The re-run CFA gives the same fit; the model stands.');
  await internal.getByRole('button', { name: 'Acknowledge', exact: true }).click();
  await expect(internal).toContainText('Acknowledged by');

  // Hypotheses: each planned relation, its verdict, and that it was recorded before the data.
  await page.getByRole('button', { name: 'Hypotheses' }).click();
  const rows = page.locator('.hypotheses-table tbody tr');
  await expect(rows).toHaveCount(5);
  await expect(rows.filter({ hasText: 'Social desirability' })).toContainText('supported');
  await expect(page.locator('.hypotheses-table .timing').first()).toContainText('before the validation data');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'validity-hypotheses.png'), fullPage: true });

  // Criteria and known groups, with their charts; retest.
  await page.getByRole('button', { name: 'Criteria and groups' }).click();
  await expect(page.locator('.recharts-surface').first()).toBeVisible();
  await expect(page.locator('td', { hasText: 'later (predictive)' }).first()).toBeVisible();
  await page.screenshot({ path: path.join(SCREENSHOTS, 'validity-criteria.png'), fullPage: true });
  await page.getByRole('button', { name: 'Retest', exact: true }).click();
  await expect(page.getByTestId('retest-results')).toContainText('ICC(2,1)');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'validity-retest.png'), fullPage: true });

  // Sign off again.
  await page.getByRole('button', { name: 'Sign off phase…' }).click();
  await page.locator('#note-validity').fill('Model re-checked; the evidence stands.');
  await page.getByRole('button', { name: 'Sign off', exact: true }).click();
  await expect(side.locator('.badge')).toHaveText('Signed off');
});

test('a criterion column and a group column are described again, each with its reason', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/validity"]').click();
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-validity').fill('The criterion columns are read once more.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await page.getByRole('button', { name: 'Criteria and groups' }).click();

  // A criterion column: its reliability changes, saved only with a reason.
  const measure = page.locator('form[aria-label="Column gen_self_efficacy"]');
  await expect(measure.getByLabel('Relation it answers')).toHaveValue(/\d+/);
  const save = measure.getByRole('button', { name: 'Save' });
  await expect(save).toBeDisabled();
  await measure.getByLabel('Its reliability').fill('0.86');
  await measure.getByLabel('Why').fill('The questionnaire’s newer manual reports .86 (demo).');
  await save.click();
  await expect(measure.locator('.setting-now')).toHaveText(
    'now: The questionnaire’s newer manual reports .86 (demo).',
  );
  await expect(measure.getByLabel('Why')).toHaveValue('');
  await expect(measure.getByLabel('Its reliability')).toHaveValue('0.86');

  // A group column: which group should score higher, with its reason.
  const group = page.locator('form[aria-label="Group column cyclist_type"]');
  await expect(group.getByLabel('Expected higher')).toHaveValue('regular');
  await group.getByLabel('Why').fill('Regular riders have more practice in traffic (demo).');
  await group.getByRole('button', { name: 'Save' }).click();
  await expect(group.locator('.setting-now')).toHaveText(
    'now: Regular riders have more practice in traffic (demo).',
  );

  await page.locator('.sidebar a[href="#/log"]').click();
  await expect(page.locator('.log-table')).toContainText(
    'The questionnaire’s newer manual reports .86 (demo).',
  );
  await expect(page.locator('.log-table')).toContainText(
    'Regular riders have more practice in traffic (demo).',
  );
});
