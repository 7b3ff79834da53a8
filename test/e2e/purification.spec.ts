import path from 'node:path';
import type { Page } from '@playwright/test';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

// The demo up to purification, which it leaves open.
test.use({ demoThrough: 'purification' });

/** The demo's planted off-domain item (app/demo/items.ts). */
const OFF_DOMAIN = 'TR09';

async function headlineAlpha(page: Page): Promise<number> {
  const text = (await page.locator('[data-testid="round-alpha"] .headline-value').textContent()) ?? '';
  return Number(text.replace('\u2212', '-'));
}

test('runs purification rounds on the demo: the weak item leaves with its reasons, alpha and the history follow', async ({
  page,
  purification,
}) => {
  await purification.open();

  // The demo's two rounds are there: the off-domain item left after round 1.
  await expect(page.locator('.round-tab')).toHaveCount(2);
  await expect(page.locator('.round-tab.active')).toContainText('Round 2');
  const history = page.locator('.history-table tbody tr');
  await expect(history.nth(1)).toContainText(OFF_DOMAIN);
  // The planted cross-loading item left after round 1 too (its own test: factor-analysis.spec.ts).
  await expect(page.locator('.departures tbody tr')).toHaveCount(2);
  await expect(
    page.locator('.headline-detail', {
      hasText:
        /Based on \d+ respondents after 12 exclusions \(480 in the file; \d+ more left out with missing answers\)/,
    }),
  ).toBeVisible();

  // Round 1 shows the planted problem: a flagged, low corrected item-total, and alpha rises without it.
  await purification.showRound(1);
  const odRow = page.locator('.item-table tbody tr', {
    has: page.getByRole('button', { name: `Item ${OFF_DOMAIN}` }),
  });
  await expect(odRow.locator('.flag')).toContainText(['low r', 'α rises']);
  await page.getByLabel('Group by facet').uncheck();
  await page.getByRole('button', { name: 'Corrected item–total r' }).click();
  await expect(page.locator('.item-table tbody tr').first()).toContainText(OFF_DOMAIN);
  await page.mouse.move(0, 0);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'purification-round1.png'), fullPage: true });
  await page
    .locator('.panel', { has: page.locator('.item-table') })
    .first()
    .screenshot({ path: path.join(SCREENSHOTS, 'purification-items.png') });
  await page
    .locator('[data-testid="round-alpha"]')
    .locator('xpath=..')
    .screenshot({ path: path.join(SCREENSHOTS, 'purification-reliability.png') });

  // Restore it (reversing the demo's drop) and run round 3: it is back, and alpha falls.
  await purification.showRound(2);
  const alpha2 = await headlineAlpha(page);
  await purification.restore(
    OFF_DOMAIN,
    'The team wants to see the item once more beside the traffic items before deciding for good.',
  );
  await expect(page.locator('.pending-note')).toContainText('1 decision since round 2: run round 3');
  await purification.runRound(3);
  const alpha3 = await headlineAlpha(page);
  expect(alpha3).toBeLessThan(alpha2);
  await expect(page.locator('.history-table tbody tr').nth(2)).toContainText(`back: ${OFF_DOMAIN}`);

  // Drop it again from the workbench, with both reasons, beside the facet's definition.
  const panel = await purification.openItem(OFF_DOMAIN);
  await expect(panel.locator('.facet-definition')).toContainText('Confidence in traffic');
  await purification.drop(OFF_DOMAIN, {
    domain:
      'An opinion about cars in the city centre, not the respondent’s belief in their own riding among traffic; outside the construct.',
    statistics: 'Lowest corrected item-total r of the round; alpha rises without it.',
  });
  await page.mouse.move(0, 0);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'purification-decision.png') });

  await purification.runRound(4);
  const alpha4 = await headlineAlpha(page);
  expect(alpha4).toBeGreaterThan(alpha3);
  const rounds = page.locator('.history-table tbody tr');
  await expect(rounds).toHaveCount(4);
  await expect(rounds.nth(3)).toContainText(OFF_DOMAIN);
  await expect(rounds.nth(3)).toContainText(alpha4.toFixed(3).replace(/^0/, ''));
  const departures = page.locator('.departures tbody tr');
  await expect(departures).toHaveCount(3);
  await expect(departures.nth(0)).toContainText('restored later');
  await expect(departures.nth(2)).toContainText('Round 3');
  await expect(page.locator('figure[aria-label="Alpha across rounds"] .recharts-line-dot')).toHaveCount(4);
  await page.mouse.move(0, 0);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'purification.png'), fullPage: true });
  await page.locator('.panel', { hasText: 'Alpha across rounds' }).screenshot({
    path: path.join(SCREENSHOTS, 'purification-history.png'),
  });

  // The decisions are in the decision log, each with both reasons.
  await page.locator('.sidebar a[href="#/log"]').click();
  const latest = page.locator('.log-table tbody tr');
  await expect(latest.first()).toContainText('purification round 4');
  await expect(latest.nth(1)).toContainText('item dropped');
  await expect(latest.nth(1)).toContainText('Domain: An opinion about cars');
  await expect(latest.nth(1)).toContainText('Statistics: Lowest corrected item-total r');
  await expect(latest.nth(3)).toContainText('item restored');
});

