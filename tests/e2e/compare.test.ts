/**
 * Browser: a QA lead writes a spec, then a designer compares the two demo module batches in the
 * grid with pass/fail, the statistics side by side (on a phone: one figure at a time, a card per
 * batch, the grid one tap away) and the distribution chart; the comparison is in the address, so
 * a reload or a link opens the same one.
 */
import type { Page } from 'playwright-core';
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
    await b.page.getByTestId('class-mode-steps').click();
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

const LOT_2611 = 'KF-M60 line 2, lot 2611';
const LOT_2612 = 'KF-M60 line 3, lot 2612';

/** Whether a chip (role checkbox) shows as chosen. */
const chosen = async (page: Page, testID: string) => (await page.getByTestId(testID).getAttribute('aria-checked')) === 'true';

/** The demo batches' and the spec's ids, read through the API with the page's session. */
async function idsOf(page: Page): Promise<{ batch: Record<string, string>; spec: string }> {
  return page.evaluate(async () => {
    const batches = (await (await fetch('/api/batches')).json()) as { batches: { id: string; name: string }[] };
    const specs = (await (await fetch('/api/specs')).json()) as { specs: { id: string; name: string }[] };
    return { batch: Object.fromEntries(batches.batches.map((x) => [x.name, x.id])), spec: specs.specs.find((x) => x.name === 'Module release')!.id };
  });
}

/** On a phone the grid waits behind a button; a wide screen shows it at once. */
async function openGrid(page: Page, phone: boolean) {
  if (phone) await page.getByTestId('show-grid').click();
}

/** The statistics as text: the side-by-side table, or on a phone the batches' cards in order. */
const statsText = (page: Page, phone: boolean) => page.getByTestId(phone ? 'compare-by-parameter' : 'stats-table').innerText();

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  const phone = vpName === 'phone';
  it('two batches in the grid, statistics and distribution', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'dana.lindqvist@kestrel-pv.example', 'kestrel-design-demo');
      await b.page.goto(`${srv.url}/compare`, { waitUntil: 'load' });
      await b.page.getByTestId('pick-KF-M60 line 2, lot 2611').click();
      await b.page.getByTestId('pick-KF-M60 line 3, lot 2612').click();
      await b.page.getByTestId('compare-spec-Module release').click();
      await openGrid(b.page, phone);
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
      // The choices are in the address, in the order picked.
      const ids = await idsOf(b.page);
      await b.page.waitForURL((u) => u.searchParams.get('param') === 'rs_ohm');
      const url = new URL(b.page.url());
      expect(url.searchParams.get('batches')).toBe(`${ids.batch[LOT_2611]},${ids.batch[LOT_2612]}`);
      expect(url.searchParams.get('spec')).toBe(ids.spec);
      const stats = await statsText(b.page, phone);
      expect(stats).toMatch(/median/);
      expect(stats).toMatch(/Ω/);
      expect(await b.page.getByTestId(phone ? `difference-${LOT_2612}` : 'differences').innerText()).toMatch(/95 %|CI|confidence/i);
      await b.page.getByTestId(phone ? 'compare-by-parameter' : 'stats-table').scrollIntoViewIfNeeded();
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `compare-stats-${vpName}`);
    } finally {
      await b.close();
    }
  });

  it('a link with batches, parameter and spec opens that comparison, and a reload keeps it', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'dana.lindqvist@kestrel-pv.example', 'kestrel-design-demo');
      const ids = await idsOf(b.page);
      // Lot 2612 first: the first batch is the one the others are compared with.
      const link = `${srv.url}/compare?batches=${ids.batch[LOT_2612]},${ids.batch[LOT_2611]}&param=ff&spec=${ids.spec}`;
      await b.page.goto(link, { waitUntil: 'load' });
      await openGrid(b.page, phone);
      await b.page.getByTestId('grid-row-M2612-001').waitFor();
      await b.page.getByTestId('grid-row-M2611-001').waitFor();
      expect(await chosen(b.page, `pick-${LOT_2611}`)).toBe(true);
      expect(await chosen(b.page, `pick-${LOT_2612}`)).toBe(true);
      expect(await chosen(b.page, 'compare-spec-Module release')).toBe(true);
      expect(await chosen(b.page, 'param-ff')).toBe(true);
      expect(await chosen(b.page, 'param-pmp_w')).toBe(false);
      // The statistics are of FF (in %), in the linked order, judged against the spec (pass/fail filter shown).
      const stats = await statsText(b.page, phone);
      expect(stats).toMatch(/FF/);
      expect(stats).toMatch(/%/);
      expect(stats.indexOf(LOT_2612)).toBeLessThan(stats.indexOf(LOT_2611));
      await b.page.getByTestId('filter-fail').waitFor();
      await screenshot(b.page, `compare-link-${vpName}`);

      // Dropping a batch changes the address; a reload shows the same comparison.
      await b.page.getByTestId(`pick-${LOT_2611}`).click();
      await b.page.waitForURL((u) => u.searchParams.get('batches') === ids.batch[LOT_2612]);
      await b.page.reload({ waitUntil: 'load' });
      await openGrid(b.page, phone);
      await b.page.getByTestId('grid-row-M2612-001').waitFor();
      expect(await b.page.getByTestId('grid-row-M2611-001').count()).toBe(0);
      expect(await chosen(b.page, `pick-${LOT_2611}`)).toBe(false);
      expect(await chosen(b.page, 'param-ff')).toBe(true);
    } finally {
      await b.close();
    }
  });
});
