import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

// The demo up to purification, which it leaves open.
test.use({ demoThrough: 'purification' });

const shot = (name: string) => path.join(SCREENSHOTS, `stale-signoff-${name}.png`);

test('a facet added to the signed-off construct puts the later phases up for review until each is confirmed or reopened', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  const card = (id: string) => page.locator(`.phase-card[data-phase="${id}"]`);
  await expect(card('items').locator('.badge')).toHaveText('Signed off');
  await expect(page.locator('.needs-review')).toHaveCount(0);

  // Reopen the construct and add a facet.
  await page.locator('.sidebar a[href="#/phase/construct"]').click();
  await page.getByRole('button', { name: 'Reopen phase…' }).click();
  await page.locator('#note-construct').fill('Focus groups asked about riding after dark.');
  await page.getByRole('button', { name: 'Reopen', exact: true }).click();
  await expect(page.locator('.column-side .badge')).toHaveText('Reopened');
  await page.getByPlaceholder('New facet name').fill('Riding after dark');
  await page.getByPlaceholder('Definition').fill('Confidence riding at night and in poor light.');
  await page.getByRole('button', { name: 'Add facet' }).click();
  await expect(page.locator('.facet-row')).toHaveCount(5);

  // The overview: item pool, expert review and pilot data need review, naming the change.
  await page.locator('.sidebar a[href="#/overview"]').click();
  for (const id of ['items', 'review', 'pilot']) {
    await expect(card(id).locator('.badge')).toHaveText('Needs review');
    await expect(card(id).locator('.needs-review')).toContainText(
      'Construct: facet added — facet "Riding after dark"',
    );
    await expect(card(id).locator('.needs-review')).toContainText('1 change in earlier phases');
  }
  await expect(card('construct').locator('.badge')).toHaveText('Reopened');
  await expect(card('purification').locator('.badge')).toHaveText('In progress');
  await expect(page.locator('.screen-head .muted')).toContainText('3 of them needing review');
  await expect(page.locator('.sidebar a[href="#/phase/items"] .dot')).toHaveClass(/dot-needs-review/);
  await page.screenshot({ path: shot('overview'), fullPage: true });

  // The item pool's controls: the change, the checklist evaluated again, confirming blocked.
  await page.locator('.sidebar a[href="#/phase/items"]').click();
  const side = page.locator('.column-side');
  await expect(side.locator('.badge')).toHaveText('Needs review');
  await expect(side.locator('.needs-review')).toContainText('facet "Riding after dark"');
  await expect(side.locator('.checklist .unmet')).toContainText(['The Construct phase is signed off']);
  await expect(side.getByRole('button', { name: 'Confirm still valid…' })).toBeDisabled();
  await expect(side.getByRole('button', { name: 'Reopen phase…' })).toBeEnabled();
  await expect(side.locator('.hint')).toContainText('every item of the checklist below must be met');
  await page.screenshot({ path: shot('items') });

  // Sign the construct off again; the later phases still need their own review.
  await page.locator('.sidebar a[href="#/phase/construct"]').click();
  await page.getByRole('button', { name: 'Sign off phase…' }).click();
  await page.locator('#note-construct').fill('Night-riding facet agreed by the team.');
  await page.getByRole('button', { name: 'Sign off', exact: true }).click();
  await expect(page.locator('.column-side .badge')).toHaveText('Signed off');

  // Expert review: confirm it still valid with a reason.
  await page.locator('.sidebar a[href="#/phase/review"]').click();
  await expect(side.locator('.badge')).toHaveText('Needs review');
  await side.getByRole('button', { name: 'Confirm still valid…' }).click();
  await page
    .locator('#note-review')
    .fill('The panel rated the existing items; the new facet gets its items rated in a later round.');
  await page.screenshot({ path: shot('review-confirm') });
  await page.getByRole('button', { name: 'Confirm still valid', exact: true }).click();
  await expect(side.locator('.badge')).toHaveText('Signed off');
  await expect(side.locator('.needs-review')).toHaveCount(0);

  await page.locator('.sidebar a[href="#/overview"]').click();
  await expect(card('review').locator('.badge')).toHaveText('Signed off');
  await expect(card('items').locator('.badge')).toHaveText('Needs review');
  await expect(card('pilot').locator('.badge')).toHaveText('Needs review');
  await page.screenshot({ path: shot('after-confirm'), fullPage: true });

  // The decision log holds the confirmation with its reason.
  await page.locator('.sidebar a[href="#/log"]').click();
  const first = page.locator('.log-table tbody tr').first();
  await expect(first).toContainText('signed off');
  await expect(first).toContainText('the new facet gets its items rated in a later round');
});
