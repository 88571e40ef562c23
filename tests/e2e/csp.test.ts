/**
 * The exported web app under the server's Content-Security-Policy (server/guards.ts): signing in
 * and opening every section, a batch with its charts, the comparison and an upload raise no CSP
 * violation (neither a `securitypolicyviolation` event nor a "Refused to …" console message),
 * and the shipped font is the one drawn.
 */
import type { Page } from 'playwright-core';
import { openBrowser, signInThroughForm, VIEWPORTS } from '@/tests/support/browser';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' }; // sample-data/demo-accounts.json

let srv: ServerProcess;
beforeAll(async () => {
  srv = await startServerProcess();
});
afterAll(async () => {
  await srv?.stop();
});

/** Collects every CSP violation the page reports, from the DOM event and from the console. */
async function watchViolations(page: Page): Promise<string[]> {
  const seen: string[] = [];
  page.on('console', (m) => {
    if (/Content Security Policy|Refused to (load|apply|execute|connect|frame)/i.test(m.text())) seen.push(`console: ${m.text()}`);
  });
  await page.exposeFunction('__qlCspViolation', (text: string) => seen.push(text));
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      (window as unknown as { __qlCspViolation: (t: string) => void }).__qlCspViolation(`${e.violatedDirective}: ${e.blockedURI || 'inline'} (${e.sourceFile}:${e.lineNumber})`);
    });
  });
  return seen;
}

it('signing in, every section, a batch with its charts, the comparison and an upload: no CSP violation', async () => {
  const b = await openBrowser(VIEWPORTS.wide);
  try {
    const violations = await watchViolations(b.page);
    const res = await b.page.goto(`${srv.url}/sign-in`, { waitUntil: 'load' });
    expect(res?.headers()['content-security-policy']).toMatch(/script-src 'self'/);
    await signInThroughForm(b.page, srv.url, ENGINEER.email, ENGINEER.password);
    expect(await b.page.evaluate(() => document.fonts.check('16px PlexSans'))).toBe(true);

    const { batches } = (await b.page.evaluate(() => fetch('/api/batches').then((r) => r.json()))) as { batches: { id: string }[] };
    expect(batches.length).toBeGreaterThan(0);
    for (const url of ['/batches', `/batches/${batches[0].id}`, `/compare?batches=${batches.map((x) => x.id).join(',')}`, '/physics', '/strings', '/specs', '/account']) {
      await b.page.goto(`${srv.url}${url}`, { waitUntil: 'networkidle' });
      // Give react-native-web time to write its styles and the charts to draw.
      await b.page.waitForTimeout(800);
    }

    // Changes from the page itself pass the same-origin rule: a new batch, then an upload to it as a form.
    const statuses = await b.page.evaluate(async () => {
      const made = await fetch('/api/batches', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ name: 'CSP check', cells: 1 }) });
      const { id } = (await made.json()) as { id: string };
      const form = new FormData();
      form.append('files', new Blob(['V,I\n0,1\n'], { type: 'text/csv' }), 'tiny.csv');
      const up = await fetch(`/api/batches/${id}/curves`, { method: 'POST', body: form });
      return [made.status, up.status];
    });
    // The file is too short to be a curve (a 422 answer with its reason), but the request went through.
    expect(statuses).toEqual([201, 422]);
    expect(violations).toEqual([]);
  } finally {
    await b.close();
  }
});
