import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

/** The demo's planted cross-loading item (app/demo/pilot.ts): a repairs item that also draws on route finding. */
const CROSS = 'RR07';

// The test restores the dropped item and runs another round: purification must still be open.
test.use({ demoThrough: 'purification' });

test('the factor analysis of a round shows the scree plot and loadings, flags the planted cross-loading item, and it is dropped with reasons', async ({
  page,
  purification,
}) => {
  await purification.open();
  await expect(page.locator('.round-tab')).toHaveCount(2);

  // Round 1 analysed every item: four factors by default (one per facet), evidence side by side.
  await purification.showRound(1);
  const panel = page.locator('.panel', { has: page.locator('h2', { hasText: 'Factor analysis, round 1' }) });
  await expect(panel).toBeVisible();
  await expect(panel.locator('.panel-head')).toContainText('4 factors');
  await expect(panel.locator('.count-evidence tr.chosen')).toContainText('4');
  await expect(panel.locator('[data-testid="kmo"]')).toContainText(/\.\d{3}/);
  const scree = panel.locator('figure[aria-label="Scree plot with parallel analysis"]');
  await expect(scree.locator('.recharts-line')).toHaveCount(2);
  const row = panel.locator(`.loading-table tbody tr[data-code="${CROSS}"]`);
  await expect(row.locator('.flag')).toContainText(['cross-loads']);
  await expect(panel.locator('.correspondence-table tbody tr')).toHaveCount(4);
  await page.mouse.move(0, 0);
  await panel.screenshot({ path: path.join(SCREENSHOTS, 'factor-analysis-round1.png') });

  // Round 2 (latest): the demo dropped it. Restore it and run round 3, which flags it again.
  await purification.showRound(2);
  await purification.restore(
    CROSS,
    'The team wants to see the item again in a round of its own before deciding for good.',
  );
  await expect(page.locator('.pending-note')).toContainText('1 decision since round 2: run round 3');
  await purification.runRound(3);
  const panel3 = page.locator('.panel', { has: page.locator('h2', { hasText: 'Factor analysis, round 3' }) });
  const row3 = panel3.locator(`.loading-table tbody tr[data-code="${CROSS}"]`);
  await expect(row3.locator('.flag')).toContainText(['cross-loads']);
  // The item table carries the same flag, so the decision is made where the other flags are.
  const itemRow = page.locator('.item-table tbody tr', {
    has: page.getByRole('button', { name: `Item ${CROSS}` }),
  });
  await expect(itemRow.locator('.flag')).toContainText(['cross-loads']);

  // Drop it with both reasons.
  await purification.openItem(CROSS);
  await purification.drop(CROSS, {
    domain:
      'Getting home after a breakdown mixes repairs with finding another route; it belongs to neither facet alone.',
    statistics: 'Cross-loads on the repairs and the route-planning factors in round 3.',
  });
  await page.mouse.move(0, 0);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'factor-analysis.png'), fullPage: true });
  await panel3.screenshot({ path: path.join(SCREENSHOTS, 'factor-analysis-round3.png') });

  // The drop is in the decision log with both reasons.
  await page.locator('.sidebar a[href="#/log"]').click();
  const latest = page.locator('.log-table tbody tr');
  await expect(latest.first()).toContainText('item dropped');
  await expect(latest.first()).toContainText('Domain: Getting home after a breakdown');
});
