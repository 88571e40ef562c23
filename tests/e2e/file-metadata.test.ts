/**
 * Browser: a curve read from a file with a header block shows the kept metadata lines and the
 * irradiance column's mean and change, at phone and wide width (issue 14, items 2 and 3). The
 * files are the invented examples of tests/fixtures/header-block.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { layoutProblems, openBrowser, screenshot, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const FIXTURES = path.resolve(__dirname, '../fixtures/header-block');

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess({ timeoutMs: 180_000 });
});
afterAll(async () => {
  await srv?.stop();
});

describe.each(Object.entries(VIEWPORTS))('at %s width', (vpName, viewport) => {
  it('the curve page lists the file metadata and the irradiance column', async () => {
    const b = await openBrowser(viewport);
    try {
      await signInThroughForm(b.page, srv.url, 'tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
      const headers = { Origin: srv.url };
      const batch = await b.page.request.post(`${srv.url}/api/batches`, { headers, data: { name: `Header blocks ${vpName}`, cells: 36 } });
      expect(batch.status()).toBe(201);
      const { id } = await batch.json();
      const file = (name: string) => ({ name, mimeType: 'text/csv', buffer: readFileSync(path.join(FIXTURES, name)) });
      const up = await b.page.request.post(`${srv.url}/api/batches/${id}/curves`, { headers, multipart: { files: file('irradiance-column-drift.csv') } });
      expect(up.status()).toBe(201);
      const up2 = await b.page.request.post(`${srv.url}/api/batches/${id}/curves`, { headers, multipart: { files: file('comma-block.csv') } });
      expect(up2.status()).toBe(201);
      const drift = (await up.json()).results[0];
      const comma = (await up2.json()).results[0];

      await b.page.goto(`${srv.url}/curves/${comma.curve_id}`, { waitUntil: 'load' });
      const card = b.page.getByTestId('file-metadata');
      await card.waitFor();
      await card.scrollIntoViewIfNeeded();
      const text = await card.innerText();
      for (const s of ['File metadata', 'Operator', 'Doe, J.', 'Lamp hours', '1203 h', 'Module type', 'HB-36P']) expect(text).toContain(s);
      await screenshot(b.page, `file-metadata-${vpName}`);
      expect((await layoutProblems(b.page)).filter((p) => !p.includes('Physics of this curve'))).toEqual([]);

      await b.page.goto(`${srv.url}/curves/${drift.curve_id}`, { waitUntil: 'load' });
      await b.page.getByTestId('irradiance-column').waitFor();
      expect(await b.page.getByTestId('irradiance-column').innerText()).toMatch(/Irradiance column: mean 1003 W\/m², changing by 3\.5 % of the mean/);
      expect(await b.page.getByTestId('flags').innerText()).toMatch(/The irradiance changed by 3\.5 % of its mean/);
      await b.page.getByTestId('flags').scrollIntoViewIfNeeded();
      await screenshot(b.page, `irradiance-flag-${vpName}`);
    } finally {
      await b.close();
    }
  });
});
