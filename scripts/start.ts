/**
 * `npm start`: builds the web app if needed, opens (migrates, seeds) the database in ./data and
 * serves everything on PORT (default 8080); prints the URL and the demo accounts.
 */
import path from 'node:path';
import { dataDir } from '@/db/client';
import { readDemoAccounts } from '@/server/services/seed';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { startRuntime } from '@/server/runtime';
import { buildWeb } from './build-web';

async function main() {
  buildWeb();
  const port = Number(process.env.PORT || 8080);
  const rt = await startRuntime({ dataDir: dataDir(), port, webDir: path.resolve(__dirname, '..', 'dist') });
  const lines = [
    '',
    `  Quasilevel is running at ${rt.url}`,
    `  data folder: ${dataDir()}${rt.seeded ? ' (new: demo organisation seeded)' : ''}`,
    '',
    '  Demo accounts — for trying the product only; change or remove them before real use:',
    ...readDemoAccounts().map((a) => `    ${ROLE_LABELS[a.role].padEnd(15)} ${a.email.padEnd(36)} ${a.password}`),
    '',
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
  console.error('[quasilevel] could not start:', err);
  process.exit(1);
});
