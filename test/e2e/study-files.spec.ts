import fs from 'node:fs';
import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('creates, opens and copies studies in browser mode, and shows the refusals of the study-file checks', async ({
  page,
  app,
}) => {
  fs.writeFileSync(path.join(app.dataDir, 'notes.scalewright'), 'these are meeting notes, not a study');
  await page.goto(app.url);
  await expect(page.locator('h1')).toHaveText(/Everyday Cycling Confidence/);

  await page.locator('.sidebar a[href="#/study"]').click();
  await expect(page.locator('h1')).toHaveText('Open, create or copy a study');
  await expect(page.locator('.study-current')).toHaveText(app.studyPath);
  await expect(page.locator('#study-path-field')).toHaveValue(app.dataDir);
  const listing = page.locator('.folder-list');
  await expect(listing.locator('.study-file-name')).toHaveText(['demo.scalewright', 'notes.scalewright']);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'study-files.png'), fullPage: true });

  // New study in the listed folder: the app switches to it.
  await page.locator('#new-study-title').fill('Winter Commuting Pilot');
  await page.locator('#new-study-name').fill('winter-pilot');
  await page.getByRole('button', { name: 'Create study' }).click();
  await expect(page.locator('h1')).toHaveText('Winter Commuting Pilot');
  await expect(page.locator('.phase-card').first().locator('.badge')).toHaveText('Not started');
  const created = path.join(app.dataDir, 'winter-pilot.scalewright');
  expect(fs.existsSync(created)).toBe(true);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'study-created.png'), fullPage: true });

  // Typing goes on across an autosave (which reloads the study): the text stays whole, and Ctrl+Z
  // is the field's own undo.
  await page.locator('.sidebar a[href="#/phase/construct"]').click();
  const nameField = page.locator('#field-name');
  await nameField.click();
  await page.keyboard.type('Winter ');
  await expect(page.locator('label[for="field-name"] .save-state')).toHaveText('Saved');
  await page.keyboard.type('commuting confidence');
  await expect(nameField).toHaveValue('Winter commuting confidence');
  await page.keyboard.press('Control+z');
  const undone = await nameField.inputValue();
  expect(undone.length).toBeLessThan('Winter commuting confidence'.length);
  expect('Winter commuting confidence'.startsWith(undone)).toBe(true);

  // The same name again is refused, and the existing file is left as it is.
  await page.locator('.sidebar a[href="#/study"]').click();
  await page.locator('#new-study-title').fill('Another');
  await page.locator('#new-study-name').fill('winter-pilot.scalewright');
  await page.getByRole('button', { name: 'Create study' }).click();
  await expect(page.locator('.error-note')).toHaveText(`${created} already exists; choose another name`);

  // A file that is not a study is refused with the study-file check's message.
  await listing.locator('li', { hasText: 'notes.scalewright' }).getByRole('button', { name: 'Open' }).click();
  await expect(page.locator('.error-note')).toHaveText(
    `${path.join(app.dataDir, 'notes.scalewright')} is not a Scalewright study file (it is not an SQLite database)`,
  );
  await expect(page.locator('.study-current')).toHaveText(created);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'study-refused.png'), fullPage: true });

  // A folder that does not exist.
  await page.locator('#study-path-field').fill(path.join(app.dataDir, 'no-such-folder'));
  await page.getByRole('button', { name: 'Go' }).click();
  await expect(page.locator('.panel .error-note')).toHaveText(
    `folder ${path.join(app.dataDir, 'no-such-folder')} does not exist`,
  );

  // Open the demo again from the recent studies.
  const recent = page.locator('.recent-list li');
  await expect(recent).toHaveCount(2);
  await expect(recent.first()).toContainText(created);
  await recent.filter({ hasText: app.studyPath }).getByRole('button', { name: 'Open' }).click();
  await expect(page.locator('h1')).toHaveText(/Everyday Cycling Confidence/);

  // Save a copy of the demo; the demo stays open.
  await page.locator('.sidebar a[href="#/study"]').click();
  await page.locator('#copy-name').fill('demo-backup');
  await page.getByRole('button', { name: 'Save a copy' }).click();
  const copy = path.join(app.dataDir, 'demo-backup.scalewright');
  await expect(page.locator('.verify-ok')).toContainText(`Saved a copy to ${copy}`);
  await expect(page.locator('.study-current')).toHaveText(app.studyPath);
  await expect(listing.locator('.study-file-name')).toContainText(['demo-backup.scalewright']);
  expect(fs.existsSync(copy)).toBe(true);
  await page.screenshot({ path: path.join(SCREENSHOTS, 'study-copied.png'), fullPage: true });
});
