// Browser tests start a server and Chromium: give each test and hook room to breathe.
jest.setTimeout(240_000);
