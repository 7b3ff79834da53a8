import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('opens the demo study, shows the seven phases, and keeps construct edits with their log rows', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  const cards = page.locator('.phase-card');
  await expect(cards).toHaveCount(7);
  await expect(cards.locator('.phase-title')).toHaveText([
    'Construct',
    'Item pool',
    'Expert review',
    'Pilot data',
    'Purification',
    'Validity evidence',
    'Methods appendix',
  ]);
  await expect(page.locator('h1')).toHaveText(/Everyday Cycling Confidence/);
  await expect(cards.first().locator('.badge')).toHaveText('Signed off');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'overview.png'), fullPage: true });

  await page.locator('.sidebar a[href="#/phase/construct"]').click();
  await expect(page.locator('.locked-note')).toBeVisible();
  await expect(page.locator('#field-definition')).toBeDisabled();

  // A signed-off phase is reopened with a reason before it can change.
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-construct').fill('Adding route-planning detail after the team meeting.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await expect(page.locator('.column-side .badge')).toHaveText('Reopened');

  const definition = page.locator('#field-definition');
  const newDefinition =
    'Everyday cycling confidence is an adult’s belief in their ability to make ordinary city trips by bicycle, including riding in traffic, planning routes, handling the bicycle and fixing small faults.';
  await definition.fill(newDefinition);
  await definition.blur();
  await expect(page.locator('label[for="field-definition"] .save-state')).toHaveText('Saved');

  const facetName = page.locator('.facet-row').nth(1).locator('input[type="text"]').first();
  await expect(facetName).toHaveValue('Route planning');
  await facetName.fill('Route choice');
  await facetName.blur();
  await expect(page.locator('.facet-row').nth(1).locator('.save-saved').first()).toBeVisible();
  await page.screenshot({ path: path.join(SCREENSHOTS, 'construct.png'), fullPage: true });

  await page.reload();
  await expect(page.locator('#field-definition')).toHaveValue(newDefinition);
  await expect(page.locator('.facet-row').nth(1).locator('input[type="text"]').first()).toHaveValue(
    'Route choice',
  );

  await page.locator('.sidebar a[href="#/log"]').click();
  const rows = page.locator('.log-table tbody tr');
  await expect(rows.first()).toContainText('facet renamed');
  await expect(rows.first()).toContainText('facet "Route planning"');
  await expect(rows.nth(1)).toContainText('definition');
  await expect(rows.nth(2)).toContainText('reopened');
  await expect(rows.nth(2)).toContainText('Adding route-planning detail');
  await expect(rows.first()).toContainText('E2E Researcher');
  await expect(rows.nth(3)).toContainText('Demo generator');
  await page.getByRole('button', { name: 'Verify study' }).click();
  await expect(page.locator('.verify-ok')).toHaveText(/Study intact: \d+ log rows chained/);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'decision-log.png'), fullPage: true });
});

test('the api refuses calls without the launch token', async ({ page, app }) => {
  const origin = new URL(app.url).origin;
  await page.goto(`${origin}/`);
  const status = await page.evaluate(async () => {
    const res = await fetch('./api/call', {
      method: 'POST',
      body: JSON.stringify({ name: 'study.info', input: {} }),
    });
    return res.status;
  });
  expect(status).toBe(401);
});
