import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listAuditEntries, loadedRowCounts } from '@stemwise/db';
import { batchReport, type ServiceDeps } from '@stemwise/core';
import { processBatch } from '@stemwise/ingest';
import { createLogger, InProcessQueue, type Config } from '@stemwise/platform';
import { AuditWriter, buildServer, hashToken, startReportServer, TokenVerifier } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { UPLOAD_PLOTS, UPLOAD_TREES_HEADER } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken, type TestToken } from './tokens';

// A served report (listening on 127.0.0.1, port chosen by the system) attacked the way a careless
// client or an attacker would: cut-off and slow uploads, oversized and gzip-bomb uploads, too many
// uploads or requests at once, NUL bytes and huge numbers in parameters, unknown tokens. The invented
// country of Tessaly (regions Northvale, Southmere) is the data.

const PLOTS = UPLOAD_PLOTS;
const TREES_HEADER = UPLOAD_TREES_HEADER;

let s: TestServices;
let deps: ServiceDeps;
let admin: TestToken;
let uploader: TestToken;
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-report-hardening-'));
const incoming = () => path.join(s.config.storageDir, '.incoming');
const spools = () => (fs.existsSync(incoming()) ? fs.readdirSync(incoming()) : []);

type Served = { app: FastifyInstance; url: string; port: number; close(): Promise<void> };
const servers: Served[] = [];

/** A served report with some settings changed for the test. */
async function serve(overrides: Partial<Config> = {}): Promise<Served> {
  const srv = await startReportServer({ ...deps, config: { ...s.config, ...overrides } }, { host: '127.0.0.1', port: 0, summaryCheckMs: 0 });
  const served = { ...srv, port: Number(new URL(srv.url).port) };
  servers.push(served);
  return served;
}