test('several flagged items take one pair of reasons, and a facet is split and merged with its reasons', async ({
  page,
  purification,
}) => {
  await purification.open();
  await expect(page.locator('.round-tab.active')).toContainText('Round 2');

  // The flagged items of the latest round that wait for a decision, all ticked to start with.
  const batch = page.locator('.panel', {
    has: page.locator('h2', { hasText: 'One reason for several flagged items' }),
  });
  const boxes = batch.getByRole('checkbox');
  await expect(boxes.first()).toBeChecked();
  const waiting = await boxes.count();
  expect(waiting).toBeGreaterThanOrEqual(4);

  // Without reasons nothing is recorded, and the form says why.
  await batch.getByRole('button', { name: `Record ${waiting} decisions` }).click();
  await expect(batch.locator('.error-note')).toContainText('give a rationale for keeping item');
  await expect(boxes).toHaveCount(waiting);

  // Two of them kept, each with its own decision and the same reasons.
  for (let i = 2; i < waiting; i++) await boxes.nth(i).uncheck();
  const kept = [
    (await batch.locator('.batch-items strong').nth(0).textContent()) ?? '',
    (await batch.locator('.batch-items strong').nth(1).textContent()) ?? '',
  ];
  const domain = batch.getByLabel('How these items relate to the construct’s domain');
  await domain.fill(
    'Each asks about everyday riding the construct covers; the flag is about answers piling up.',
  );
  await batch.getByLabel('What the statistics show').fill('Item-total r above .40; only the ceiling flag.');
  await batch.getByRole('button', { name: 'Record 2 decisions' }).click();
  await expect(boxes).toHaveCount(waiting - 2);
  await expect(domain).toHaveValue('');
  await expect(batch.locator('.error-note')).toHaveCount(0);
  await expect(batch.locator('.batch-items')).not.toContainText(kept[0]);

  // A merge without the domain reason is refused; a split with its reasons moves the ticked items.
  const facets = page.locator('.panel', { has: page.locator('h2', { hasText: 'Merge or split facets' }) });
  await facets.getByRole('button', { name: 'Merge facets' }).click();
  await expect(facets.locator('.error-note')).toContainText(
    'say how the items’ content fits the facet they go to',
  );
  await facets.getByLabel('Split a facet').check();
  const splitItems = facets.getByRole('checkbox');
  await splitItems.nth(0).check();
  await splitItems.nth(1).check();
  await facets.getByLabel('Name of the new facet').fill('Riding beside heavy vehicles');
  await facets
    .getByLabel('Its definition: what its items have in common')
    .fill('Belief in riding safely close to buses and lorries.');
  const fits = facets.getByLabel('How the items’ content fits the facet they go to (required)');
  await fits.fill('Both items are about large vehicles, which the other traffic items do not name.');
  await facets
    .getByLabel('What the factor analysis and reliabilities show')
    .fill('The two items correlate more with each other than with the rest of their facet.');
  await facets.getByRole('button', { name: 'Split facet' }).click();
  await expect(facets.locator('.done-note')).toHaveText(
    'Split: 2 items moved to “Riding beside heavy vehicles”. Run the next round to see the effect.',
  );

  // Merging moves every item still in the first facet into the second.
  await facets.getByLabel('Merge two facets').check();
  await fits.fill('The two facets ask about the same confidence in different words.');
  await facets.getByRole('button', { name: 'Merge facets' }).click();
  await expect(facets.locator('.done-note')).toHaveText(
    /^Merged: \d+ items moved\. Run the next round to see the effect\.$/,
  );
  await expect(page.locator('.pending-note')).toBeVisible();

  // The decisions are in the decision log, with their reasons.
  await page.locator('.sidebar a[href="#/log"]').click();
  const log = page.locator('.log-table');
  await expect(log).toContainText('item kept');
  await expect(log).toContainText('Domain: Each asks about everyday riding');
  await expect(log).toContainText('facet split');
  await expect(log).toContainText('Domain: The two facets ask about the same confidence');
});
