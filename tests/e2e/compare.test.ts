/**
 * Browser: a QA lead writes a spec, then a designer compares the two demo module batches in the
 * grid with pass/fail, the statistics side by side and the distribution chart.
 */
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
  const b = await openBrowser(VIEWPORTS.wide);
  try {
    await signInThroughForm(b.page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
    await b.page.goto(`${srv.url}/specs`, { waitUntil: 'load' });
    await b.page.getByTestId('new-spec').click();
    await b.page.getByTestId('spec-name').fill('Module release');
    await b.page.getByTestId('limit-pmp_w-min').fill('300');
    await b.page.getByTestId('limit-ff-min').fill('70');
    await b.page.getByTestId('class-step').fill('5');
    await b.page.getByTestId('spec-save').click();
    await b.page.getByTestId('spec-screen').waitFor();
    expect(await b.page.getByTestId('spec-limits').innerText()).toMatch(/≥ 300 W/);
    await screenshot(b.page, 'spec-saved-wide');
  } finally {
    await b.close();
  }
});
afterAll(async () => {
  await srv?.stop();
});

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('two batches in the grid, statistics and distribution', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'dana.lindqvist@kestrel-pv.example', 'kestrel-design-demo');
      await b.page.goto(`${srv.url}/compare`, { waitUntil: 'load' });
      await b.page.getByTestId('pick-KF-M60 line 2, lot 2611').click();
      await b.page.getByTestId('pick-KF-M60 line 3, lot 2612').click();
      await b.page.getByTestId('compare-spec-Module release').click();
      await b.page.getByTestId('grid-row-M2611-001').waitFor();
      // The demo's defective modules fail the 300 W / 70 % spec (sample-data scenario).
      expect(await b.page.getByTestId('grid-row-M2611-009').innerText()).toMatch(/fail/);
      await b.page.getByTestId('filter-fail').click();
      await b.page.getByTestId('grid-row-M2611-009').waitFor();
      expect(await b.page.getByTestId('grid-row-M2611-001').count()).toBe(0);
      await b.page.getByTestId('filter-all').click();
      await b.page.getByTestId('grid-sort-pmp_w').click();
      await screenshot(b.page, `compare-grid-${vpName}`);
      await b.page.getByTestId('param-rs_ohm').click();
      await b.page.getByTestId('distribution-chart').locator('svg').first().waitFor();
      const stats = await b.page.getByTestId('stats-table').innerText();
      expect(stats).toMatch(/median/);
      expect(stats).toMatch(/Ω/);
      expect(await b.page.getByTestId('differences').innerText()).toMatch(/95 %|CI|confidence/i);
      await b.page.getByTestId('stats-table').scrollIntoViewIfNeeded();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `compare-stats-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