async function waitFor(what: string, check: () => boolean | Promise<boolean>, ms = 8000): Promise<void> {
  const until = Date.now() + ms;
  while (!(await check())) {
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** A raw connection that collects what the server sends and notes when it closes. */
async function rawConnection(port: number) {
  const sock = net.connect(port, '127.0.0.1');
  sock.on('error', () => {});
  let received = '';
  sock.on('data', (d) => (received += d.toString('latin1')));
  const closed = new Promise<void>((resolve) => sock.on('close', () => resolve()));
  await new Promise<void>((resolve) => sock.once('connect', () => resolve()));
  return { sock, closed, received: () => received };
}

const uploadHead = (token: string, boundary: string, length: number) =>
  `POST /v1/batches HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: Bearer ${token}\r\nContent-Type: multipart/form-data; boundary=${boundary}\r\nContent-Length: ${length}\r\n\r\n`;
const partHead = (boundary: string, name: string, filename: string) =>
  `--${boundary}\r\nContent-Disposition: form-data; name="${name}"; filename="${filename}"\r\nContent-Type: application/octet-stream\r\n\r\n`;

async function upload(url: string, token: string, parts: Record<string, string | Buffer>) {
  const f = new FormData();
  for (const [name, content] of Object.entries(parts)) f.append(name, new Blob([content]), `${name}.csv${Buffer.isBuffer(content) ? '.gz' : ''}`);
  return fetch(`${url}/v1/batches`, { method: 'POST', headers: { authorization: `Bearer ${token}` }, body: f });
}

beforeAll(async () => {
  s = await useServices({ STEMWISE_DATA_DIR: dataDir });
  deps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
  await seedScenario(s.db);
  admin = await createToken(s.db, 'admin');
  uploader = await createToken(s.db, 'uploader');
});
afterAll(async () => {
  for (const srv of servers) await srv.close().catch(() => {});
  await s?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('the served report under hostile input', () => {
  it('stays up through uploads cut off in the middle of a part, and keeps no spool folder', async () => {
    const srv = await serve();
    for (let i = 0; i < 3; i++) {
      const boundary = `cut${i}`;
      const c = await rawConnection(srv.port);
      c.sock.write(uploadHead(uploader.token, boundary, 64 * 1024 ** 2));
      c.sock.write(partHead(boundary, 'trees', 'trees.csv'));
      c.sock.write(Buffer.alloc(4 * 1024 ** 2, 'a')); // the spool file has writes pending when the client goes
      await waitFor('the spool folder', () => spools().length > 0);
      c.sock.destroy();
      await c.closed;
    }
    await waitFor('the spool folders to be removed', () => spools().length === 0);
    expect((await fetch(`${srv.url}/healthz`)).status).toBe(200);
    const ok = await upload(srv.url, uploader.token, { plots: PLOTS, trees: `${TREES_HEADER}TS-1,1,Arborea lucida,24.5,live\n` });
    expect(ok.status).toBe(202);
    await waitFor('the spool folder of the upload to be removed', () => spools().length === 0);
    // moved, not copied: the batch folder holds the files and nothing else is left behind
    const { id } = (await ok.json()) as { id: string };
    expect(fs.readdirSync(path.join(s.config.storageDir, id)).sort()).toEqual(['plots.csv', 'trees.csv']);
  });

  it('refuses a 3 GB Content-Length at once, before reading the body', async () => {
    const srv = await serve();
    const c = await rawConnection(srv.port);
    const started = Date.now();
    c.sock.write(uploadHead(uploader.token, 'big', 3 * 1024 ** 3));
    await waitFor('an answer', () => c.received().includes('\r\n\r\n'), 5000);
    expect(c.received()).toMatch(/^HTTP\/1\.1 413 /);
    expect(c.received()).toMatch(/STEMWISE_MAX_UPLOAD_MB/);
    await c.closed; // the server closes the connection instead of draining 3 GB
    expect(Date.now() - started).toBeLessThan(5000);
    c.sock.destroy();
  });

  it('cuts off a client that sends its upload a byte at a time, by the request timeout', async () => {
    const srv = await serve({ requestTimeoutMs: 1000, headersTimeoutMs: 1000 });
    const c = await rawConnection(srv.port);
    const started = Date.now();
    c.sock.write(uploadHead(uploader.token, 'slow', 10_000));
    c.sock.write(partHead('slow', 'trees', 'trees.csv'));
    const drip = setInterval(() => c.sock.writable && c.sock.write('a'), 300);
    let limit: NodeJS.Timeout | undefined;
    await Promise.race([c.closed, new Promise((r) => (limit = setTimeout(r, 10_000)))]);
    clearTimeout(limit);
    clearInterval(drip);
    expect(c.sock.destroyed || c.sock.readableEnded).toBe(true);
    expect(Date.now() - started).toBeLessThan(8000);
    c.sock.destroy();
    await waitFor('the spool folder to be removed', () => spools().length === 0);
    expect((await fetch(`${srv.url}/healthz`)).status).toBe(200);
  });

  it('answers 503 with Retry-After beyond the concurrent upload limit', async () => {
    const srv = await serve({ maxConcurrentUploads: 1 });
    const c = await rawConnection(srv.port);
    c.sock.write(uploadHead(uploader.token, 'hold', 1024 ** 2));
    c.sock.write(partHead('hold', 'trees', 'trees.csv'));
    c.sock.write('plot_id,tree_id');
    await waitFor('the first upload to be received', () => spools().length > 0);
    const busy = await upload(srv.url, uploader.token, { plots: PLOTS, trees: `${TREES_HEADER}TS-1,2,Velox primus,30,live\n` });
    expect(busy.status).toBe(503);
    expect(busy.headers.get('retry-after')).toMatch(/^\d+$/);
    expect(((await busy.json()) as { message: string }).message).toMatch(/STEMWISE_MAX_CONCURRENT_UPLOADS/);
    c.sock.destroy();
    await waitFor('the first upload to end', () => spools().length === 0);
    const after = await upload(srv.url, uploader.token, { plots: PLOTS, trees: `${TREES_HEADER}TS-1,2,Velox primus,30,live\n` });
    expect(after.status).toBe(202);
  });

  it('rejects a gzip file that expands past the cap with a rule naming the file, and loads nothing', async () => {
    const cap = 1024 ** 2;
    const srv = await serve({ maxUnpackedBytes: cap });
    // 4 MiB of valid rows compress to a few KB: past a 1 MiB cap
    const rows = Array.from({ length: 150_000 }, (_, i) => `TS-1,${i + 1},Arborea lucida,24.5,live`).join('\n');
    const bomb = zlib.gzipSync(TREES_HEADER + rows + '\n', { level: 9 });
    expect(bomb.length).toBeLessThan(cap);
    const res = await upload(srv.url, uploader.token, { plots: PLOTS, trees: bomb });
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as { id: string };
    const before = await loadedRowCounts(s.db);
    await processBatch({ ...deps, config: { ...s.config, maxUnpackedBytes: cap } }, id);
    const report = (await batchReport(s.db, id, 50))!;
    expect(report.state).toBe('rejected');
    const issue = report.issues.find((i) => i.rule === 'structure_unpacked_too_large');
    expect(issue?.first[0]).toMatchObject({ file: 'trees.csv' });
    expect(issue?.first[0].message).toMatch(/^trees\.csv\.gz expands to more than 1 MiB/);
    expect(await loadedRowCounts(s.db)).toEqual(before);
  });

  it('keeps writing the audit log after a NUL byte in a path parameter', async () => {
    const srv = await serve();
    const auth = { authorization: `Bearer ${admin.token}` };
    const nul = await fetch(`${srv.url}/v1/regions/%00/versions`, { headers: auth });
    expect(nul.status).toBe(400);
    expect((await fetch(`${srv.url}/v1/regions/Northvale/versions`, { headers: auth })).status).toBe(200);
    await waitFor('both audit rows', async () => (await listAuditEntries(s.db, { actor: admin.id, action: 'token.use' })).length >= 2);
    const rows = await listAuditEntries(s.db, { actor: admin.id, action: 'token.use' });
    const regions = rows.map((r) => (r.details.params as { region: string }).region);
    expect(regions).toContain('Northvale');
    expect(regions).toContain('\uFFFD'); // the NUL, stored as the replacement character
  });

  it('answers 400 with a message, never 500, to huge versions and NUL bytes in query parameters', async () => {
    const app = await buildServer(deps, { summaryCheckMs: 0 });
    const auth = { authorization: `Bearer ${admin.token}` };
    const urls = [
      '/v1/regions/Northvale/summary?version=99999999999',
      '/regions/Northvale?version=99999999999',
      '/v1/fits?metric=%00',
      '/v1/fits?axis=fisher%00alpha',
      '/v1/fits?forest_type=wet%00',
      '/v1/fits?scope=%00',
      '/v1/regions/North%00vale/summary',
      '/regions/%00',
    ];
    for (const url of urls) {
      const res = await app.inject({ url, headers: auth });
      expect(res.statusCode, `${url}: ${res.body}`).toBe(400);
      if (url.startsWith('/v1')) expect(res.json().message).toMatch(/\S/);
    }
    await app.close();
  });
});

describe('limits, the proxy cookie and the audit of sign-ins', () => {
  it('gives the session cookie Secure when a trusted proxy says the request was https', async () => {
    const cookieOf = async (config: Partial<Config>, headers: Record<string, string>) => {
      const app = await buildServer({ ...deps, config: { ...s.config, ...config } });
      const res = await app.inject({ url: `/?token=${admin.token}`, headers });
      await app.close();
      expect(res.statusCode).toBe(303);
      return String(res.headers['set-cookie']);
    };
    const viaProxy = await cookieOf({ trustProxy: ['127.0.0.1'] }, { 'x-forwarded-proto': 'https' });
    expect(viaProxy).toMatch(/; Secure$/);
    expect(viaProxy).toMatch(/HttpOnly; SameSite=Lax; Path=\//);
    expect(await cookieOf({ trustProxy: false }, { 'x-forwarded-proto': 'https' })).not.toMatch(/Secure/); // an untrusted header is ignored
    expect(await cookieOf({ trustProxy: ['127.0.0.1'] }, {})).not.toMatch(/Secure/);
  });

  it('limits requests per client address with 429, not counting the health routes', async () => {
    const app = await buildServer({ ...deps, config: { ...s.config, rateLimitPerMinute: 5 } });
    const auth = { authorization: `Bearer ${admin.token}` };
    for (let i = 0; i < 8; i++) expect((await app.inject({ url: '/healthz' })).statusCode).toBe(200);
    const codes: number[] = [];
    for (let i = 0; i < 7; i++) codes.push((await app.inject({ url: '/v1/regions', headers: auth })).statusCode);
    expect(codes).toEqual([200, 200, 200, 200, 200, 429, 429]);
    const limited = await app.inject({ url: '/v1/regions', headers: auth });
    expect(limited.json().error).toBe('too_many_requests');
    expect(limited.headers['retry-after']).toMatch(/^\d+$/);
    const other = await app.inject({ url: '/v1/regions', headers: auth, remoteAddress: '10.9.8.7' });
    expect(other.statusCode).toBe(200); // another client has its own count
    await app.close();
  });

  it('limits failed authentications per client: after the limit even a lookup is refused', async () => {
    const app = await buildServer({ ...deps, config: { ...s.config, authFailuresPerMinute: 3 } });
    const codes: number[] = [];
    for (let i = 0; i < 6; i++) {
      const unknown = `swt_${String(i).padStart(43, 'x')}`;
      codes.push((await app.inject({ url: '/v1/regions', headers: { authorization: `Bearer ${unknown}` } })).statusCode);
    }
    expect(codes).toEqual([401, 401, 401, 429, 429, 429]);
    expect((await app.inject({ url: `/?token=swt_${'y'.repeat(43)}` })).statusCode).toBe(429); // the page sign-in shares the count
    expect((await app.inject({ url: '/v1/regions', headers: { authorization: `Bearer ${admin.token}` }, remoteAddress: '10.1.2.3' })).statusCode).toBe(200);
    await app.close();
  });

  it('records the ?token= sign-in and unknown or malformed tokens in the audit log, never the token itself', async () => {
    const app = await buildServer(deps, { auditFlushMs: 20 });
    const reader = await createToken(s.db, 'reader', ['Northvale']);
    const unknown = `swt_${'q'.repeat(43)}`;
    expect((await app.inject({ url: `/?token=${reader.token}` })).statusCode).toBe(303);
    expect((await app.inject({ url: '/v1/regions', headers: { authorization: `Bearer ${unknown}` } })).statusCode).toBe(401);
    expect((await app.inject({ url: '/v1/fits', headers: { authorization: 'Bearer not-a-token' } })).statusCode).toBe(401);
    await app.close(); // flushes the audit log
    const signin = await listAuditEntries(s.db, { actor: reader.id, action: 'token.signin' });
    expect(signin.map((e) => e.target)).toEqual(['GET /']);
    const refused = await listAuditEntries(s.db, { actor: 'unknown', action: 'token.refused' });
    const ours = refused.filter((e) => [hashToken(unknown), hashToken('not-a-token')].some((h) => h.startsWith(e.details.sha256_prefix as string)));
    expect(ours.map((e) => `${e.target} ${e.details.reason}`).sort()).toEqual(['GET /v1/fits malformed', 'GET /v1/regions unknown']);
    for (const e of refused) expect(e.details.sha256_prefix).toMatch(/^[0-9a-f]{12}$/);
    const all = JSON.stringify(await listAuditEntries(s.db, {}));
    expect(all).not.toContain(unknown);
    expect(all).not.toContain('not-a-token');
    expect(all).not.toContain(reader.token);
  });

  it('keeps the token checks in a bounded LRU: the least recently used one is dropped', async () => {
    const [a, b, c] = [admin, await createToken(s.db, 'reader', ['Northvale']), await createToken(s.db, 'uploader')];
    const v = new TokenVerifier(s.db, 60_000, 2);
    await v.verify(a.token);
    await v.verify(b.token);
    await v.verify(a.token); // a is now the most recent
    await v.verify(c.token);
    expect(v.cachedTokens()).toEqual([a.token, c.token]);
    for (let i = 0; i < 50; i++) await v.verify(`swt_${String(i).padStart(43, 'z')}`);
    expect(v.cachedTokens()).toHaveLength(2); // never grows past its bound
  });

  it('writes the other audit entries when one cannot be stored, and flushes on close', async () => {
    const writer = new AuditWriter(s.db, createLogger('silent'), 60_000);
    writer.record({ actor: null as unknown as string, action: 'poison', target: 'x', details: {} }); // audit_log.actor is NOT NULL
    writer.record({ actor: 'audit-test', action: 'nul', target: 'a\u0000b', details: { v: '\uD800 lone' } });
    writer.record({ actor: 'audit-test', action: 'plain', target: 'y', details: {} });
    await writer.close();
    const rows = await listAuditEntries(s.db, { actor: 'audit-test' });
    expect(rows.map((r) => r.action).sort()).toEqual(['nul', 'plain']);
    expect(rows.find((r) => r.action === 'nul')).toMatchObject({ target: 'a\uFFFDb', details: { v: '\uFFFD lone' } });
  });
});
