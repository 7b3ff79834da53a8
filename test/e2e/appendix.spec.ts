import fs from 'node:fs';
import path from 'node:path';
import { expect, SCREENSHOTS, test } from './fixtures.ts';

test('the Methods appendix screen downloads the appendix in browser mode, as PDF and as HTML', async ({
  page,
  app,
}) => {
  await page.goto(app.url);
  await page.locator('.sidebar a[href="#/phase/appendix"]').click();
  await expect(page.locator('h1')).toHaveText('Methods appendix');

  const pdfDownload = page.waitForEvent('download');
  await page.getByRole('button', { name: 'Save as PDF' }).click();
  const pdf = await pdfDownload;
  expect(pdf.suggestedFilename()).toBe('demo-methods-appendix.pdf');
  const pdfPath = path.join(app.dataDir, 'appendix.pdf');
  await pdf.saveAs(pdfPath);
  expect(fs.readFileSync(pdfPath).subarray(0, 5).toString()).toBe('%PDF-');
  await expect(page.getByRole('status')).toContainText('The file verified at export.');

  const htmlDownload = page.waitForEvent('download');
  await page.getByRole('button', { name: 'Save as HTML' }).click();
  const html = await htmlDownload;
  const htmlPath = path.join(app.dataDir, 'appendix.html');
  await html.saveAs(htmlPath);
  const text = fs.readFileSync(htmlPath, 'utf8');
  expect(text).toContain('<h1>Methods appendix: Everyday Cycling Confidence');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'appendix-screen.png'), fullPage: true });

  // The saved page itself, as a reader sees it.
  await page.goto(`file://${htmlPath}`);
  await expect(page.locator('h2').first()).toHaveText('1. Construct definition and facets');
  await page.screenshot({ path: path.join(SCREENSHOTS, 'appendix-html.png') });
});
