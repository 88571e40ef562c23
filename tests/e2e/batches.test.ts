/**
 * Browser: a test engineer creates a batch, uploads good and broken files through the file
 * picker, reads the per-file results, the batch table and a curve page, at phone and wide width.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

const REF = REFERENCE_DATA_DIR;
let srv: ServerProcess;
let files: string[];

beforeAll(async () => {
  srv = await startServerProcess();
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-e2e-files-'));
  const cell = path.join(dir, 'RTC-cell-33C.csv');
  writeFileSync(cell, ['# cell temperature: 33', readFileSync(path.join(REF, 'cell-57mm-33C.csv'), 'utf8')].join('\n'));
  const mod = path.join(dir, 'RTC-module-45C.csv');
  writeFileSync(mod, ['# cell temperature: 45', '# cells in series: 36', readFileSync(path.join(REF, 'module-36cell-45C.csv'), 'utf8')].join('\n'));
  const broken = path.join(dir, 'broken.csv');
  writeFileSync(broken, 'Voltage,Temperature\n0,25\n0.1,25\n');
  files = [cell, mod, broken];
});
afterAll(async () => {
  await srv?.stop();
});

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('create a batch, upload files, read the table and a curve page', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId('new-batch').click();
      const name = `Reference devices ${vpName}`;
      await b.page.getByTestId('batch-name').fill(name);
      // The batch date shows as ISO 8601 whatever the browser's locale; the calendar (the browser's
      // date picker, whose value is ISO too) writes the chosen day into the field.
      await b.page.locator('[data-testid="batch-form"] input[type="date"]').fill('2025-11-20');
      expect(await b.page.getByTestId('batch-date').inputValue()).toBe('2025-11-20');
      await b.page.getByTestId('batch-date-pick').waitFor();
      await b.page.getByTestId('batch-date').fill('2025-11-14');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `batch-form-${vpName}`);
      await b.page.getByTestId('batch-submit').click();
      await b.page.getByTestId('upload-panel').waitFor();
      expect(await b.page.locator('body').innerText()).toContain('2025-11-14');

      const chooser = b.page.waitForEvent('filechooser');
      await b.page.getByTestId('pick-files').click();
      await (await chooser).setFiles(files);
      await b.page.getByText('3 files ready').waitFor();
      await screenshot(b.page, `upload-ready-${vpName}`);
      await b.page.getByTestId('start-upload').click();
      await b.page.getByTestId('upload-results').waitFor({ timeout: 60_000 });
      const results = await b.page.getByTestId('upload-results').innerText();
      expect(results).toMatch(/2 accepted · 1 rejected/);
      expect(results).toMatch(/broken\.csv/);
      expect(results).toMatch(/current/i); // the engine's reason names the missing current column
      await screenshot(b.page, `upload-results-${vpName}`);

      await b.page.getByTestId('curve-row-RTC-cell-33C').waitFor();
      // A table on a wide screen, device cards on a phone (tests/e2e/phone.test.ts checks which).
      await b.page.getByTestId(vpName === 'phone' ? 'curve-cards' : 'curve-table').scrollIntoViewIfNeeded();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `batch-table-${vpName}`);

      await b.page.getByTestId('curve-row-RTC-module-45C').click();
      await b.page.getByTestId('curve-screen').waitFor();
      await b.page.getByTestId('iv-chart').locator('svg').first().waitFor();
      const figures = await b.page.getByTestId('key-figures').innerText();
      expect(figures).toMatch(/Isc/);
      // The fit panel shows the single-diode RMSE of the published optimum for this module at
      // 45 °C: 2.0530e-3 A (reference-data README), displayed to 4 significant figures.
      await b.page.getByTestId('fit-comparison').scrollIntoViewIfNeeded();
      expect(await b.page.getByTestId('fit-single-diode').innerText()).toContain('0.002053 A');
      expect(await b.page.getByTestId('fit-verdict').innerText()).toMatch(/diode/);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `curve-page-${vpName}`);
      await b.page.getByTestId('residual-chart').scrollIntoViewIfNeeded();
      await screenshot(b.page, `curve-residuals-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
