/**
 * Browser: a designer explores the device physics at phone and wide widths (doping changes the
 * quasi-Fermi-level splitting on screen), then opens the physics of a demo module curve from its
 * curve page and sees J0, the Voc-across-temperature chart and a translation. Screenshots
 * physics-*.png go to artifacts/screenshots (git-ignored).
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

/** The eV figure inside a Figure element, as a number. */
async function evOf(page: Page, testID: string): Promise<number> {
  const text = await page.getByTestId(testID).innerText();
  const m = text.match(/(-?\d+\.\d+) eV/);
  if (!m) throw new Error(`no eV figure in ${testID}: ${text}`);
  return Number(m[1]);
}

/**
 * Scrolls the screen's own ScrollView (not the document) so the element is at its top, the way a
 * person's swipe does; Playwright's scrollIntoView would also move overflow-hidden ancestors.
 */
async function scrollTo(page: Page, testID: string): Promise<void> {
  await page.evaluate((id) => {
    const scroller = document.querySelector<HTMLElement>('[data-testid="physics-screen"]');
    const el = document.querySelector<HTMLElement>(`[data-testid="${id}"]`);
    if (!scroller || !el) throw new Error(`cannot scroll to ${id}`);
    scroller.scrollTop += el.getBoundingClientRect().top - scroller.getBoundingClientRect().top - 8;
  }, testID);
  await page.waitForTimeout(150);
}

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('a designer opens Physics, changes the doping and sees the splitting change', async () => {
    const b = await openBrowser(viewport);
    try {
      expect(designer.role).toBe('designer');
      await signInThroughForm(b.page, srv.url, designer.email, designer.password);
      await b.page.getByTestId('nav-physics').first().click();
      await b.page.getByTestId('physics-screen').waitFor();
      await b.page.getByTestId('splitting-fd').waitFor({ timeout: 20_000 });
      await b.page.locator('[data-testid="band-diagram"] svg').first().waitFor();
      await b.page.locator('[data-testid="occupation-chart"] svg').first().waitFor();
      await b.page.locator('[data-testid="ni-chart"] svg').first().waitFor();

      // Default p-type 10¹⁶ cm⁻³, Δn 10¹⁵ cm⁻³, 300 K: 0.659 eV (the API test checks it by hand).
      const before = await evOf(b.page, 'splitting-fd');
      expect(before).toBeCloseTo(0.6589, 3);
      // n_i and the Altermatt et al. (2003) reference beside it.
      expect(await b.page.getByTestId('ni-reference').innerText()).toMatch(/cm⁻³[\s\S]*9\.65×10⁹[\s\S]*Altermatt/);
      expect(await b.page.getByTestId('ni-value').innerText()).toMatch(/cm⁻³[\s\S]*9\.68×10⁹/);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-explore-${vpName}`);

      // One step up of the doping (1e16 → 2e16): Boltzmann by hand, kT·ln 2 ≈ +16 mV at low injection
      // (here Δn/N_A = 5 %, so a little less).
      await b.page.getByTestId('doping-up').click();
      expect(await b.page.getByTestId('doping-input').inputValue()).toBe('2e16');
      await b.page.waitForFunction(
        (old) => {
          const el = document.querySelector('[data-testid="splitting-fd"]');
          const m = el?.textContent?.match(/(-?\d+\.\d+) eV/);
          return !!m && Math.abs(Number(m[1]) - old) > 0.005;
        },
        before,
        { timeout: 20_000 },
      );
      const after = await evOf(b.page, 'splitting-fd');
      expect(after - before).toBeGreaterThan(0.01);
      expect(after - before).toBeLessThan(0.0179); // kT·ln 2 = 17.9 mV at 300 K is the upper bound

      // Typing works too: n-type 10²⁰ cm⁻³ is degenerate and says so.
      await b.page.getByTestId('doping-type-n').click();
      await b.page.getByTestId('doping-input').fill('1e20');
      await b.page.getByTestId('degenerate').waitFor({ timeout: 20_000 });
      await scrollTo(b.page, 'band-card');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-band-${vpName}`);
      await scrollTo(b.page, 'occupation-card');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-occupation-${vpName}`);
      await scrollTo(b.page, 'ni-card');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-ni-${vpName}`);

      // The n_i chart's range "from" above "to": said once at "To (K)", and no chart is drawn for it.
      await b.page.getByTestId('ni-range-from').fill('350');
      await b.page.getByTestId('ni-range-to').fill('250');
      await b.page.getByTestId('ni-range-to-error').waitFor();
      expect(await b.page.getByTestId('ni-range-to-error').innerText()).toBe('To (K) must be above From (350 K).');
      expect(await b.page.locator('[data-testid="ni-chart"]').count()).toBe(0);
      await scrollTo(b.page, 'ni-card');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-ni-range-error-${vpName}`);
      await b.page.getByTestId('ni-range-to').fill('450');
      await b.page.locator('[data-testid="ni-chart"] svg').first().waitFor({ timeout: 20_000 });

      // An invalid temperature: −300 °C is refused at the field in the form's words with rounded
      // numbers; the results are gone (one neutral card, not the error four times).
      await b.page.getByTestId('temp-unit-C').click();
      await b.page.getByTestId('temp-input').fill('-300');
      await b.page.getByTestId('temp-error').waitFor();
      expect(await b.page.getByTestId('temp-error').innerText()).toBe("Temperature (°C) must be from −123.15 to 226.85, the crystalline silicon model's range (−300 is outside).");
      await b.page.getByTestId('physics-no-result').waitFor();
      for (const card of ['splitting-card', 'band-card', 'occupation-card', 'ni-card']) expect(await b.page.getByTestId(card).count()).toBe(0);
      expect(await b.page.getByText('must be from −123.15').count()).toBe(1);
      expect(await b.page.getByText(/temp_k|tempK|\d{8,}/).count()).toBe(0);
      await scrollTo(b.page, 'physics-controls');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-invalid-${vpName}`);
      // Back to a valid temperature: the results come back for it.
      await b.page.getByTestId('temp-input').fill('26.85');
      await b.page.getByTestId('splitting-fd').waitFor({ timeout: 20_000 });
      expect(await b.page.getByTestId('temp-error').count()).toBe(0);
    } finally {
      await b.close();
    }
  });

  it('opens Physics from a demo curve page and sees J0 and the Voc-vs-temperature chart', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, designer.email, designer.password);
      await b.page.goto(`${srv.url}/batches`, { waitUntil: 'load' });
      await b.page.getByTestId('batch-KF-M60 line 2, lot 2611').click();
      await b.page.getByTestId('curve-row-M2611-001').click();
      await b.page.getByTestId('curve-screen').waitFor();
      await b.page.getByTestId('to-physics').click();
      await b.page.getByTestId('physics-curve').waitFor({ timeout: 20_000 });
      expect(b.page.url()).toMatch(/\/physics\?curve=/);
      await b.page.locator('[data-testid="voc-temperature-chart"] svg').first().waitFor();

      // 60 cells on 16 610 cm² (demo metadata): J0 is per cell area, in A/cm².
      const j0 = await b.page.getByTestId('j0-figure').innerText();
      expect(j0).toMatch(/J0/);
      expect(j0).toMatch(/A\/cm²\)\s*\d\.\d+×10⁻[⁰¹²³⁴⁵⁶⁷⁸⁹]+/);
      expect(j0).toMatch(/276\.8 cm² per cell/);
      expect(await b.page.getByTestId('voc-coefficient').innerText()).toMatch(/mV\/K/);
      // A 60-cell module: module voltages, so the caution is shown.
      expect(await b.page.getByTestId('hv-caution').count()).toBe(1);
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-curve-${vpName}`);

      await scrollTo(b.page, 'voc-temperature-chart');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-voc-${vpName}`);

      // The chart's range: "from" above "to" is said at "To (°C)" and the chart is not drawn for it;
      // a valid range redraws it over that range.
      await b.page.getByTestId('voc-range-from').fill('60');
      await b.page.getByTestId('voc-range-to').fill('10');
      await b.page.getByTestId('voc-range-to-error').waitFor();
      expect(await b.page.getByTestId('voc-range-to-error').innerText()).toBe('To (°C) must be above From (60 °C).');
      expect(await b.page.locator('[data-testid="voc-temperature-chart"]').count()).toBe(0);
      await scrollTo(b.page, 'voc-range');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-voc-range-error-${vpName}`);
      await b.page.getByTestId('voc-range-from').fill('0');
      await b.page.getByTestId('voc-range-to').fill('50');
      await b.page.locator('[data-testid="voc-temperature-chart"] svg').first().waitFor({ timeout: 20_000 });
      await b.page.getByText('0 °C to 50 °C').waitFor({ timeout: 20_000 });

      // Translate the module to 50 °C by its fitted model: less power than at STC.
      await b.page.getByTestId('translate-temp').fill('50');
      await b.page.getByTestId('translate-submit').click();
      await b.page.getByTestId('translate-result').waitFor({ timeout: 20_000 });
      await b.page.locator('[data-testid="translate-chart"] svg').first().waitFor();
      // The demo curve was measured at 25 °C: 25 K warmer costs power (sign only; the API test has numbers).
      expect(await b.page.getByTestId('translated-pmp_w').innerText()).toMatch(/measured [\d.]+ W \(−\d+\.\d %\)/);
      await scrollTo(b.page, 'translate-result');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `physics-translate-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
