import fc from 'fast-check';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InProcessQueue } from '@stemwise/platform';
import { buildServer } from '@stemwise/report';
import { testLogger, useServices, type TestServices } from '../support/services';
import { seedBatch } from './fixture';
import { seedScenario } from './seed-scenario';
import { createToken, type TestToken } from './tokens';

// Property-based test (fast-check) of the API's path and query parameters: random text, raw bytes
// (valid UTF-8 or not) and edge values thrown at every route of a report on a seeded database (the
// invented country of Tessaly). No answer may be a 5xx and the server must keep answering. Bounded:
// a fixed seed (rerun the same cases) and a fixed number of runs, well under 20 s.

const SEED = 20261202;
const RUNS = 1000;

let s: TestServices;
let app: FastifyInstance;
let tokens: TestToken[];
let batchId: string;

/** Percent-encodes every byte that is not unreserved (RFC 3986), so any byte sequence fits in a URL. */
const pct = (bytes: Uint8Array): string => [...bytes].map((b) => (/[A-Za-z0-9_.~-]/.test(String.fromCharCode(b)) ? String.fromCharCode(b) : `%${b.toString(16).padStart(2, '0')}`)).join('');

// A value: a name the data holds (so the route gets past its region check), a value near a boundary,
// text of any code points (lone surrogates too), or raw bytes (valid UTF-8 or not).
const known = fc.constantFrom('', 'all', 'Northvale', 'Southmere', 'Ostmark', 'wet', 'fisher_alpha', 'disturbance_index', 'csv', 'json', 'warning', '1');
const edge = fc.constantFrom('0', '-1', '1.5', '1e309', 'NaN', '99999999999', '2147483648', '9'.repeat(400), '%00', 'North%00vale', '%ff%fe', '%ed%a0%80', '%', '%zz', '..%2f..', 'a'.repeat(200));
const utf8 = (t: string) => pct(Buffer.from(t, 'utf8'));
const value = fc.oneof(
  { arbitrary: known, weight: 4 },
  { arbitrary: edge, weight: 3 },
  { arbitrary: fc.string({ unit: 'binary', maxLength: 40 }).map(utf8), weight: 2 },
  { arbitrary: fc.tuple(fc.string({ maxLength: 8 }), fc.string({ maxLength: 8 })).map(([x, y]) => utf8(`${x}\u0000${y}`)), weight: 1 },
  { arbitrary: fc.uint8Array({ maxLength: 40 }).map(pct), weight: 2 },
  { arbitrary: fc.string({ maxLength: 20 }).map(encodeURIComponent), weight: 1 },
);
const number = fc.oneof(fc.integer().map(String), fc.bigInt({ min: -(10n ** 20n), max: 10n ** 20n }).map(String), fc.double().map(String), value);
const region = fc.oneof({ arbitrary: fc.constantFrom('Northvale', 'Southmere', 'Ostmark', 'all'), weight: 3 }, { arbitrary: value, weight: 2 });
// Each parameter a route knows is present or not; `x` stands for the ones no route knows.
const query = fc.record(
  { version: number, format: value, metric: value, axis: value, forest_type: value, scope: region, severity: value, token: value, x: value },
  { requiredKeys: [] },
);

type Route = (p: string, id: string) => string;
const ROUTES: Route[] = [
  (p) => `/v1/regions/${p}/summary`,
  (p) => `/v1/regions/${p}/versions`,
  (p) => `/v1/regions/${p}/plots`,
  (p) => `/v1/regions/${p}/summary/changes`,
  () => '/v1/regions',
  () => '/v1/fits',
  (p) => `/v1/batches/${p}`,
  (p, id) => `/v1/batches/${id}/errors.csv`,
  (p) => `/v1/batches/${p}/errors.csv`,
  (p) => `/regions/${p}`,
  () => '/',
  (p) => `/regions/Northvale/${p}`,
];

describe('API parameters under random input', () => {
  beforeAll(async () => {
    s = await useServices({ STEMWISE_RATE_LIMIT_PER_MINUTE: '1000000', STEMWISE_AUTH_FAILURES_PER_MINUTE: '100000' });
    await seedScenario(s.db);
    batchId = await seedBatch(s.db);
    tokens = [await createToken(s.db, 'admin'), await createToken(s.db, 'reader', ['Northvale']), await createToken(s.db, 'uploader')];
    app = await buildServer({ config: s.config, db: s.db, log: testLogger(), queue: new InProcessQueue(testLogger()) }, { summaryCheckMs: 0 });
  });
  afterAll(async () => {
    await app?.close();
    await s?.cleanup();
  });

  it(`never answers 5xx (seed ${SEED}, ${RUNS} runs)`, async () => {
    await fc.assert(
      fc.asyncProperty(fc.nat(ROUTES.length - 1), region, query, fc.nat(tokens.length), async (r, param, q, who) => {
        const qs = Object.entries(q).map(([k, v]) => `${k}=${v}`).join('&');
        const url = `${ROUTES[r](param || 'x', batchId)}${qs ? `?${qs}` : ''}`;
        const headers = who < tokens.length ? { authorization: `Bearer ${tokens[who].token}` } : {};
        const res = await app.inject({ url, headers });
        if (res.statusCode >= 500) throw new Error(`${url} → ${res.statusCode} ${res.body.slice(0, 300)}`);
      }),
      { seed: SEED, numRuns: RUNS, interruptAfterTimeLimit: 18_000, markInterruptAsFailure: false },
    );
    expect((await app.inject({ url: '/healthz' })).statusCode).toBe(200);
    expect((await app.inject({ url: '/v1/regions', headers: { authorization: `Bearer ${tokens[0].token}` } })).statusCode).toBe(200);
  });
});
