/**
 * Browser: a test engineer submits a demo batch for review; the QA lead judges it against a
 * spec, sees the failing devices with their reasons and releases it; the batch turns read-only.
 */
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
});
afterAll(async () => {
  await srv?.stop();
});

async function openBatch(page: import('playwright-core').Page, name: string) {
  await page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
  await page.getByTestId(`batch-${name}`).click();
  await page.getByTestId('review-panel').waitFor();
}

it('submit, judge, release at phone and wide width', async () => {
  const batch_name = 'KF-M60 line 2, lot 2611';
  // QA lead writes the spec the batch is judged against.
  const qa = await openBrowser(VIEWPORTS.wide);
  try {
    await signInThroughForm(qa.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
    await qa.page.goto(`${srv.url}/specs`, { waitUntil: 'load' });
    await qa.page.getByTestId('new-spec').click();
    await qa.page.getByTestId('spec-name').fill('Line release');
    await qa.page.getByTestId('limit-pmp_w-min').fill('300');
    await qa.page.getByTestId('spec-save').click();
    await qa.page.getByTestId('spec-screen').waitFor();
  } finally {
    await qa.close();
  }

  const te = await openBrowser(VIEWPORTS.phone);
  try {
    await signInThroughForm(te.page, srv.url, 'tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
    await openBatch(te.page, batch_name);
    await te.page.getByTestId('evaluation').waitFor();
    await te.page.getByTestId('review-comment').fill('Lot complete, two known defects.');
    await te.page.getByTestId('submit-review').click();
    await te.page.locator('[data-testid="state-in_review"]:visible').first().waitFor();
    await te.page.getByTestId('review-panel').scrollIntoViewIfNeeded();
    await screenshot(te.page, 'review-submitted-phone');
  } finally {
    await te.close();
  }

  const lead = await openBrowser(VIEWPORTS.wide);
  try {
    await signInThroughForm(lead.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
    await openBatch(lead.page, batch_name);
    await lead.page.getByTestId('spec-choice-Line release').click();
    await lead.page.getByTestId('evaluation').waitFor();
    // The demo lot's high-Rs module and bypass-step module are below 300 W (sample-data scenario).
    expect(await lead.page.getByTestId('count-fail').innerText()).toMatch(/2/);
    expect(await lead.page.getByTestId('evaluation').innerText()).toMatch(/M2611-009[\s\S]*pmp_w .* is below the minimum 300 W/);
    await lead.page.getByTestId('review-panel').scrollIntoViewIfNeeded();
    await screenshot(lead.page, 'review-judged-wide');
    await lead.page.getByTestId('release').click();
    await lead.page.locator('[data-testid="state-released"]:visible').first().waitFor();
    await lead.page.getByTestId('review-record').waitFor();
    expect(await lead.page.getByTestId('review-record').innerText()).toMatch(/Quinn Mbeki released[\s\S]*22 pass, 2 fail/);
    expect(await lead.page.getByTestId('upload-panel').count()).toBe(0); // released: read-only
    expect(await layoutProblems(lead.page)).toEqual([]);
    await screenshot(lead.page, 'review-released-wide');
  } finally {
    await lead.close();
  }
});
