import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

/** The demo's planted off-domain item, dropped in purification round 1 (app/demo/purification.ts). */
const DROPPED = 'TR09';
/** The demo item revised after the first review round (app/demo/review.ts). */
const REVISED = 'TR05';

// The demo stops with purification open, which is quicker to make; every stored analysis of the full
// demo re-runs too (the unit tests of re-runs check that).
test.use({ demoThrough: 'purification' });

test('the history: filter the log by an item, read its life story, open the stored run a decision rests on and re-run it', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/log"]').click();

  // Filter by an item: the log offers that item's life story.
  await page.getByLabel('Filter by item code').fill(DROPPED);
  const rows = page.locator('.log-table tbody tr.log-row');
  await expect
    .poll(async () => new Set(await rows.locator('td:nth-child(6)').allTextContents()))
    .toEqual(new Set([`item ${DROPPED}`]));
  await page.screenshot({ path: path.join(SCREENSHOTS, 'history-log-filtered.png'), fullPage: true });
  // Verify study re-runs every stored analysis from its stored inputs.
  await page.getByRole('button', { name: 'Verify study' }).click();
  await expect(page.locator('.verify-ok')).toContainText(
    /(\d+) of \1 stored analyses re-run from their stored inputs reproduce/,
    {
      timeout: 30_000,
    },
  );
  await page.getByRole('link', { name: `Life story of item ${DROPPED} →` }).click();

  // The life story, in order: drafted, kept for review, rated, analysed, dropped with its reasons.
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Item ${DROPPED}`);
  const steps = page.locator(`ol[aria-label="Life story of item ${DROPPED}"] > li`);
  await expect(steps.first()).toBeVisible();
  const stages = await steps.locator('.stage-badge').allTextContents();
  expect(stages[0]).toBe('Drafted');
  expect(stages).toContain('Rated');
  expect(stages).toContain('Analysed');
  expect(stages.at(-1)).toBe('Decided');
  const dropped = steps.last();
  await expect(dropped).toContainText(`item ${DROPPED} dropped`);
  await expect(dropped).toContainText('Domain:');
  await expect(dropped).toContainText('Statistics:');
  await expect(page.locator('.story-standing')).toContainText('dropped (Purification phase, log row');
  // Each step names its log row; the log rows are in increasing order.
  const seqs = (await steps.locator('.story-links a:first-child').allTextContents()).map((t) =>
    Number(t.replace('log row ', '')),
  );
  expect(seqs).toEqual([...seqs].sort((a, b) => a - b));
  // The rated step carries the expert-review figures of the stored run.
  await expect(steps.filter({ hasText: 'rated in review round' }).first()).toContainText('I-CVI');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'history-item-story.png'), fullPage: true });

  // The step's log row opens on its own, expanded.
  await dropped.locator('.story-links a', { hasText: 'log row' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(/^Log row \d+$/);
  await expect(page.locator('.log-detail')).toContainText('Open stored run');
  await page.goBack();

  // The stored run the drop decision rests on: inputs, options, seed, engine, digest.
  await dropped.locator('.story-links a', { hasText: 'stored analysis run' }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(/^Run #\d+: purification round$/);
  const facts = page.locator('.run-facts');
  await expect(facts).toContainText('Engine version');
  await expect(facts).toContainText('20260501');
  await expect(facts).toContainText('matches its log row');
  await expect(facts).toContainText(`item dropped (item ${DROPPED})`);
  const inputs = page.getByRole('table', { name: 'Inputs' });
  await expect(inputs).toContainText('dataset');
  await expect(inputs).toContainText('Pilot survey');
  await expect(page.getByRole('table', { name: 'Results' })).toContainText('scale.alpha.value');
  await page.getByRole('button', { name: 'Re-run from stored inputs' }).click();
  await expect(page.locator('.verify-ok')).toContainText('Reproduced', { timeout: 30_000 });
  await page.screenshot({ path: path.join(SCREENSHOTS, 'history-run.png'), fullPage: true });

  // Another item's story, chosen in the picker: the revision shows the wording before and after.
  await page.goBack();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Item ${DROPPED}`);
  await page.getByLabel('Item whose story to show').selectOption(REVISED);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Item ${REVISED}`);
  const revised = page.locator('.story-step.stage-revised');
  await expect(revised).toHaveCount(1);
  await expect(revised.locator('del')).not.toBeEmpty();
  await expect(revised.locator('ins')).not.toBeEmpty();
  await page.screenshot({ path: path.join(SCREENSHOTS, 'history-item-revised.png'), fullPage: true });
});

test('each item of the items list and the purification table links to its life story', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/items"]').click();
  await page.getByRole('link', { name: `Life story of item ${REVISED}` }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Item ${REVISED}`);

  await page.locator('.sidebar a[href="#/phase/purification"]').click();
  await page.getByRole('link', { name: 'Life story of item TR01' }).first().click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Item TR01');
});
