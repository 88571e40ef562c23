/**
 * Browser: a designer opens Physics and lands on the devices of the newest seeded batch — J0 and
 * implied Voc as distributions (each chart with its table), the devices with their figures — picks
 * the other module batch, and follows a device to its curve's physics. At 390 px and 1440 px;
 * screenshots physics-batch-*.png go to artifacts/screenshots (git-ignored).
 */
import type { Page } from 'playwright-core';
import { readDemoAccounts } from '@/server/services/seed';
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

const designer = readDemoAccounts().find((a) => a.email === 'dana.lindqvist@kestrel-pv.example')!;

/** Scrolls the screen's own ScrollView so the element is at its top, as a swipe does. */
async function scrollTo(page: Page, testID: string): Promise<void> {
  await page.evaluate((id) => {
    const scroller = document.querySelector<HTMLElement>('[data-testid="physics-screen"]');
    const el = document.querySelector<HTMLElement>(`[data-testid="${id}"]`);
    if (!scroller || !el) throw new Error(`cannot scroll to ${id}`);
    scroller.scrollTop += el.getBoundingClientRect().top - scroller.getBoundingClientRect().top - 8;
  }, testID);
  await page.waitForTimeout(150);
}

type Answer = { batch: { name: string }; devices: { device_id: string; curve_id: string; implied_voc_v: number | null }[]; summary: { total: number; usable: number; implied_voc_25c_v: { median: number } | null } };

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('opens on the newest batch’s devices, switches batch and follows a device to its physics', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, designer.email, designer.password);
      await b.page.getByTestId('nav-physics').first().click();
      await b.page.getByTestId('physics-batch').waitFor();
      await b.page.getByTestId('batch-physics-devices').waitFor({ timeout: 30_000 });
      await b.page.locator('[data-testid="batch-physics-voc-chart"] svg').first().waitFor();
      await b.page.locator('[data-testid="batch-physics-j0-chart"] svg').first().waitFor();

      // The batch it opened on is the newest with curves, and the screen shows the API's answer.
      const { newest, other, answer } = await b.page.evaluate(async () => {
        const list = (await (await fetch('/api/batches', { credentials: 'include' })).json()).batches as { id: string; name: string; archived: boolean; created_at: string; curve_count?: number; cells: number | null }[];
        const live = list.filter((x) => !x.archived && (x.curve_count ?? 0) > 0).sort((x, y) => y.created_at.localeCompare(x.created_at));
        const a = await (await fetch(`/api/physics/batches/${live[0].id}`, { credentials: 'include' })).json();
        return { newest: live[0], other: live.find((x) => x.id !== live[0].id && (x.cells ?? 1) > 1) ?? live[1], answer: a as Answer };
      });
      expect(await b.page.getByTestId(`physics-batch-pick-${newest.id}`).getAttribute('aria-checked')).toBe('true');
      expect(answer.summary.total).toBeGreaterThan(10);
      expect(await b.page.getByTestId('batch-physics-usable').innerText()).toContain(`${answer.summary.usable} of ${answer.summary.total}`);
      // The median implied Voc at 25 °C as the key table shows volts (4 significant digits).
      const med = answer.summary.implied_voc_25c_v!.median;
      expect(await b.page.getByTestId('batch-physics-voc').innerText()).toContain(Number(med.toPrecision(4)).toString());
      await b.page.getByTestId('batch-physics-devices').getByText(`Devices (${answer.summary.total})`).waitFor();
      expect(await layoutProblems(b.page)).toEqual([]);
      await scrollTo(b.page, 'physics-batch');
      await screenshot(b.page, `physics-batch-${vpName}`);
      await scrollTo(b.page, 'batch-physics-j0-chart');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-batch-charts-${vpName}`);
      // The chart's table alternative: the box as numbers.
      await b.page.getByTestId('batch-physics-j0-chart-table-toggle').click();
      await b.page.getByRole('table', { name: /J0 at 25 °C/ }).waitFor();
      expect(await b.page.getByRole('table', { name: /J0 at 25 °C/ }).innerText()).toContain(String(answer.summary.total));
      await screenshot(b.page, `physics-batch-table-${vpName}`);
      await scrollTo(b.page, 'batch-physics-devices');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-batch-devices-${vpName}`);

      // Another batch: its name in the address and its own devices.
      await b.page.getByTestId(`physics-batch-pick-${other.id}`).click();
      await b.page.waitForFunction((id) => location.search.includes(`batch=${id}`), other.id);
      const otherAnswer = await b.page.evaluate(async (id) => (await (await fetch(`/api/physics/batches/${id}`, { credentials: 'include' })).json()) as Answer, other.id);
      const first = otherAnswer.devices[0];
      await b.page.getByTestId(`batch-physics-link-${first.device_id}`).waitFor({ timeout: 30_000 });

      // A device leads to its curve's physics, with the batch kept.
      await b.page.getByTestId(`batch-physics-link-${first.device_id}`).click();
      await b.page.getByTestId('physics-curve').waitFor({ timeout: 30_000 });
      expect(b.page.url()).toContain(`curve=${first.curve_id}`);
      expect(b.page.url()).toContain(`batch=${other.id}`);
      expect(await b.page.getByTestId('physics-curve').innerText()).toContain(first.device_id);
      // …on a screen that opens at the top: the curve is in view without scrolling.
      const box = await b.page.getByTestId('physics-curve').boundingBox();
      expect(box && box.y + 40 < viewport.height).toBe(true);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-batch-curve-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
