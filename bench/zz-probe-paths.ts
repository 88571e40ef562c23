import { createRequire } from 'node:module';
import { startServerProcess } from '@/tests/support/server-process';
import { signIn, api } from '@/bench/api-client';
const autocannon = createRequire(__filename)('autocannon');
async function main() {
  const srv = await startServerProcess();
  try {
    const s = await signIn(srv.url, 'dana.lindqvist@kestrel-pv.example', 'kestrel-design-demo');
    const { batches } = await api<any>(s, 'GET', '/api/batches');
    const id = batches[0].id;
    const paths = ['/api/health', '/api/me', '/api/batches', `/api/batches/${id}`, `/api/batches/${id}/curves?page=1&pageSize=50&sort=pmp_w&dir=desc`];
    for (const p of paths) {
      for (const c of [1, 50]) {
        const r: any = await new Promise((res, rej) => autocannon({ url: srv.url + p, connections: c, duration: 4, headers: { cookie: s.cookie } }, (e: any, x: any) => e ? rej(e) : res(x)));
        console.log(p.slice(0, 50).padEnd(52), 'conn', String(c).padStart(2), 'rps', r.requests.average.toFixed(0).padStart(5), 'p50', r.latency.p50, 'p97.5', r.latency.p97_5, 'p99', r.latency.p99, 'max', r.latency.max, 'non2xx', r.non2xx);
      }
    }
  } finally { await srv.stop(); }
}
main();
