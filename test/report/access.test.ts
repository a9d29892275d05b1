import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listAuditEntries, markStale } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer, createProcessors } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { jobContext, seedBatch, seedRun } from './fixture';
import { budget, seedChangePairs } from './change-fixture';
import { NORTHVALE, SOUTHMERE, seedScenario } from './seed-scenario';
import { createToken, revokedToken, type TestToken } from './tokens';

// Every role against every endpoint (table-driven). "ok" means the request passes the access check and
// gets the endpoint's own answer: 200, or for the batch routes 501 while the ingest service does not
// provide them over HTTP (202/200, or 400 for the empty upload body, once it does).

type Who = 'none' | 'admin' | 'uploader' | 'otherUploader' | 'readerN' | 'readerS' | 'revoked' | 'garbage';
const WHO: Who[] = ['none', 'admin', 'uploader', 'otherUploader', 'readerN', 'readerS', 'revoked', 'garbage'];

let s: TestServices;
let app: FastifyInstance;
let tokens: Record<Exclude<Who, 'none' | 'garbage'>, TestToken>;
let batchId: string;

function headers(who: Who): Record<string, string> {
  if (who === 'none') return {};
  if (who === 'garbage') return { authorization: 'Bearer swt_not-a-token' };
  return { authorization: `Bearer ${tokens[who].token}` };
}

type Expect = 'ok' | 401 | 403 | 404;
interface Case {
  method: 'GET' | 'POST';
  /** `{batch}` stands for the fixture batch's id. */
  url: string;
  expect: Partial<Record<Who, Expect>>;
  /** Statuses that count as "ok" (default 200). */
  ok?: number[];
}
const BATCH_OK = [200, 202, 415]; // 415: the POST of the matrix sends no files

const DENIED_TOKENS = { none: 401, revoked: 401, garbage: 401 } as const;
const PUBLIC = Object.fromEntries(WHO.map((w) => [w, 'ok'])) as Record<Who, Expect>;
const REGION_N = { ...DENIED_TOKENS, admin: 'ok', uploader: 403, otherUploader: 403, readerN: 'ok', readerS: 403 } as const;
const ANY_REGION_READER = { ...DENIED_TOKENS, admin: 'ok', uploader: 403, otherUploader: 403, readerN: 'ok', readerS: 'ok' } as const;
const ADMIN_ONLY = { ...DENIED_TOKENS, admin: 'ok', uploader: 403, otherUploader: 403, readerN: 403, readerS: 403 } as const;
const BATCH_OWNER = { ...DENIED_TOKENS, admin: 'ok', uploader: 'ok', otherUploader: 403, readerN: 403, readerS: 403 } as const;
const SUBMIT = { ...DENIED_TOKENS, admin: 'ok', uploader: 'ok', otherUploader: 'ok', readerN: 403, readerS: 403 } as const;

