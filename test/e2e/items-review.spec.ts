import path from 'node:path';
import { DEMO_EXPERTS } from '../../app/demo/review.ts';
import { DEMO_ITEMS, DEMO_RETIRED_ITEM } from '../../app/demo/items.ts';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

const NEW_CODE = 'TR10';

/**
 * A long-form ratings file for the whole kept pool plus the new item: every expert rates the pool 3 or 4,
 * and three of the seven rate the new item 2 (not relevant).
 */
function ratingsFile(): string {
  const codes = [...DEMO_ITEMS.map((it) => it.code).filter((c) => c !== DEMO_RETIRED_ITEM), NEW_CODE];
  const lines = ['item,expert,relevance'];
  for (const code of codes) {
    DEMO_EXPERTS.forEach((expert, e) => {
      const relevance = code === NEW_CODE ? (e < 3 ? 2 : 4) : (code.charCodeAt(3) + e) % 4 === 0 ? 3 : 4;
      lines.push(`${code},${expert.code},${relevance}`);
    });
  }
  return `${lines.join('\n')}\n`;
}

test('adds and edits items with live wording checks, imports ratings, and records a logged decision', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/items"]').click();
  await expect(page.locator('h1')).toHaveText('Item pool');
  await expect(page.locator('.coverage-table tbody tr')).toHaveCount(4);
  await expect(
    page.locator('.item-row[data-code="TR05"] .wording-flag[data-check="double-barrelled"]'),
  ).toHaveCount(0);

  // The demo signed the pool off: reopen it with a reason before adding to it.
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-items').fill('One more traffic item suggested by the advisory group.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await expect(page.locator('.column-side .badge')).toHaveText('Reopened');

  const add = page.getByRole('form', { name: 'Add an item' });
  await add.getByLabel('New item code').fill(NEW_CODE);
  await add.getByLabel('New item wording').fill('I can ride past a bus stop while a bus pulls out.');
  await add.getByLabel('New item facet').selectOption({ label: 'Confidence in traffic' });
  await add.getByLabel('New item source').selectOption('expert-suggestion');
  await add.getByRole('button', { name: 'Add item' }).click();
  const row = page.locator(`.item-row[data-code="${NEW_CODE}"]`);
  await expect(row).toBeVisible();
  await expect(row.locator('.wording-clean')).toHaveText('No wording flags');

  // Rewording: the checks update as the researcher types, before anything is saved.
  const text = row.locator('textarea.item-text');
  await text.fill('I always stay calm and relaxed when a bus pulls out beside me.');
  await expect(row.locator('.wording-flag[data-check="absolute"]')).toBeVisible();
  await expect(row.locator('.wording-flag[data-check="double-barrelled"]')).toContainText('calm and relaxed');
  await expect(row.locator('.item-save')).toContainText('new revision');
  await text.blur();
  await expect(row.locator('.revision-toggle')).toHaveText('Revision 2: show history');
  await text.fill('I can ride past a bus stop while a bus pulls out beside me.');
  await text.press('Control+Enter');
  await expect(row.locator('.revision-toggle')).toHaveText('Revision 3: show history');
  await expect(row.locator('.wording-clean')).toBeVisible();
  await row.getByRole('button', { name: 'Revision 3: show history' }).click();
  await expect(row.locator('.revision-list li')).toHaveCount(3);
  await row.getByLabel(`State of ${NEW_CODE}`).selectOption('kept');
  await expect(row.getByLabel(`State of ${NEW_CODE}`)).toHaveValue('kept');
  await expect(page.locator('.coverage-table tr[data-facet="Confidence in traffic"] td').nth(1)).toHaveText(
    '10',
  );
  await expect(page.locator('.column-side .checklist .unmet')).toHaveCount(0);
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'items.png'), fullPage: true });

  // Expert review: reopen, start a third round over every kept item.
  await page.locator('.sidebar a[href="#/phase/review"]').click();
  await expect(page.locator('h1')).toHaveText('Expert review');
  await expect(page.locator('.round-tab')).toHaveCount(2);
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-review').fill(`Rate the new item ${NEW_CODE} with the whole pool.`);
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await page.getByRole('button', { name: 'Start a new round…' }).click();
  await page.getByLabel('Round label').fill('Pool with the new traffic item');
  await page.getByRole('button', { name: 'Start round' }).click();
  await expect(page.locator('.round-tab.active .round-tab-title')).toHaveText('Round 3');

  // A bad file: every problem named by row and column, and nothing can be imported.
  const input = page.getByLabel('Ratings file');
  await input.setInputFiles({
    name: 'bad-ratings.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from('item,expert,relevance\nTR01,E1,4\nTR01,E2,7\nXX01,E3,4\n'),
  });
  const problems = page.getByRole('list', { name: 'Problems in the file' });
  await expect(problems.locator('li')).toHaveText([
    "row 3, column 3 ('relevance'): rating 7 is outside the relevance scale 1–4",
    "row 4, column 1 ('item'): item 'XX01' is not in the item pool",
  ]);
  await expect(page.getByRole('button', { name: /^Import \d+ rating/ })).toBeDisabled();

  await input.setInputFiles({
    name: 'ratings-round-3.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from(ratingsFile()),
  });
  await expect(page.getByTestId('ratings-preview')).toContainText(
    '224 ratings from 7 experts on 32 items, ready to import',
  );
  await page.getByRole('button', { name: 'Import 224 ratings' }).click();
  await expect(page.locator('.cvi-table tbody tr[data-code]')).toHaveCount(32);
  const flagged = page.locator(`.cvi-table tr[data-code="${NEW_CODE}"]`);
  await expect(flagged).toHaveClass(/row-flagged/);
  await expect(flagged.locator('.flag-cell')).toContainText(
    'I-CVI .57 below .78 (6+ experts; Polit & Beck 2006)',
  );
  await expect(flagged.locator('td').nth(2)).toHaveText('.57');
  await expect(flagged.locator('.needs-decision')).toBeVisible();
  await expect(page.locator('.column-side .checklist')).toContainText(`undecided: ${NEW_CODE} (round 3)`);

  await flagged.getByRole('button', { name: 'Decide…' }).click();
  const decision = page.getByRole('form', { name: `Decision on ${NEW_CODE}` });
  await decision.getByLabel('Retire the item').check();
  await decision
    .getByLabel('Rationale (goes into the decision log)')
    .fill('Three of seven experts rated it not relevant; passing a bus stop is covered by TR01.');
  await decision.getByRole('button', { name: 'Record decision' }).click();
  await expect(flagged.locator('.decision-badge')).toHaveText('Retired');
  await expect(page.locator('.column-side .checklist')).toContainText('2 flagged items, all decided');
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'review.png'), fullPage: true });

  // The demo's first round: seven experts, facet placements, comments, and the two decisions.
  await page.locator('.round-tab').first().click();
  await expect(page.locator('.cvi-table tr.row-flagged')).toHaveCount(2);
  await expect(page.locator('.cvi-table tr[data-code="TR05"] .decision-badge')).toHaveText('Revised');
  await expect(page.locator('.cvi-table tr[data-code="RP06"] .decision-badge')).toHaveText('Retired');
  await expect(page.locator('.stat-tile').filter({ hasText: 'Facet sorting' })).toContainText(
    'Fleiss’ kappa',
  );
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'review-round-1.png'), fullPage: true });
  await page.locator('.round-tab').nth(2).click();

  // The printable packet of the round.
  await page.getByRole('link', { name: 'Open the review packet' }).click();
  await expect(page.locator('.review-packet h1')).toContainText('Everyday Cycling Confidence');
  await expect(page.locator('.packet-table tbody tr')).toHaveCount(32);
  await expect(page.locator('.packet-facets dt')).toHaveCount(4);
  await expect(page.locator('.packet-code')).toHaveCount(0);
  // The packet names the log head it was printed at, so that the study can later show it holds it.
  await expect(page.locator('.packet-head-record code')).toHaveText(/^\d+:[0-9a-f]{64}$/);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'review-packet.png'), fullPage: true });
  await page.emulateMedia({ media: 'print' });
  await expect(page.locator('.sidebar')).toBeHidden();
  await expect(page.locator('.packet-toolbar')).toBeHidden();
  await page.emulateMedia({ media: 'screen' });

  await page.locator('.sidebar a[href="#/log"]').click();
  const first = page.locator('.log-table tbody tr').first();
  await expect(first).toContainText('retired after review');
  await expect(first).toContainText(`item ${NEW_CODE}`);
  await expect(first).toContainText('Three of seven experts rated it not relevant');
  await expect(first).toContainText('E2E Researcher');
  await expect(page.locator('.log-table tbody tr').nth(1)).toContainText('ratings imported');
});

