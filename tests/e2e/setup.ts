import { closeChromium } from '@/tests/support/browser';

// Browser tests start a server and Chromium: give each test and hook room to breathe.
jest.setTimeout(240_000);

// Each test file shares one Chromium process (tests/support/browser.ts); it ends with the file.
afterAll(async () => {
  await closeChromium();
});
