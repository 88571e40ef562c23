/**
 * Browser: a designer sizes a string from the demo batch "KF-M60 line 2, lot 2611" at phone and
 * wide widths, sees the figures the API computed (string Voc highlighted above 60 V DC), where
 * each input came from and the expanded high-voltage caution; bad input shows one message at
 * its field (the form's own check, or the library's in the form's words) and no figures. Screenshots strings-*.png go to artifacts/screenshots.
 */
import { readDemoAccounts } from '@/server/services/seed';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const DEMO_BATCH = 'KF-M60 line 2, lot 2611';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
});
afterAll(async () => {
  await srv?.stop();
});

const designer = readDemoAccounts().find((a) => a.email === 'dana.lindqvist@kestrel-pv.example')!;

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('a designer sizes a string from the demo batch and sees the result, its sources and the caution', async () => {
    expect(designer).toBeDefined();
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await signInThroughForm(page, srv.url, designer.email, designer.password);
      await page.goto(`${srv.url}/strings`, { waitUntil: 'load' });
      await page.getByTestId('strings-screen').waitFor();
      await page.getByTestId('strings-empty').waitFor();
      // The caution is there before any number is.
      expect(await page.getByTestId('hv-caution').count()).toBe(1);
      await page.getByTestId(`pick-batch-${DEMO_BATCH}`).waitFor();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `strings-empty-${vpName}`);

      await page.getByTestId(`pick-batch-${DEMO_BATCH}`).click();
      await page.getByTestId('tmin').fill('-25');
      await page.getByTestId('tcellmax').fill('70');
      await page.getByTestId('vsys-1500').click();
      await page.getByTestId('mpp-min').fill('500');
      await page.getByTestId('mpp-max').fill('1300');
      await page.getByTestId('size-submit').click();
      await page.getByTestId('string-result').waitFor({ timeout: 30_000 });
      if (vpName === 'phone') {
        // On a phone the result is below the form: a line by the button says so.
        expect(await page.getByTestId('size-summary').innerText()).toMatch(/At most \d+ modules, at least \d+: details below/);
        await screenshot(page, `strings-summary-${vpName}`);
        await page.getByTestId('string-figures').scrollIntoViewIfNeeded();
      }

      // The figures on screen are the API's for the same request (sizing logic is tested in tests/server/strings.test.ts).
      const api = await page.evaluate(async (name) => {
        const list = await (await fetch('/api/batches', { credentials: 'include' })).json();
        const batchId = list.batches.find((x: { name: string }) => x.name === name).id;
        const res = await fetch('/api/strings/size', {
          method: 'POST',
          credentials: 'include',
          headers: { 'Content-Type': 'application/json' },
          body: JSON.stringify({ batch_id: batchId, t_min_c: -25, t_cell_max_c: 70, v_sys_v: 1500, mpp_window_min_v: 500, mpp_window_max_v: 1300 }),
        });
        return res.json();
      }, DEMO_BATCH);
      expect(api.max_modules).toBeGreaterThan(1);
      expect(await page.getByTestId('max-modules').innerText()).toContain(String(api.max_modules));
      expect(await page.getByTestId('string-voc').innerText()).toContain(api.string_voc_max_v.toFixed(1));
      expect(await page.getByTestId('margin').innerText()).toContain(api.margin_v.toFixed(1));
      expect(await page.getByTestId('min-modules').innerText()).toContain(String(api.min_modules));
      // A string of modules is far above 60 V DC: highlighted.
      expect(api.string_voc_max_v).toBeGreaterThan(60);
      await page.getByTestId('string-voc-elv').waitFor();
      // Where the inputs came from: the batch's worst module and the fitted model (the demo batch is at one temperature).
      await page.getByTestId('source-voc-batch').waitFor();
      await page.getByTestId('source-beta-model').waitFor();
      // 23 of lot 2611's 24 modules: M2611-015's bypass-diode step leaves it without STC figures.
      expect(await page.getByTestId('string-sources').innerText()).toMatch(/highest-Voc module of 23.*not the batch mean/);
      // The caution is expanded: every bullet is on the page.
      expect(await page.getByTestId('hv-caution').innerText()).toMatch(/no off switch[\s\S]*DC arc does not go out[\s\S]*design guidance only/i);
      await page.getByTestId('string-voc-chart').waitFor();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `strings-result-${vpName}`);
      await page.getByTestId('string-chart-card').scrollIntoViewIfNeeded();
      await screenshot(page, `strings-chart-${vpName}`);

      // An invalid edit drops the result at once: no figure stays beside input it does not answer.
      await page.getByTestId('tmin').fill('cold');
      await page.getByTestId('tmin').blur();
      await page.getByTestId('tmin-error').waitFor();
      expect(await page.getByTestId('tmin-error').innerText()).toBe('Record low ambient (°C) must be a number.');
      expect(await page.getByTestId('string-result').count()).toBe(0);

      // "From" above "to": said once, at the MPP window's "to" field, before anything is sent.
      await page.getByTestId('tmin').fill('-25');
      await page.getByTestId('mpp-min').fill('1300');
      await page.getByTestId('mpp-max').fill('500');
      await page.getByTestId('size-submit').click();
      await page.getByTestId('mpp-max-error').waitFor();
      expect(await page.getByTestId('mpp-max-error').innerText()).toBe('MPP window to (V) must be above MPP window from (1300 V).');
      expect(await page.getByText('must be above MPP window from').count()).toBe(1);
      expect(await page.getByTestId('string-result').count()).toBe(0);
      await page.getByTestId('mpp-max').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `strings-range-error-${vpName}`);
      await page.getByTestId('mpp-min').fill('500');
      await page.getByTestId('mpp-max').fill('1300');

      // Bad input the library refuses: a record low of −70 °C is said at its field, in its label's
      // words, once (not again by the button), and no figures are on screen.
      await page.getByTestId('tmin').fill('-70');
      await page.getByTestId('size-submit').click();
      await page.getByTestId('tmin-error').waitFor();
      expect(await page.getByTestId('tmin-error').innerText()).toMatch(/^Record low ambient is -70 °C, outside -60…\+100 °C/);
      expect(await page.getByText('is -70 °C, outside').count()).toBe(1);
      expect(await page.getByTestId('form-error').count()).toBe(0);
      expect(await page.getByTestId('string-result').count()).toBe(0);
      await page.getByTestId('tmin').scrollIntoViewIfNeeded();
      expect(await layoutProblems(page)).toEqual([]);
      await screenshot(page, `strings-error-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