test('imports items from CSV only after a clean preview, and exports the pool', async ({ page, app }) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/items"]').click();
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-items').fill('Adding the items drafted at the second workshop.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await page.getByRole('button', { name: 'Import CSV…' }).click();

  const file = page.getByLabel('Item pool file');
  await file.setInputFiles({
    name: 'workshop-items.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from(
      'code,text,facet,keying\nRR08,I can replace a worn brake pad.,Roadside repairs,forward\nRR09,I can fix a puncture.,Repairs,forward\nTR01,I can ride in a bus lane.,Confidence in traffic,forward\n',
    ),
  });
  await expect(page.getByRole('list', { name: 'Problems in the file' }).locator('li')).toHaveText([
    "row 3, column 3 ('facet'): facet 'Repairs' is not a facet of this study; use one of Confidence in traffic, Route planning, Bike handling, Roadside repairs",
    "row 4, column 1 ('code'): item code 'TR01' is already in the pool (TR01)",
  ]);
  await expect(page.getByRole('button', { name: /^Import \d+ item/ })).toBeDisabled();
  await expect(page.locator('.item-row[data-code="RR08"]')).toHaveCount(0);

  await file.setInputFiles({
    name: 'workshop-items.csv',
    mimeType: 'text/csv',
    buffer: Buffer.from(
      'code,text,facet,keying\nRR08,I can replace a worn brake pad.,Roadside repairs,forward\nRR09,I can fix a puncture and a broken spoke.,roadside repairs,\n',
    ),
  });
  const preview = page.getByTestId('item-import-preview');
  await expect(preview).toContainText('2 items ready to import');
  await expect(preview).toContainText('keying is blank on row 3: read as forward');
  await expect(preview.locator('tbody tr').nth(1)).toContainText('double barrelled');
  await page.getByLabel('Source of the imported items').selectOption('interviews');
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'items-import.png') });
  await page.getByRole('button', { name: 'Import 2 items' }).click();
  await expect(page.locator('.item-row[data-code="RR09"]')).toBeVisible();
  await expect(
    page.locator('.item-row[data-code="RR09"] .wording-flag[data-check="double-barrelled"]'),
  ).toBeVisible();
  await expect(page.locator('.coverage-table tr[data-facet="Roadside repairs"] td').nth(3)).toHaveText('2');

  const download = page.waitForEvent('download');
  await page.getByRole('button', { name: 'Export CSV' }).click();
  const saved = await download;
  expect(saved.suggestedFilename()).toBe('item-pool.csv');
  const stream = await saved.createReadStream();
  let text = '';
  for await (const chunk of stream) text += chunk.toString();
  expect(text.split('\r\n')[0]).toBe('code,text,facet,keying,source,source_note,state,revisions');
  expect(text).toContain(
    'RR09,I can fix a puncture and a broken spoke.,Roadside repairs,forward,interviews,,draft,1',
  );
  expect(text).toContain(
    'RP06,I can find a quiet street when my usual route is too busy.,Route planning,forward,own-drafting,,retired,1',
  );

  await page.locator('.sidebar a[href="#/log"]').click();
  await expect(page.locator('.log-table tbody tr').first()).toContainText('items imported');
  await expect(page.locator('.log-table tbody tr').first()).toContainText('file "workshop-items.csv"');
});
