import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('Ctrl+Z outside a text field opens the undo confirm; inside a field it stays the field’s own undo', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/log"]').click();
  const search = page.getByLabel('Search the log');
  await expect(search).toBeVisible();
  const dialog = page.getByRole('dialog', { name: 'Undo last change' });

  // Inside a field: the field's own undo, no confirm.
  await search.fill('item');
  await search.press('Control+z');
  await expect(dialog).toHaveCount(0);

  // Outside any field: the confirm opens and names the last change's row.
  await search.blur();
  await page.locator('h1').click();
  await page.keyboard.press('Control+z');
  await expect(dialog).toBeVisible();
  const head = (await page.locator('.log-head-value').textContent()) as string;
  await expect(dialog).toContainText('Last change: row');
  expect(Number(head.split(':')[0])).toBeGreaterThan(0);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'undo-confirm.png') });
  await dialog.getByRole('button', { name: 'Cancel' }).click();
  await expect(dialog).toHaveCount(0);

  // The sidebar button opens the same confirm.
  await page.getByRole('button', { name: 'Undo last change…' }).click();
  await expect(dialog).toBeVisible();
});
