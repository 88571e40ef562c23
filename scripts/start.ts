/**
 * `npm start`: builds the web app if needed, opens (migrates, seeds) the database in ./data and
 * serves everything on HOST:PORT (default 127.0.0.1:8080); prints the URL and the demo accounts.
 */
import path from 'node:path';
import { dataDir } from '@/db/client';
import { readDemoAccounts } from '@/server/services/seed';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { StartError } from '@/server/data-lock';
import { checkCanStart, networkWarning, serverHost, startRuntime } from '@/server/runtime';
import { buildWeb } from './build-web';

async function main() {
  const port = Number(process.env.PORT || 8080);
  // A second `npm start` stops here, before rebuilding the web app the first one serves.
  await checkCanStart(dataDir(), port, serverHost());
  await buildWeb();
  const rt = await startRuntime({ dataDir: dataDir(), port, host: serverHost(), webDir: path.resolve(__dirname, '..', 'dist') });
  const warning = networkWarning();
  const lines = [
    '',
    `  Quasilevel is running at ${rt.url}`,
    `  data folder: ${dataDir()}${rt.seeded ? ' (new: demo organisation seeded)' : ''}`,
    '',
    '  Demo accounts — for trying the product only; change or remove them before real use:',
    ...readDemoAccounts().map((a) => `    ${ROLE_LABELS[a.role].padEnd(15)} ${a.email.padEnd(36)} ${a.password}`),
    '',
    ...(warning ? [`  ${warning}`, ''] : []),
    '  Press Ctrl+C to stop.',
    '',
  ];
  console.log(lines.join('\n'));
  const shutdown = async () => {
    await rt.stop();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown());
  process.on('SIGTERM', () => void shutdown());
}

main().catch((err) => {
  // A StartError says what to do; anything else gets its stack for the bug report.
  console.error('[quasilevel] could not start:', err instanceof StartError ? err.message : err);
  process.exit(1);
});
