// API tests open an in-memory PGlite and hash passwords: slow on a busy 2-core machine.
jest.setTimeout(60_000);
