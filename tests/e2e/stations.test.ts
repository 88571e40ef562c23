/**
 * Browser: the administrator reaches the stations screen from the navigation, makes a station key
 * (shown once, with the watcher's command line), sees it listed as never used, and revokes it
 * after confirming; at phone and wide widths, nothing runs off the screen.
 */
import { readDemoAccounts } from '@/server/services/seed';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess({ timeoutMs: 240_000 });
}, 250_000);
afterAll(async () => {
  await srv?.stop();
});

const admin = readDemoAccounts().find((a) => a.role === 'admin')!;

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('make a key, see it once, revoke it', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, admin.email, admin.password);
      await b.page.getByTestId('nav-stations').click();
      await b.page.getByTestId('stations-screen').waitFor({ timeout: 20_000 });
      const name = `Line ${vpName} flasher`;
      await b.page.getByTestId('station-name').fill(name);
      await b.page.getByTestId('station-submit').click();
      await b.page.getByTestId('station-new-key').waitFor({ timeout: 20_000 });
      const key = (await b.page.getByTestId('station-key-text').textContent()) ?? '';
      expect(key).toMatch(/^qls_[A-Za-z]{64}$/);
      await b.page.getByTestId(`station-${name}`).waitFor();
      expect(await b.page.getByTestId(`station-${name}`).textContent()).toContain('never used');
      expect(await layoutProblems(b.page)).toEqual([]);
      await screenshot(b.page, `stations-key-${vpName}`);
      // The key works once, as the station (a batch), before it is revoked.
      const made = await fetch(`${srv.url}/api/batches`, { method: 'POST', headers: { 'x-api-key': key, 'content-type': 'application/json' }, body: JSON.stringify({ name: `From ${name}` }) });
      expect(made.status).toBe(201);
      await b.page.getByTestId('station-key-done').click();
      expect(await b.page.getByTestId('station-new-key').count()).toBe(0);
      await b.page.getByTestId(`station-revoke-${name}`).click();
      await b.page.getByTestId(`station-revoke-yes-${name}`).click();
      await b.page.getByText(`${name} · revoked`).waitFor({ timeout: 20_000 });
      expect(await b.page.getByTestId(`station-${name}`).textContent()).toMatch(/last used/);
      await screenshot(b.page, `stations-revoked-${vpName}`);
      const refused = await fetch(`${srv.url}/api/batches`, { method: 'POST', headers: { 'x-api-key': key, 'content-type': 'application/json' }, body: JSON.stringify({ name: 'refused' }) });
      expect(refused.status).toBe(401);
    } finally {
      await b.close();
    }
  }, 120_000);
});
