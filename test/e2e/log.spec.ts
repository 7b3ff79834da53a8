import fs from 'node:fs';
import path from 'node:path';
import Papa from 'papaparse';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('the decision log shows its head with a copy button, and searches, filters, pages and exports', async ({
  page,
  context,
  app,
}) => {
  await context.grantPermissions(['clipboard-read', 'clipboard-write']);
  await page.goto(app.url);
  // The overview first: a click before the app has started can be lost on a busy machine.
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  await page.locator('.sidebar a[href="#/log"]').click();

  const head = page.locator('.log-head-value');
  await expect(head).toHaveText(/^\d+:[0-9a-f]{64}$/);
  const headText = (await head.textContent()) as string;
  const rowsInLog = Number(headText.split(':')[0]);
  const rows = page.locator('.log-table tbody tr.log-row');
  await expect(rows).toHaveCount(50);
  await expect(page.locator('.log-pager [role="status"]')).toHaveText(
    `Rows 1–50 of ${rowsInLog} · page 1 of ${Math.ceil(rowsInLog / 50)}`,
  );
  await expect(rows.first().locator('td').first()).toHaveText(String(rowsInLog));

  await page.getByRole('button', { name: 'Copy' }).click();
  await expect(page.locator('.log-head')).toContainText('Copied.');
  expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(headText);

  // Paging goes to older rows.
  await page.getByRole('button', { name: 'Older' }).click();
  await expect(page.locator('.log-pager [role="status"]')).toHaveText(/^Rows 51–100 of /);
  await expect(rows.first().locator('td').first()).toHaveText(String(rowsInLog - 50));

  // Search by text in the kind, target or rationale: back to the first page.
  await page.getByLabel('Search the log').fill('signed off');
  await expect(page.locator('.log-pager [role="status"]')).toHaveText(/^Rows 1–\d+ of \d+ · page 1 of 1$/);
  await expect
    .poll(async () => (await rows.allTextContents()).every((t) => /signed off/i.test(t)))
    .toBe(true);
  expect(await rows.count()).toBeGreaterThan(0);
  await page.getByLabel('Search the log').fill('');

  // By item, then by item and kind.
  await page.getByLabel('Filter by item code').fill('TR03');
  await expect
    .poll(async () => new Set(await rows.locator('td:nth-child(6)').allTextContents()))
    .toEqual(new Set(['item TR03']));
  expect(await rows.count()).toBeGreaterThanOrEqual(3);
  await page.getByLabel('Filter by kind').selectOption('item-reworded');
  await expect(rows).toHaveCount(1);
  await expect(rows.first()).toContainText('item reworded');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'decision-log-filtered.png'), fullPage: true });

  // Export the filtered log: the CSV holds those rows and the head it was exported at.
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Export CSV' }).click(),
  ]);
  expect(download.suggestedFilename()).toBe(`decision-log-to-row-${rowsInLog}.csv`);
  const csv = fs.readFileSync((await download.path()) as string, 'utf8');
  const parsed = Papa.parse<Record<string, string>>(csv.trim(), { header: true });
  expect(parsed.data).toHaveLength(1);
  expect(parsed.data[0]).toMatchObject({
    kind: 'item-reworded',
    target: 'item TR03',
    log_head_at_export: headText,
  });

  // By phase.
  await page.getByLabel('Filter by item code').fill('');
  await page.getByLabel('Filter by kind').selectOption('');
  await page.getByLabel('Filter by phase').selectOption('construct');
  await expect
    .poll(async () => new Set(await rows.locator('td:nth-child(4)').allTextContents()))
    .toEqual(new Set(['Construct']));
  expect(await rows.count()).toBeGreaterThan(5);

  // A recorded head is checked against the log.
  await page.getByLabel('A recorded head').fill(headText);
  await page.getByRole('button', { name: 'Check recorded head' }).click();
  await expect(page.locator('.log-head .verify-ok')).toHaveText(
    `The log still holds row ${rowsInLog} with the recorded hash.`,
  );
  await page.getByLabel('A recorded head').fill(`${rowsInLog}:${'0'.repeat(64)}`);
  await page.getByRole('button', { name: 'Check recorded head' }).click();
  await expect(page.locator('.log-head .error-note')).toContainText(
    'the log was rewritten after the head was recorded',
  );

  await page.getByLabel('Filter by phase').selectOption('');
  await page.getByRole('button', { name: 'Verify study' }).click();
  await expect(page.locator('.verify-ok').last()).toHaveText(/Study intact/);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'decision-log-head.png') });
});
