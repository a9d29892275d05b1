import http from 'node:http';
import { fork } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { Pool } from 'undici';
import Fastify from 'fastify';

if (process.argv[2] === 'serve-http') {
  const s = http.createServer((_q, r) => { r.setHeader('content-type', 'application/json'); r.end('{"status":"ok"}'); }).listen(0, '127.0.0.1', () => process.send!((s.address() as { port: number }).port));
} else if (process.argv[2] === 'serve-fastify') {
  const app = Fastify();
  app.get('/healthz', async () => ({ status: 'ok' }));
  await app.listen({ port: 0, host: '127.0.0.1' });
  process.send!((app.server.address() as { port: number }).port);
} else {
  for (const mode of ['serve-http', 'serve-fastify']) {
    const child = fork(fileURLToPath(import.meta.url), [mode], { execArgv: ['--import', 'tsx'] });
    const port = await new Promise<number>((r) => child.once('message', (m) => r(m as number)));
    const pool = new Pool(`http://127.0.0.1:${port}`, { connections: 100 });
    const lat: number[] = [];
    const end = performance.now() + 5000;
    await Promise.all(Array.from({ length: 100 }, async () => { while (performance.now() < end) { const t = performance.now(); const res = await pool.request({ path: '/healthz', method: 'GET' }); await res.body.dump(); lat.push(performance.now() - t); } }));
    lat.sort((a, b) => a - b);
    console.log(mode, (lat.length / 5).toFixed(0), 'rps p50', lat[Math.floor(lat.length / 2)].toFixed(2), 'p99', lat[Math.floor(lat.length * 0.99)].toFixed(2));
    await pool.close(); child.kill();
  }
}
