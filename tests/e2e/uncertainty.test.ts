/**
 * Browser: a QA lead describes a measurement setup (a normal and a rectangular component on Pmax)
 * and writes a guard-band spec; the batch's review shows the decision rule and the devices inside
 * the guard band; the curve page shows Pmax ± its expanded uncertainty; the batch form offers the
 * setup. A second spec classes power in bins around the batch's nameplate, written in the editor.
 * Demo data (invented), at phone and wide width, with screenshots.
 */
import type { Page } from 'playwright-core';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess({ timeoutMs: 180_000 });
});
afterAll(async () => {
  await srv?.stop();
});

const BATCH = 'KF-M60 line 2, lot 2611';

async function openBatch(page: Page): Promise<void> {
  await page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
  await page.getByTestId(`batch-${BATCH}`).click();
  await page.getByTestId('review-panel').waitFor();
}

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('setup, guard-band spec, review counts, ± on the curve page, setup on the batch form', async () => {
    const b = await openBrowser(viewport);
    const page = b.page;
    try {
      await signInThroughForm(page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');

      // The setup: normal 2 % (k = 2) and rectangular 1.5 % on Pmax → U = 2·√(1 + 0.75) = 2.65 % (worked by hand).
      await page.goto(`${srv.url}/setups`, { waitUntil: 'load' });
      await page.getByTestId('new-setup').click();
      await page.getByTestId('setup-name').fill(`Line 2 flasher ${vpName}`);
      await page.getByTestId('setup-row-0-name').fill('Tester calibration');
      await page.getByTestId('setup-row-0-value').fill('2');
      await page.getByTestId('setup-add-row').click();
      await page.getByTestId('setup-row-1-name').fill('Non-uniformity on Pmax');
      await page.getByTestId('setup-row-1-rectangular').click();
      await page.getByTestId('setup-row-1-value').fill('1,5');
      expect(await page.getByTestId('setup-preview').innerText()).toMatch(/Pmax ±2\.65 %/);
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `setup-editor-${vpName}`);
      await page.getByTestId('setup-save').click();
      await page.getByTestId(`setup-Line 2 flasher ${vpName}`).waitFor();
      await screenshot(page, `setups-${vpName}`);

      // The guard-band spec, and the editor's words for a nameplate-relative limit.
      await page.goto(`${srv.url}/specs`, { waitUntil: 'load' });
      await page.getByTestId('new-spec').click();
      await page.getByTestId('spec-name').fill(`Guard band ${vpName}`);
      await page.getByTestId('limit-pmp_w-min').fill('310');
      await page.getByTestId('rule-guard-band').click();
      await page.getByTestId('nameplate-below').fill('0');
      await page.getByTestId('nameplate-above').fill('5');
      expect(await page.getByTestId('nameplate-words').innerText()).toMatch(/Pmax at least nameplate − 0 W and at most nameplate \+ 5 W/);
      await page.getByTestId('spec-decision-rule').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `spec-rule-${vpName}`);
      await page.getByTestId('nameplate-below').fill('');
      await page.getByTestId('nameplate-above').fill('');
      await page.getByTestId('spec-save').click();
      await page.getByTestId('spec-screen').waitFor();
      expect(await page.getByTestId('spec-rule-words').innerText()).toMatch(/Decision rule: guard band/);

      // The review: rule, setup and the devices within their uncertainty of 310 W (demo Pmax 311.7 W, 313.2 W … lie within 2.65 %).
      await openBatch(page);
      await page.getByTestId(`spec-choice-Guard band ${vpName}`).click();
      await page.getByTestId('decision-rule').waitFor();
      const rule = await page.getByTestId('decision-rule').innerText();
      expect(rule).toMatch(/Decision rule: guard band/);
      expect(rule).toMatch(/Pmax ±2\.65 %/);
      expect(Number(await page.getByTestId('count-guard-band').locator('text=/^\\d+$/').first().innerText())).toBeGreaterThan(0);
      await page.getByTestId('decision-rule').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `review-guard-band-${vpName}`);

      // The curve page: Pmax ± U.
      await page.getByTestId('curve-table').scrollIntoViewIfNeeded().catch(() => undefined);
      await page.locator('[data-testid^="curve-row-"]:visible').first().click();
      await page.getByTestId('curve-screen').waitFor();
      expect(await page.getByTestId('figure-pmax').innerText()).toMatch(/\d ± \d[\d.]* W/);
      expect(await page.getByTestId('uncertainty-basis').innerText()).toMatch(/Line 2 flasher/);
      expect((await layoutProblems(page)).filter((p) => !p.includes('Physics of this curve'))).toEqual([]);
      await screenshot(page, `curve-uncertainty-${vpName}`);

      // The batch form offers the setups.
      await openBatch(page);
      await page.getByRole('button', { name: 'Edit details' }).click();
      await page.getByTestId('setup-picker').scrollIntoViewIfNeeded();
      expect(await page.getByTestId('setup-picker').innerText()).toMatch(/Organisation default/);
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `batch-setup-${vpName}`);
    } finally {
      await b.close();
    }
  });

  it('power classes as bins around the nameplate: written in the editor, checked, stated in words, used by the evaluation', async () => {
    const b = await openBrowser(viewport);
    const page = b.page;
    try {
      await signInThroughForm(page, srv.url, 'quinn.mbeki@kestrel-pv.example', 'kestrel-qa-demo');
      await page.goto(`${srv.url}/specs`, { waitUntil: 'load' });
      await page.getByTestId('new-spec').click();
      await page.getByTestId('spec-name').fill(`Bins ${vpName}`);
      await page.getByTestId('class-mode-nameplate_bins').click();
      await page.getByTestId('class-basis-measured').click();
      await page.getByTestId('bin-unit-pct').click();
      // Three classes in % of the batch's 330 W nameplate; the second row first overlaps the first.
      const rows: [string, string, string][] = [['C', '-10', '-5'], ['B', '-6', '0'], ['A', '0', '5']];
      for (const [i, [label, from, to]] of rows.entries()) {
        if (i > 0) await page.getByTestId('bin-add').click();
        await page.getByTestId(`bin-row-${i}-label`).fill(label);
        await page.getByTestId(`bin-row-${i}-from`).fill(from);
        await page.getByTestId(`bin-row-${i}-to`).fill(to);
      }
      expect(await page.getByTestId('bin-row-0-words').innerText()).toBe('Class C: Pmax at least nameplate − 10 % and below nameplate − 5 %.');
      await page.getByTestId('spec-save').click();
      expect(await page.getByTestId('spec-issues').innerText()).toMatch(/Power class row 2 \(B\) from \(%\): overlaps row 1 \(C\), which reaches −5 %/);
      expect(await page.getByTestId('bin-row-1').getAttribute('aria-invalid')).toBe('true');
      expect(await page.getByTestId('bin-row-0').getAttribute('aria-invalid')).toBeNull();
      await page.getByTestId('spec-power-classes').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `spec-bins-editor-${vpName}`);
      await page.getByTestId('bin-row-1-from').fill('-5');
      // A fourth row removed again.
      await page.getByTestId('bin-add').click();
      await page.getByTestId('bin-row-3-remove').click();
      expect(await page.getByTestId('bin-row-3').count()).toBe(0);
      await page.getByTestId('spec-save').click();
      await page.getByTestId('spec-screen').waitFor();
      const words = await page.getByTestId('spec-bin-words').innerText();
      expect(words).toMatch(/Class B: Pmax at least nameplate − 5 % and below the nameplate/);
      expect(words).toMatch(/Class A: Pmax at least the nameplate and below nameplate \+ 5 %/);
      const specId = page.url().split('/specs/')[1];
      await page.getByTestId('spec-bin-words').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `spec-bins-view-${vpName}`);

      // The next version's editor shows the rows as they were typed, in %.
      await page.getByTestId('edit-spec').click();
      expect(await page.getByTestId('bin-unit-pct').getAttribute('aria-checked')).toBe('true');
      expect(await Promise.all([0, 1, 2].map((i) => page.getByTestId(`bin-row-${i}-from`).inputValue()))).toEqual(['-10', '-5', '0']);
      expect(await page.getByTestId('bin-row-2-to').inputValue()).toBe('5');

      // The evaluation classes each device by its measured Pmax against 330 W: C [297, 313.5), B [313.5, 330), A [330, 346.5) W.
      const ev = await page.evaluate(
        async ({ name, spec }) => {
          const { batches } = (await (await fetch('/api/batches')).json()) as { batches: { id: string; name: string }[] };
          const id = batches.find((x) => x.name === name)!.id;
          return (await (await fetch(`/api/batches/${id}/evaluation?spec=${spec}`)).json()) as { devices: { power_class: string | null; values: { pmp_w?: number | null } }[]; power_class_counts: Record<string, number> };
        },
        { name: BATCH, spec: specId },
      );
      const expected = (p: number) => (p >= 297 && p < 313.5 ? 'C' : p >= 313.5 && p < 330 ? 'B' : p >= 330 && p < 346.5 ? 'A' : null);
      expect(ev.devices.length).toBeGreaterThan(0);
      expect(ev.devices.map((d) => d.power_class)).toEqual(ev.devices.map((d) => expected(d.values.pmp_w!)));
      expect(ev.devices.filter((d) => d.power_class !== null).length).toBeGreaterThan(0);

      // The review shows the same classes.
      await openBatch(page);
      await page.getByTestId(`spec-choice-Bins ${vpName}`).click();
      await page.getByTestId('decision-rule').waitFor();
      const shown = await page.getByTestId('power-classes').innerText();
      for (const [cls, n] of Object.entries(ev.power_class_counts)) expect(shown).toMatch(new RegExp(`${cls}\\s*× ${n}`));
      // The bins in watts for this batch: 330 W × (1 − 10 %) = 297 W, × 0.95 = 313.5 W, × 1.05 = 346.5 W.
      expect(await page.getByTestId('nameplate-bins-note').innerText()).toBe("Classes around this batch's nameplate 330 W, on Pmax (from ≤ power < to): C 297–313.5 W, B 313.5–330 W, A 330–346.5 W.");
      await page.getByTestId('power-classes').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `review-bins-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
