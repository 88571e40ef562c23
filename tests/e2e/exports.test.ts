/**
 * Browser: the CSV files as people download them (issue 14, item 5). On the comparison screen the
 * "Download this view" file holds exactly the rows shown (here: the failing ones), with units in
 * the column names and FF in %; on the batch page the pass/fail list holds one row per device.
 * Both are read back with papaparse and the strict RFC 4180 reader. The high-voltage caution is
 * on both screens and in the release confirmation, at phone and wide width — not in the files.
 */
import { readFileSync } from 'node:fs';
import type { Locator, Page } from 'playwright-core';
import { checkExport } from '@/tests/support/export-checks';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const LOT_2611 = 'KF-M60 line 2, lot 2611';
const LOT_2612 = 'KF-M60 line 3, lot 2612';
const SPEC = 'Export check';

let srv: ServerProcess;
const ids = { batch: {} as Record<string, string>, spec: '' };

/** Signs a demo account in from node and returns a fetch that carries its session (same-origin writes). */
async function apiAs(email: string, password: string) {
  const res = await fetch(`${srv.url}/api/auth/sign-in/email`, { method: 'POST', headers: { 'Content-Type': 'application/json', Origin: srv.url }, body: JSON.stringify({ email, password }) });
  expect(res.status).toBe(200);
  const cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  return (path: string, body?: unknown) =>
    fetch(`${srv.url}${path}`, body === undefined ? { headers: { cookie } } : { method: 'POST', headers: { cookie, Origin: srv.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
}

/** The file a click downloads, as text. */
async function download(page: Page, button: Locator): Promise<{ name: string; text: string }> {
  const [file] = await Promise.all([page.waitForEvent('download'), button.click()]);
  return { name: file.suggestedFilename(), text: readFileSync((await file.path())!, 'utf8') };
}

beforeAll(async () => {
  srv = await startServerProcess();
  const qa = await apiAs('quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
  const spec = await qa('/api/specs', { name: SPEC, limits: { pmp_w: { min: 300 } } });
  expect(spec.status).toBe(201);
  ids.spec = ((await spec.json()) as { id: string }).id;
  const batches = (await (await qa('/api/batches')).json()) as { batches: { id: string; name: string }[] };
  ids.batch = Object.fromEntries(batches.batches.map((b) => [b.name, b.id]));
  // The test engineer hands lot 2611 over, so the QA lead can open the release confirmation.
  const te = await apiAs('tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
  expect((await te(`/api/batches/${ids.batch[LOT_2611]}/submit`, { comment: 'for the export check' })).status).toBe(200);
});
afterAll(async () => {
  await srv?.stop();
});

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('the comparison: the caution on the screen, the downloaded view has exactly the rows shown', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'dana.lindqvist@kestrel-pv.example', 'kestrel-design-demo');
      await b.page.goto(`${srv.url}/compare?batches=${ids.batch[LOT_2611]},${ids.batch[LOT_2612]}&spec=${ids.spec}&param=pmp_w`, { waitUntil: 'load' });
      // On a phone the grid of every curve (with its filters and download) opens on request.
      if (vpName === 'phone') await b.page.getByTestId('show-grid').click();
      await b.page.getByTestId('grid-row-M2611-001').waitFor();
      expect(await b.page.getByTestId('hv-caution').count()).toBe(1);
      await b.page.getByTestId('filter-fail').click();
      await b.page.getByTestId('grid-row-M2611-009').waitFor();
      const shown = await b.page.getByText(/^\d+ of \d+ curves$/).innerText();
      const [count, total] = shown.match(/\d+/g)!.map(Number);
      expect(count).toBeGreaterThan(0);
      expect(count).toBeLessThan(total);

      const file = await download(b.page, b.page.getByTestId('download-view'));
      expect(file.name).toMatch(/^quasilevel-comparison-\d{4}-\d{2}-\d{2}\.csv$/);
      expect(file.text).not.toMatch(/high voltage|caution/i);
      const read = checkExport(file.text, count);
      expect(read.records.every((r) => r.result === 'fail' && r.spec_name === SPEC && r.spec_version === '1' && r.release_state !== '')).toBe(true);
      // FF in % as the screen shows it: the API's fraction × 100, to 2 decimals.
      const curves = await b.page.evaluate(async (id) => ((await (await fetch(`/api/batches/${id}/curves?page_size=500`)).json()) as { curves: { device_id: string; metrics: { ff: number } }[] }).curves, ids.batch[LOT_2611]);
      const m9 = curves.find((c) => c.device_id === 'M2611-009')!;
      expect(Number(read.records.find((r) => r.device_id === 'M2611-009')!.ff_pct)).toBe(Number((m9.metrics.ff * 100).toFixed(2)));
      expect(read.records.find((r) => r.device_id === 'M2611-009')!.batch_name).toBe(LOT_2611);

      await b.page.getByTestId('hv-caution').scrollIntoViewIfNeeded();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `exports-compare-caution-${vpName}`);
    } finally {
      await b.close();
    }
  });

  it('the batch page: the caution beside the pass/fail download and in the release confirmation; the list has one row per device', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
      await b.page.goto(`${srv.url}/batches/${ids.batch[LOT_2611]}`, { waitUntil: 'load' });
      const panel = b.page.getByTestId('review-panel');
      await panel.waitFor();
      await b.page.getByTestId(`spec-choice-${SPEC}`).click();
      await b.page.getByTestId('evaluation').waitFor();
      expect(await panel.getByTestId('hv-caution').count()).toBe(1);

      const file = await download(b.page, b.page.getByTestId('download-pass-fail'));
      expect(file.name).toMatch(/pass-fail-v1\.csv$/);
      expect(file.text).not.toMatch(/high voltage|caution/i);
      // The demo lot: 24 modules (sample-data scenario).
      const read = checkExport(file.text, 24);
      expect(read.records.every((r) => r.batch_name === LOT_2611 && r.release_state === 'in_review')).toBe(true);

      await b.page.getByTestId('download-pass-fail').scrollIntoViewIfNeeded();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `exports-pass-fail-caution-${vpName}`);

      await b.page.getByTestId('release').click();
      const dialog = b.page.getByTestId('release-dialog');
      await dialog.waitFor();
      expect(await dialog.getByTestId('hv-caution').count()).toBe(1);
      await dialog.getByTestId('hv-caution').scrollIntoViewIfNeeded();
      await screenshot(b.page, `exports-release-dialog-caution-${vpName}`);
      await b.page.getByTestId('release-cancel').click();
      await dialog.waitFor({ state: 'detached' });
    } finally {
      await b.close();
    }
  });
});
