import fs from 'node:fs';
import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('the overview sets the final instrument’s order as a logged decision and offers each of its files', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  const panel = page.locator('section.panel', {
    has: page.getByRole('heading', { name: 'Final instrument' }),
  });
  await expect(panel).toContainText('No order set yet');
  const order = panel.getByRole('list', { name: 'Order of the items' }).locator('li');
  const first = (await order.first().locator('.item-code').textContent()) as string;
  const second = (await order.nth(1).locator('.item-code').textContent()) as string;
  await panel.getByRole('button', { name: `Move ${first} down` }).click();
  await expect(order.first().locator('.item-code')).toHaveText(second);
  await panel.getByLabel('Heading of the questionnaire').fill('How confident are you on your bike?');
  await panel.getByLabel(/Why the instrument is set this way/).fill('Open with an easier item (demo check)');
  await panel.getByRole('button', { name: 'Save order and form' }).click();
  await expect(panel).toContainText('Order and form as last set.');
  await expect(order.first().locator('.item-code')).toHaveText(second);

  await panel.getByRole('button', { name: 'Export the instrument' }).click();
  const files = panel.getByRole('list', { name: 'Files of the instrument' }).locator('li');
  await expect(files).toHaveCount(5);
  await expect(panel).toContainText('the study verified at export');
  const download = page.waitForEvent('download');
  await files.filter({ hasText: 'questionnaire.html' }).getByRole('button').click();
  const saved = path.join(app.dataDir, 'questionnaire.html');
  await (await download).saveAs(saved);
  const html = fs.readFileSync(saved, 'utf8');
  expect(html).toContain('<h1>How confident are you on your bike?</h1>');
  await panel.screenshot({ path: path.join(SCREENSHOTS, 'instrument-panel.png') });

  // The questionnaire as a respondent sees it.
  await page.goto(`file://${saved}`);
  // The demo's 31 pilot items less the two its purification dropped (off-domain, cross-loading).
  await expect(page.locator('tbody tr')).toHaveCount(29);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'instrument-questionnaire.png'), fullPage: false });
});
