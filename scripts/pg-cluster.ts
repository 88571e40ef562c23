/**
 * A throwaway PostgreSQL cluster for tests and benchmarks: Debian's server binaries
 * (/usr/lib/postgresql/<version>/bin; `apt-get install postgresql` when missing and we may), run
 * as the `postgres` user (the server refuses root) in a new temporary folder on a free port,
 * listening on 127.0.0.1 only, trust authentication, one database `quasilevel`.
 * `stop()` stops it (immediate) and removes the folder; it is also run at process exit, so the
 * cluster goes whatever happened.
 *
 * As a command: `npx tsx scripts/pg-cluster.ts -- <command…>` runs the command with DATABASE_URL
 * set to the new cluster and removes the cluster after it, passing on its exit status;
 * `npx tsx scripts/pg-cluster.ts --ensure` installs the binaries when missing (as root) and exits 0
 * when a cluster can be started here.
 */
import { spawn, spawnSync } from 'node:child_process';
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';

export type Cluster = { url: string; port: number; dir: string; stop: () => void };

const PG_ROOT = '/usr/lib/postgresql';

/** The newest installed server's bin folder, or null. */
export function postgresBin(): string | null {
  if (process.env.QUASILEVEL_PG_BIN) return existsSync(path.join(process.env.QUASILEVEL_PG_BIN, 'initdb')) ? process.env.QUASILEVEL_PG_BIN : null;
  if (!existsSync(PG_ROOT)) return null;
  const versions = readdirSync(PG_ROOT).filter((v) => existsSync(path.join(PG_ROOT, v, 'bin', 'initdb'))).sort((a, b) => Number(b) - Number(a));
  return versions.length ? path.join(PG_ROOT, versions[0], 'bin') : null;
}

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

/** True when a cluster can be started here: server binaries present and a `postgres` user to run them. */
export function clusterAvailable(): boolean {
  return !!postgresBin() && spawnSync('id', ['-u', 'postgres']).status === 0 && (isRoot() || process.getuid?.() === Number(spawnSync('id', ['-u', 'postgres']).stdout));
}

/** Installs Debian's postgresql when its binaries are missing and this process may (root). */
export function ensurePostgres(): boolean {
  if (postgresBin()) return true;
  if (!isRoot()) return false;
  console.log('[pg-cluster] PostgreSQL server binaries missing; installing Debian\'s postgresql with apt-get…');
  spawnSync('sh', ['-c', 'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql'], { stdio: 'inherit' });
  return !!postgresBin();
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

/** Runs a server binary as the postgres user (directly when we are that user). */
function asPostgres(bin: string, args: string[]) {
  const r = isRoot() ? spawnSync('runuser', ['-u', 'postgres', '--', bin, ...args], { encoding: 'utf8' }) : spawnSync(bin, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${path.basename(bin)} failed (${r.status}): ${r.stderr || r.stdout}`);
  return r.stdout;
}

/** Starts a new cluster; throws when it cannot (see clusterAvailable). */
/** `settings`: more server settings (`name=value`), e.g. a preloaded library for a profile. */
export async function startCluster(options: { settings?: string[] } = {}): Promise<Cluster> {
  if (!ensurePostgres()) throw new Error('PostgreSQL server binaries are not installed (apt-get install postgresql).');
  const bin = postgresBin()!;
  const dir = mkdtempSync(path.join(os.tmpdir(), 'quasilevel-pg-'));
  const data = path.join(dir, 'db');
  let started = false;
  let stopped = false;
  const stop = () => {
    if (stopped) return;
    stopped = true;
    process.removeListener('exit', stop);
    if (started) {
      try {
        asPostgres(path.join(bin, 'pg_ctl'), ['-D', data, '-m', 'immediate', '-w', 'stop']);
      } catch {
        /* already gone */
      }
    }
    rmSync(dir, { recursive: true, force: true });
  };
  process.on('exit', stop);
  try {
    if (isRoot()) {
      const uid = Number(spawnSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).stdout);
      const gid = Number(spawnSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).stdout);
      chownSync(dir, uid, gid);
    }
    asPostgres(path.join(bin, 'initdb'), ['-D', data, '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--no-sync']);
    const port = await freePort();
    const opts = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c max_connections=200${(options.settings ?? []).map((x) => ` -c ${x}`).join('')}`;
    asPostgres(path.join(bin, 'pg_ctl'), ['-D', data, '-o', opts, '-l', path.join(dir, 'pg.log'), '-w', '-t', '30', 'start']);
    started = true;
    asPostgres(path.join(bin, 'psql'), ['-h', '127.0.0.1', '-p', String(port), '-U', 'postgres', '-q', '-c', 'create database quasilevel']);
    return { url: `postgres://postgres@127.0.0.1:${port}/quasilevel`, port, dir, stop };
  } catch (err) {
    stop();
    throw err;
  }
}

if (require.main === module && process.argv.includes('--ensure')) {
  // `--ensure`: installs the server binaries when missing (root), then says whether a cluster can start here.
  ensurePostgres();
  const ok = clusterAvailable();
  console.log(ok ? `[pg-cluster] PostgreSQL server binaries in ${postgresBin()}` : '[pg-cluster] no PostgreSQL cluster can be started here (server binaries or the postgres user missing)');
  process.exit(ok ? 0 : 1);
} else if (require.main === module) {
  const sep = process.argv.indexOf('--');
  const command = sep >= 0 ? process.argv.slice(sep + 1) : [];
  if (!command.length) {
    console.error('usage: npx tsx scripts/pg-cluster.ts -- <command…>   (runs it with DATABASE_URL set to a throwaway cluster)');
    process.exit(2);
  }
  void startCluster().then(
    (cluster) => {
      console.log(`[pg-cluster] ${cluster.url} (folder ${cluster.dir})`);
      const child = spawn(command[0], command.slice(1), { stdio: 'inherit', env: { ...process.env, DATABASE_URL: cluster.url } });
      const end = (code: number) => {
        cluster.stop();
        process.exit(code);
      };
      for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => child.kill(sig));
      child.on('exit', (code, signal) => end(code ?? (signal ? 1 : 0)));
      child.on('error', () => end(1));
    },
    (err: Error) => {
      console.error(`[pg-cluster] ${err.message}`);
      process.exit(1);
    },
  );
}
