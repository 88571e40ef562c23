import { startServerProcess } from '@/tests/support/server-process';
import { signIn, createBatch, uploadFiles, api } from '@/bench/api-client';
import { syntheticFiles } from '@/bench/synthetic-files';
async function main() {
  const srv = await startServerProcess();
  try {
    const s = await signIn(srv.url, 'tomas.reyes@kestrel-pv.example', 'kestrel-test-demo');
    const id = await createBatch(s, { name: 'probe' });
    await uploadFiles(s, id, syntheticFiles(100));
    const { batches } = await api<any>(s, 'GET', '/api/batches');
    const paths = ['/api/health', '/api/me', '/api/batches', `/api/batches/${id}`, `/api/batches/${id}/curves?page=1&pageSize=50&sort=pmp_w&dir=desc`, `/api/batches/${batches[1].id}/curves?page=1&pageSize=50&sort=pmp_w&dir=desc`];
    for (const p of paths) {
      const ms: number[] = [];
      for (let k = 0; k < 30; k++) {
        const t = performance.now();
        const r = await fetch(srv.url + p, { headers: { cookie: s.cookie } });
        await r.arrayBuffer();
        ms.push(performance.now() - t);
      }
      ms.sort((a, b) => a - b);
      console.log(p.slice(0, 60).padEnd(62), 'median', ms[15].toFixed(1), 'ms  min', ms[0].toFixed(1));
    }
  } finally {
    await srv.stop();
  }
}
main();