const CASES: Case[] = [
  { method: 'GET', url: '/healthz', expect: PUBLIC },
  { method: 'GET', url: '/readyz', expect: PUBLIC },
  { method: 'GET', url: '/metrics', expect: PUBLIC },
  { method: 'GET', url: '/openapi.json', expect: PUBLIC },
  { method: 'GET', url: '/v1/regions', expect: ANY_REGION_READER },
  { method: 'GET', url: '/v1/regions/Northvale/summary', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/summary?format=csv', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/summary?version=1', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/versions', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/plots', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/summary/changes', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/summary/changes?version=1', expect: REGION_N },
  { method: 'GET', url: '/v1/national/summary', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/national/summary?format=csv', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/national/summary?version=1', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/national/versions', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/regions/Northvale/change', expect: REGION_N },
  { method: 'GET', url: '/v1/regions/Northvale/change?version=1', expect: REGION_N },
  { method: 'GET', url: '/v1/national/change', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/national/change?version=1', expect: ADMIN_ONLY },
  { method: 'GET', url: '/v1/fits', expect: ANY_REGION_READER },
  { method: 'GET', url: '/v1/fits?scope=Northvale', expect: REGION_N },
  { method: 'POST', url: '/v1/batches', expect: SUBMIT, ok: BATCH_OK },
  { method: 'GET', url: '/v1/batches/{batch}', expect: BATCH_OWNER, ok: BATCH_OK },
  { method: 'GET', url: '/v1/batches/{batch}/errors.csv', expect: BATCH_OWNER, ok: BATCH_OK },
  { method: 'GET', url: '/', expect: ANY_REGION_READER },
  { method: 'GET', url: '/regions/Northvale', expect: REGION_N },
  { method: 'GET', url: '/regions/Northvale?colour=fisher_alpha&sort=agb_mg_ha&dir=desc', expect: REGION_N },
  { method: 'GET', url: '/regions/Northvale/plots/NV-W1', expect: REGION_N },
  // a plot of Southmere asked for under Northvale: the region's reader gets 404 (no such plot in its region), never the plot
  { method: 'GET', url: '/regions/Northvale/plots/SM-1', expect: { ...REGION_N, admin: 404, readerN: 404 } },
  { method: 'GET', url: '/regions/Southmere/plots/SM-1', expect: { ...DENIED_TOKENS, admin: 'ok', uploader: 403, otherUploader: 403, readerN: 403, readerS: 'ok' } },
  { method: 'GET', url: '/national', expect: ADMIN_ONLY },
];

describe('access by role', () => {
  beforeAll(async () => {
    // Every role meets every route from one address here: the failed-sign-in limit is tested in hardening.test.ts.
    s = await useServices({ STEMWISE_AUTH_FAILURES_PER_MINUTE: '100000' });
    const deps: ServiceDeps = { config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) };
    await seedScenario(s.db);
    // Every summarised plot measured twice, so that each region and the nation have estimates of change.
    await seedChangePairs(s.db, [...NORTHVALE, ...SOUTHMERE].map((p, i) => ({ plotKey: p.key, dateFrom: '2021-03-01', years: 4.5, values: { ...budget(3 + i / 10, 0.5, 1, p.region === 'Southmere' ? 0.25 : 0), mortality_annual: 0.01 + i / 1000 } })));
    await markStale(s.db, 'summary', ['Northvale', 'Southmere']);
    await createProcessors(deps)['report.summaries']!({ runId: await seedRun(s.db) }, jobContext(testLogger()));
    tokens = {
      admin: await createToken(s.db, 'admin'),
      uploader: await createToken(s.db, 'uploader'),
      otherUploader: await createToken(s.db, 'uploader'),
      readerN: await createToken(s.db, 'reader', ['Northvale']),
      readerS: await createToken(s.db, 'reader', ['Southmere']),
      revoked: await revokedToken(s.db),
    };
    batchId = await seedBatch(s.db, tokens.uploader.id, 'loaded');
    app = await buildServer(deps, { auditFlushMs: 50 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });

  const rows = CASES.flatMap((c) => WHO.map((who) => ({ c, who, want: c.expect[who] ?? 403 })));
  it.each(rows.map((r) => [`${r.c.method} ${r.c.url} as ${r.who} → ${r.want}`, r] as const))('%s', async (_name, r) => {
    const res = await app.inject({ method: r.c.method, url: r.c.url.replace('{batch}', batchId), headers: headers(r.who) });
    if (r.want === 'ok') expect(r.c.ok ?? [200], `${res.statusCode} ${res.body.slice(0, 200)}`).toContain(res.statusCode);
    else expect(res.statusCode, res.body.slice(0, 200)).toBe(r.want);
    if (res.statusCode === 401) expect(res.headers['www-authenticate'] ?? res.headers['content-type']).toBeTruthy();
  });

  it('shows a reader exactly its regions: lists, index page and fits never name another', async () => {
    const h = headers('readerN');
    const list = (await app.inject({ url: '/v1/regions', headers: h })).json() as { regions: Array<{ region: string }> };
    expect(list.regions.map((r) => r.region)).toEqual(['Northvale']);
    const index = await app.inject({ url: '/', headers: h });
    expect(index.statusCode).toBe(200);
    expect(index.body).toContain('Northvale');
    expect(index.body).not.toContain('Southmere');
    expect(index.body).not.toContain('Ostmark');
    const fits = (await app.inject({ url: '/v1/fits', headers: h })).json() as { fits: Array<{ scope: string }> };
    expect(new Set(fits.fits.map((f) => f.scope))).toEqual(new Set(['all', 'Northvale']));
    const other = await app.inject({ url: '/v1/regions/Southmere/summary', headers: h });
    expect(other.statusCode).toBe(403);
    expect(other.body).not.toContain('Southmere estimate');
    // an admin sees all three, including the one without a summary yet
    const all = (await app.inject({ url: '/v1/regions', headers: headers('admin') })).json() as { regions: Array<{ region: string; latest_version: number | null }> };
    expect(all.regions.map((r) => [r.region, r.latest_version])).toEqual([
      ['Northvale', 1],
      ['Ostmark', null],
      ['Southmere', 1],
    ]);
  });

  it('never shows a reader the national figures (they mix regions it may not read); an admin sees them', async () => {
    for (const who of ['readerN', 'readerS'] as const) {
      const list = (await app.inject({ url: '/v1/regions', headers: headers(who) })).json() as Record<string, unknown>;
      expect(list).not.toHaveProperty('national');
      const index = await app.inject({ url: '/', headers: headers(who) });
      expect(index.body).not.toContain('id="national"');
      expect(index.body).not.toContain('/national');
      const page = await app.inject({ url: '/national', headers: headers(who) });
      expect(page.statusCode).toBe(403);
      expect(page.body).not.toMatch(/All regions/);
    }
    const list = (await app.inject({ url: '/v1/regions', headers: headers('admin') })).json() as { national: { latest_version: number; links: { page: string } } };
    expect(list.national).toMatchObject({ latest_version: 1, links: { page: '/national' } });
    const index = await app.inject({ url: '/', headers: headers('admin') });
    expect(index.body).toContain('id="national"');
    expect(index.body).toContain('href="/national"');
  });

  // Every region route, read by each reader with its own region in the URL: what it gets (status as in the
  // table above) never names the other region, never carries national rows or links, and the change
  // routes and page give its own region's estimates of change.
  const READERS = [
    { who: 'readerN', own: 'Northvale', other: 'Southmere' },
    { who: 'readerS', own: 'Southmere', other: 'Northvale' },
  ] as const;
  // readerS reads the table's URLs with the two regions (and their plots) swapped, so each keeps readerN's expectation.
  const SWAP: Record<string, string> = { Northvale: 'Southmere', Southmere: 'Northvale', 'NV-W1': 'SM-1', 'SM-1': 'NV-W1' };
  const swap = (url: string) => url.replace(/Northvale|Southmere|NV-W1|SM-1/g, (m) => SWAP[m]);
  const scoped = READERS.flatMap((reader) =>
    CASES.filter((c) => c.method === 'GET' && !c.url.includes('{batch}')).map((c) => ({ reader, c, url: reader.who === 'readerN' ? c.url : swap(c.url), want: c.expect.readerN ?? 403 })),
  );
  it.each(scoped.map((r) => [`${r.url} as ${r.reader.who}: ${r.reader.own} only, no national rows`, r] as const))('%s', async (_name, r) => {
    const res = await app.inject({ url: r.url, headers: headers(r.reader.who) });
    if (r.want === 'ok') expect(r.c.ok ?? [200]).toContain(res.statusCode);
    else expect(res.statusCode).toBe(r.want);
    // The API document describes every route (national ones too) and holds no data.
    const body = r.url === '/openapi.json' ? '' : res.body;
    if (res.statusCode === 200) expect(body).not.toContain(r.reader.other); // a refusal may repeat the name asked for
    expect(body).not.toMatch(/"region":\s*"national"/);
    expect(body).not.toMatch(/^national,/m);
    expect(body).not.toContain('href="/national"');
    expect(body).not.toContain('/v1/national/change');
    if (res.statusCode === 200 && /\/change(\?|$)/.test(r.url)) {
      const view = res.json() as { region: string; estimates: Array<{ region: string; variable: string }>; coverage: { n_plots_with_pair: number } };
      expect(view.region).toBe(r.reader.own);
      expect(view.estimates.length).toBeGreaterThan(0);
      expect(new Set(view.estimates.map((e) => e.region))).toEqual(new Set([r.reader.own]));
      expect(view.coverage.n_plots_with_pair).toBe(5);
    }
    if (res.statusCode === 200 && r.url === `/regions/${r.reader.own}`) {
      expect(body).toContain('id="change-chart"');
      expect(body).toContain('id="change-estimates"');
    }
  });

  it('shows admins the national estimates of change: API and page', async () => {
    const view = (await app.inject({ url: '/v1/national/change', headers: headers('admin') })).json() as { region: string; estimates: Array<{ region: string; forest_type: string; variable: string; n_plots: number }>; coverage: { n_plots_with_pair: number; n_plots: number } };
    expect(view.region).toBe('national');
    expect(new Set(view.estimates.map((e) => e.region))).toEqual(new Set(['national']));
    expect(view.coverage).toMatchObject({ n_plots_with_pair: 10, n_plots: 12 }); // Ostmark's two plots were measured once
    expect(view.estimates.find((e) => e.forest_type === 'all' && e.variable === 'carbon_net_change_mg_ha_yr')?.n_plots).toBe(10);
    const page = await app.inject({ url: '/national', headers: headers('admin') });
    expect(page.body).toContain('id="change-chart"');
    expect(page.body).toContain('id="change-estimates"');
    const csv = (await app.inject({ url: '/v1/national/summary?format=csv', headers: headers('admin') })).body;
    expect(csv).toMatch(/^national,all,agb_removed_mg_ha_yr,10,/m);
  });

  it('answers 404 to an admin and 403 to a reader for a region that does not exist', async () => {
    expect((await app.inject({ url: '/v1/regions/Atlantis/summary', headers: headers('admin') })).statusCode).toBe(404);
    expect((await app.inject({ url: '/v1/regions/Atlantis/summary', headers: headers('readerN') })).statusCode).toBe(403);
    expect((await app.inject({ url: '/v1/regions/Ostmark/summary', headers: headers('admin') })).statusCode).toBe(404); // no snapshot yet
  });

  it('turns ?token= on a page into an HttpOnly cookie, accepted for reading only', async () => {
    const first = await app.inject({ url: `/regions/Northvale?token=${tokens.readerN.token}` });
    expect(first.statusCode).toBe(303);
    expect(first.headers.location).toBe('/regions/Northvale');
    const cookie = String(first.headers['set-cookie']);
    expect(cookie).toMatch(/^stemwise_token=swt_/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    const jar = cookie.split(';')[0];
    const page = await app.inject({ url: '/regions/Northvale', headers: { cookie: jar } });
    expect(page.statusCode).toBe(200);
    expect(page.headers['content-security-policy']).toContain("default-src 'none'");
    expect((await app.inject({ url: '/v1/regions/Northvale/summary?format=csv', headers: { cookie: jar } })).statusCode).toBe(200);
    expect((await app.inject({ url: '/regions/Southmere', headers: { cookie: jar } })).statusCode).toBe(403);
    const admin = await app.inject({ url: `/?token=${tokens.admin.token}` });
    const adminJar = String(admin.headers['set-cookie']).split(';')[0];
    expect((await app.inject({ method: 'POST', url: '/v1/batches', headers: { cookie: adminJar } })).statusCode).toBe(401);
    expect((await app.inject({ url: '/regions/Northvale?token=swt_wrong' })).statusCode).toBe(401);
  });

  it('records every token use in the audit log with the token id as actor', async () => {
    const h = headers('readerS');
    await app.inject({ url: '/v1/regions/Southmere/summary', headers: h });
    await app.inject({ url: '/v1/regions/Northvale/summary', headers: h });
    await app.inject({ url: '/v1/regions', headers: headers('revoked') }); // a refused use of its own to find below
    // Entries are written by the server's audit writer every 50 ms (auditFlushMs above): wait for them
    // (up to 10 s, as a loaded machine may delay a flush) rather than for a fixed time.
    const expected = ['GET /v1/regions/:region/summary Southmere 200', 'GET /v1/regions/:region/summary Northvale 403'];
    let targets: string[] = [];
    let refused: unknown[] = [];
    for (const deadline = Date.now() + 10_000; Date.now() < deadline; await new Promise((r) => setTimeout(r, 50))) {
      const entries = await listAuditEntries(s.db, { actor: tokens.readerS.id, action: 'token.use' });
      targets = entries.map((e) => `${e.target} ${(e.details.params as { region?: string })?.region} ${e.details.status}`);
      refused = await listAuditEntries(s.db, { actor: tokens.revoked.id, action: 'token.refused' });
      if (expected.every((t) => targets.includes(t)) && refused.length > 0) break;
    }
    expect(targets).toContain(expected[0]);
    expect(targets).toContain(expected[1]);
    expect(refused.length).toBeGreaterThan(0);
  });

  it('folds identical uses within one flush window into one audit row that counts them', async () => {
    const t = await createToken(s.db, 'reader', ['Northvale']);
    const h = { authorization: `Bearer ${t.token}` };
    for (let i = 0; i < 3; i++) expect((await app.inject({ url: '/v1/regions/Northvale/summary', headers: h })).statusCode).toBe(200);
    expect((await app.inject({ url: '/v1/regions/Southmere/summary', headers: h })).statusCode).toBe(403);
    await new Promise((r) => setTimeout(r, 600));
    const entries = await listAuditEntries(s.db, { actor: t.id, action: 'token.use' });
    const uses = entries.map((e) => `${(e.details.params as { region?: string })?.region} ${e.details.status} ${e.details.uses ?? 1}`).sort();
    // one window may split the three reads in two rows; the counts always add up
    const northvale = entries.filter((e) => (e.details.params as { region?: string })?.region === 'Northvale');
    expect(northvale.reduce((n, e) => n + Number(e.details.uses ?? 1), 0)).toBe(3);
    expect(uses).toContain('Southmere 403 1');
  });

  it('stops accepting a token within a second of its revocation', async () => {
    const t = await createToken(s.db, 'reader', ['Northvale']);
    const h = { authorization: `Bearer ${t.token}` };
    expect((await app.inject({ url: '/v1/regions', headers: h })).statusCode).toBe(200);
    await s.db.query(`update access_tokens set revoked_at = now() where id = $1`, [t.id]);
    await new Promise((r) => setTimeout(r, 1100));
    const res = await app.inject({ url: '/v1/regions', headers: h });
    expect(res.statusCode).toBe(401);
    expect(res.json()).toEqual({ error: 'unauthorized', message: 'this token was revoked' });
  });
});
