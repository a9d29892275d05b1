import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listAuditEntries } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { UPLOAD_PLOTS, UPLOAD_TREES_HEADER } from './fixture';
import { createToken, type TestToken } from './tokens';

// Uploads over HTTP: multipart to the ingest service's intake; the batch is stored and queued (the
// ingest worker is not running here, so it stays `received`).

const PLOTS = UPLOAD_PLOTS;
const TREES = `${UPLOAD_TREES_HEADER}TS-1,1,Arborea lucida,24.5,live\nTS-1,2,,12,live\n`;

let s: TestServices;
let app: FastifyInstance;
let queue: InProcessQueue;
let uploader: TestToken;
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-report-batches-'));
let other: TestToken;

async function upload(token: TestToken, form: FormData) {
  const req = new Request('http://localhost/v1/batches', { method: 'POST', body: form });
  return app.inject({
    method: 'POST',
    url: '/v1/batches',
    headers: { authorization: `Bearer ${token.token}`, 'content-type': req.headers.get('content-type') as string },
    payload: Buffer.from(await req.arrayBuffer()),
  });
}

function form(parts: Record<string, string | Buffer>, fields: Record<string, string> = {}): FormData {
  const f = new FormData();
  for (const [name, content] of Object.entries(parts)) f.append(name, new Blob([content]), `${name}.csv${Buffer.isBuffer(content) ? '.gz' : ''}`);
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  return f;
}

describe('batches over HTTP', () => {
  beforeAll(async () => {
    s = await useServices({ STEMWISE_DATA_DIR: dataDir });
    queue = new InProcessQueue(testLogger());
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue };
    uploader = await createToken(s.db, 'uploader');
    other = await createToken(s.db, 'uploader');
    app = await buildServer(deps);
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
    fs.rmSync(dataDir, { recursive: true, force: true });
  });

  it('stores a multipart upload as a batch of the uploading token, queues it, and audits it', async () => {
    const res = await upload(uploader, form({ plots: PLOTS, trees: zlib.gzipSync(TREES) }, { skip_invalid: 'true' }));
    expect(res.statusCode, res.body).toBe(202);
    const body = res.json();
    expect(body).toMatchObject({ state: 'received', duplicate: false, queued: true });
    const [batch] = await s.db.query<{ submitted_by: string; options: { skip_invalid: boolean }; files: Array<{ kind: string; gzip: boolean }> }>(
      `select submitted_by, options, files from batches where id = $1`,
      [body.id],
    );
    expect(batch.submitted_by).toBe(uploader.id);
    expect(batch.options.skip_invalid).toBe(true);
    expect(batch.files.map((f) => [f.kind, f.gzip])).toEqual([
      ['plots', false],
      ['trees', true],
    ]);
    expect((await queue.counts()).ingest.waiting).toBe(1);
    const audit = await listAuditEntries(s.db, { actor: uploader.id, action: 'batch.submit' });
    expect(audit.map((a) => a.target)).toEqual([body.id]);

    const again = await upload(uploader, form({ plots: PLOTS, trees: TREES })); // same content, plain this time
    expect(again.statusCode).toBe(200);
    expect(again.json()).toMatchObject({ id: body.id, duplicate: true });

    const report = await app.inject({ url: body.links.self, headers: { authorization: `Bearer ${uploader.token}` } });
    expect(report.statusCode).toBe(200);
    expect(report.json()).toMatchObject({ id: body.id, state: 'received', submittedBy: uploader.id });
    const csv = await app.inject({ url: body.links.errors_csv, headers: { authorization: `Bearer ${uploader.token}` } });
    expect(csv.statusCode).toBe(200);
    expect(csv.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect((await app.inject({ url: body.links.self, headers: { authorization: `Bearer ${other.token}` } })).statusCode).toBe(403);
  });

  it('refuses uploads without the required files, with unknown parts, or not multipart', async () => {
    await upload(uploader, form({ plots: PLOTS, trees: TREES })); // the one stored batch: the first test's content, a duplicate after it
    const missing = await upload(uploader, form({ plots: PLOTS }));
    expect(missing.statusCode).toBe(400);
    expect(missing.json().message).toMatch(/trees/);
    const unknown = await upload(uploader, form({ plots: PLOTS, trees: TREES, photos: 'x' }));
    expect(unknown.statusCode).toBe(400);
    expect(unknown.json().message).toMatch(/unexpected file part photos/);
    const badFlag = await upload(uploader, form({ plots: PLOTS, trees: TREES }, { replace: 'maybe' }));
    expect(badFlag.statusCode).toBe(400);
    const json = await app.inject({ method: 'POST', url: '/v1/batches', headers: { authorization: `Bearer ${uploader.token}`, 'content-type': 'application/json' }, payload: '{}' });
    expect(json.statusCode).toBe(415);
    const count = await s.db.query<{ n: number }>(`select count(*)::int n from batches`);
    expect(count[0].n).toBe(1); // nothing stored for the refused ones
  });
});
