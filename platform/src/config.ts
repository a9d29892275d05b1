import path from 'node:path';
import { z } from 'zod';
import { ConfigError } from './errors';
import type { LogFormat } from './logger';

// The only module that reads process.env. Every setting, its default and its meaning; the README's
// configuration table is written from this list.
const intIn = (min: number, max: number) => z.coerce.number().int().min(min).max(max);
const num = () => z.coerce.number().refine(Number.isFinite, 'must be a number');

const envSchema = z.object({
  DATABASE_URL: z
    .string()
    .regex(/^postgres(ql)?:\/\//, 'must be a postgres:// or postgresql:// URL')
    .optional(),
  REDIS_URL: z
    .string()
    .regex(/^rediss?:\/\//, 'must be a redis:// or rediss:// URL')
    .optional(),
  STEMWISE_DATA_DIR: z.string().min(1).default('.stemwise'),
  STEMWISE_STORAGE_DIR: z.string().min(1).optional(),
  STEMWISE_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  STEMWISE_LOG_FORMAT: z.enum(['json', 'text']).optional(),
  STEMWISE_QUEUE_PREFIX: z.string().regex(/^[A-Za-z0-9_.-]+$/, 'letters, digits, _ . - only').default('stemwise'),
  STEMWISE_FOREST_TYPES: z
    .string()
    .regex(/^[A-Za-z0-9_.-]+:(dry|moist|wet)(,[A-Za-z0-9_.-]+:(dry|moist|wet))*$/, 'a list like wet:wet,moist:moist,dry:dry (code:climate)')
    .default('wet:wet,moist:moist,dry:dry'),
  STEMWISE_ROOT_SHOOT: z
    .string()
    .regex(/^[A-Za-z0-9_.-]+:[a-z0-9_]+(,[A-Za-z0-9_.-]+:[a-z0-9_]+)*$/, 'a list like moist:mokany_2006,dry:tropical_dry (forest_type:relation)')
    .optional(),
  STEMWISE_STANDING_DEAD_SHARE: num().pipe(z.number().gt(0).max(1)).default(0.7),
  STEMWISE_COMPUTE_CONCURRENCY: intIn(1, 64).default(2),
  STEMWISE_COMPUTE_THREADS: intIn(0, 64).default(0),
  STEMWISE_INGEST_CONCURRENCY: intIn(1, 16).default(1),
  STEMWISE_CHUNK_PLOTS: intIn(1, 100_000).default(500),
  STEMWISE_JOB_ATTEMPTS: intIn(1, 50).default(5),
  STEMWISE_NIGHTLY_CRON: z.string().min(9).default('0 2 * * *'),
  STEMWISE_TIMEZONE: z.string().min(1).default('UTC'),
  STEMWISE_RECONCILE_MINUTES: intIn(1, 1440).default(5),
  STEMWISE_STOP_GRACE_SECONDS: intIn(0, 3600).default(30),
  STEMWISE_JOB_LOCK_SECONDS: intIn(2, 3600).default(30),
  STEMWISE_HOST: z.string().min(1).default('127.0.0.1'),
  STEMWISE_PORT: intIn(0, 65535).default(8080),
  STEMWISE_TRUST_PROXY: z
    .string()
    .regex(/^(false|true|\d{1,2}|(loopback|linklocal|uniquelocal|[0-9A-Fa-f.:/]+)(,(loopback|linklocal|uniquelocal|[0-9A-Fa-f.:/]+))*)$/, 'false, true, a hop count, or a comma-separated list of addresses/CIDR ranges')
    .default('false'),
  STEMWISE_REQUEST_TIMEOUT_SECONDS: intIn(1, 86_400).default(1800),
  STEMWISE_IDLE_TIMEOUT_SECONDS: intIn(1, 3600).default(60),
  STEMWISE_HEADERS_TIMEOUT_SECONDS: intIn(1, 600).default(20),
  STEMWISE_KEEP_ALIVE_SECONDS: intIn(1, 600).default(5),
  STEMWISE_MAX_UPLOAD_MB: intIn(1, 1_048_576).default(2048),
  STEMWISE_MAX_UNPACKED_MB: intIn(1, 1_048_576).default(20_480),
  STEMWISE_MAX_CONCURRENT_UPLOADS: intIn(1, 1000).default(4),
  STEMWISE_RATE_LIMIT_PER_MINUTE: intIn(1, 1_000_000).default(600),
  STEMWISE_AUTH_FAILURES_PER_MINUTE: intIn(1, 100_000).default(20),
  STEMWISE_TOKEN_CACHE_SIZE: intIn(1, 10_000_000).default(10_000),
  STEMWISE_DEFAULT_WOOD_DENSITY: num().pipe(z.number().min(0.1).max(1.5)).default(0.58),
  STEMWISE_MIN_HEIGHTS: intIn(3, 100_000).default(30),
  STEMWISE_REPORTING_DBH_MIN_CM: num().pipe(z.number().gt(0).max(200)).default(10),
  STEMWISE_STUMP_DBH_INTERCEPT_CM: num().pipe(z.number().min(-50).max(50)).default(0),
  STEMWISE_STUMP_DBH_SLOPE: num().pipe(z.number().gt(0).max(2)).default(0.8),
  STEMWISE_HEIGHT_MODEL_TOLERANCE: num().pipe(z.number().min(0).max(1)).default(0.005),
  STEMWISE_SAMPLING_ERROR_T: z.enum(['t', '1.96', '2']).default('t'),
  STEMWISE_CAUTION_MIN_PLOTS: intIn(1, 1_000_000).default(20),
  STEMWISE_CAUTION_MAX_SAMPLING_ERROR_PCT: num().pipe(z.number().gt(0).max(1000)).default(20),
  STEMWISE_FIT_METRIC: z.string().min(1).default('fisher_alpha'),
  STEMWISE_FIT_AXIS: z.string().min(1).default('disturbance_index'),
  STEMWISE_BOOTSTRAP: intIn(0, 100_000).default(1000),
  STEMWISE_SEED: intIn(0, 2 ** 31 - 1).default(20261201),
});

export type Climate = 'dry' | 'moist' | 'wet';

/**
 * Root-to-shoot relations a forest type may use (docs/methods.md#below-ground-biomass); the science
 * (core/src/science/root-shoot.ts) defines each one and its test holds the two lists equal.
 */
export const ROOT_SHOOT_RELATION_NAMES = ['tropical_rainforest', 'tropical_moist_deciduous', 'tropical_dry', 'tropical_mountain', 'mokany_2006'] as const;
export type RootShootRelationName = (typeof ROOT_SHOOT_RELATION_NAMES)[number];

export interface Config {
  databaseUrl: string | undefined;
  redisUrl: string | undefined;
  dataDir: string;
  storageDir: string;
  logLevel: string;
  /** Unset: `serve` writes JSON lines, the other commands text lines (see SETTINGS). */
  logFormat: LogFormat | undefined;
  queuePrefix: string;
  forestTypes: ReadonlyArray<{ code: string; climate: Climate }>;
  /** Root-to-shoot relation chosen per forest type (STEMWISE_ROOT_SHOOT); a type not listed uses its climate's default. */
  rootShoot: ReadonlyArray<{ forestType: string; relation: RootShootRelationName }>;
  /** Share of the live-tree allometric biomass a standing dead stem keeps (common practice default 0.7). */
  standingDeadShare: number;
  computeConcurrency: number;
  /** Worker threads that compute plot metrics (0: in the job's own thread). */
  computeThreads: number;
  ingestConcurrency: number;
  chunkPlots: number;
  jobAttempts: number;
  nightlyCron: string;
  timezone: string;
  reconcileMinutes: number;
  /** Seconds a stopping worker lets its running jobs finish before handing them back to the queue. */
  stopGraceSeconds: number;
  jobLockSeconds: number;
  host: string;
  port: number;
  /** Which proxies' X-Forwarded-* headers are believed: false, true (any), a hop count, or addresses/CIDR ranges. */
  trustProxy: boolean | number | string[];
  /** Longest time to receive a whole request, body included (ms). */
  requestTimeoutMs: number;
  /** A connection that sends or receives nothing this long is closed (ms). */
  idleTimeoutMs: number;
  /** Longest time to receive a request's headers (ms). */
  headersTimeoutMs: number;
  /** An idle kept-alive connection is closed after this (ms). */
  keepAliveMs: number;
  /** Largest upload over HTTP, all files together (bytes). */
  maxUploadBytes: number;
  /** Largest decompressed size of one gzip upload file (bytes). */
  maxUnpackedBytes: number;
  maxConcurrentUploads: number;
  /** Requests per minute per client address (health routes are not counted). */
  rateLimitPerMinute: number;
  /** Failed authentications per minute per client address before further attempts get 429. */
  authFailuresPerMinute: number;
  /** Token checks the report service remembers (least recently used dropped first). */
  tokenCacheSize: number;
  defaultWoodDensity: number;
  minHeights: number;
  /** Diameter (cm) from which the `reporting_*` figures and the stand tables count stems. */
  reportingDbhMinCm: number;
  /** DBH = intercept + slope · stump diameter (cm): the stump-to-DBH relation of logged stumps. */
  stumpToDbh: { interceptCm: number; slope: number };
  /** A refitted height–diameter model replaces the stored one only when it moves some stem's biomass by more than this share (docs/methods.md#height-model-releases). */
  heightModelTolerance: number;
  samplingErrorT: 't' | '1.96' | '2';
  /** Estimates from fewer plots are flagged `few_plots` (caution_flag). */
  cautionMinPlots: number;
  /** Estimates with a larger sampling error (percent) are flagged `wide_error` (caution_flag). */
  cautionMaxSamplingErrorPct: number;
  fitMetric: string;
  fitAxis: string;
  bootstrap: number;
  seed: number;
}

/** Settings with their defaults and meaning, for the README and `--help`. */
export const SETTINGS: ReadonlyArray<{ name: string; default: string; meaning: string }> = [
  { name: 'DATABASE_URL', default: '(unset: embedded PGlite)', meaning: 'PostgreSQL server, e.g. postgres://user@host:5432/stemwise' },
  { name: 'REDIS_URL', default: '(unset: jobs run in-process)', meaning: 'Redis for BullMQ queues, e.g. redis://127.0.0.1:6379' },
  { name: 'STEMWISE_DATA_DIR', default: '.stemwise', meaning: 'folder of the embedded database and, by default, stored uploads' },
  { name: 'STEMWISE_STORAGE_DIR', default: '<data dir>/uploads', meaning: 'where uploaded files are kept; must be shared by all ingest workers' },
  { name: 'STEMWISE_LOG_LEVEL', default: 'info', meaning: 'pino log level; logs go to stderr (in text format only warnings and errors unless it is debug or trace)' },
  { name: 'STEMWISE_LOG_FORMAT', default: '(unset: json for serve, text for other commands)', meaning: 'json: one JSON object per line; text: a line for a person (`stemwise: warning: …`)' },
  { name: 'STEMWISE_QUEUE_PREFIX', default: 'stemwise', meaning: 'Redis key prefix of the queues' },
  { name: 'STEMWISE_FOREST_TYPES', default: 'wet:wet,moist:moist,dry:dry', meaning: 'known forest type codes and the climate class of their no-height biomass model' },
  { name: 'STEMWISE_ROOT_SHOOT', default: '(unset: by climate, wet:tropical_rainforest, moist:tropical_moist_deciduous, dry:tropical_dry)', meaning: `root-to-shoot relation of each forest type, forest_type:relation pairs (relations: ${ROOT_SHOOT_RELATION_NAMES.join(', ')}; docs/methods.md#below-ground-biomass); run stemwise recompute --all after changing it` },
  { name: 'STEMWISE_STANDING_DEAD_SHARE', default: '0.7', meaning: 'share of the live-tree allometric biomass a standing dead stem keeps (common practice, no single source; docs/methods.md#standing-dead-wood); run stemwise recompute --all after changing it' },
  { name: 'STEMWISE_COMPUTE_CONCURRENCY', default: '2', meaning: 'jobs a compute worker runs at once' },
  { name: 'STEMWISE_COMPUTE_THREADS', default: '0', meaning: 'worker threads that compute plot metrics, shared by the jobs of a process (0: in the job itself; with PostgreSQL on the same 2-core machine threads were slower)' },
  { name: 'STEMWISE_INGEST_CONCURRENCY', default: '1', meaning: 'batches an ingest worker loads at once' },
  { name: 'STEMWISE_CHUNK_PLOTS', default: '500', meaning: 'plot visits per metrics job' },
  { name: 'STEMWISE_JOB_ATTEMPTS', default: '5', meaning: 'tries of a job before it is failed (exponential backoff)' },
  { name: 'STEMWISE_NIGHTLY_CRON', default: '0 2 * * *', meaning: 'when the nightly recompute runs (cron)' },
  { name: 'STEMWISE_TIMEZONE', default: 'UTC', meaning: 'time zone of the nightly schedule' },
  { name: 'STEMWISE_RECONCILE_MINUTES', default: '5', meaning: 'how often workers look for due work no queued job covers' },
  { name: 'STEMWISE_JOB_LOCK_SECONDS', default: '30', meaning: 'how soon a job of a worker that died is taken back by another worker' },
  { name: 'STEMWISE_STOP_GRACE_SECONDS', default: '30', meaning: 'on SIGTERM, how long a worker lets running jobs finish before handing them back to the queue' },
  { name: 'STEMWISE_HOST', default: '127.0.0.1', meaning: 'address the report service listens on' },
  { name: 'STEMWISE_PORT', default: '8080', meaning: 'port of the report service' },
  { name: 'STEMWISE_TRUST_PROXY', default: 'false', meaning: "whose X-Forwarded-For/-Proto the report service believes: false (none), true (any: only when the proxy is the sole way in), a hop count, or addresses/CIDR ranges like 10.0.0.1,10.1.0.0/16; with it the session cookie gets Secure behind a TLS proxy" },
  { name: 'STEMWISE_REQUEST_TIMEOUT_SECONDS', default: '1800', meaning: 'longest time the report service waits for a whole request, upload included' },
  { name: 'STEMWISE_IDLE_TIMEOUT_SECONDS', default: '60', meaning: 'a connection that sends nothing for this long is closed' },
  { name: 'STEMWISE_HEADERS_TIMEOUT_SECONDS', default: '20', meaning: "longest time to receive a request's headers" },
  { name: 'STEMWISE_KEEP_ALIVE_SECONDS', default: '5', meaning: 'an idle kept-alive connection is closed after this' },
  { name: 'STEMWISE_MAX_UPLOAD_MB', default: '2048', meaning: 'largest upload over HTTP (all files together, MiB); a larger Content-Length is refused (413) before the body is read' },
  { name: 'STEMWISE_MAX_UNPACKED_MB', default: '20480', meaning: 'largest decompressed size of one .gz upload file (MiB); a larger one rejects the batch (rule structure_unpacked_too_large)' },
  { name: 'STEMWISE_MAX_CONCURRENT_UPLOADS', default: '4', meaning: 'uploads the report service receives at once; more get 503 with Retry-After' },
  { name: 'STEMWISE_RATE_LIMIT_PER_MINUTE', default: '600', meaning: 'requests per minute per client address to the API and pages (429 beyond; health routes not counted)' },
  { name: 'STEMWISE_AUTH_FAILURES_PER_MINUTE', default: '20', meaning: 'failed token checks per minute per client address; beyond it every attempt gets 429 until the minute is over' },
  { name: 'STEMWISE_TOKEN_CACHE_SIZE', default: '10000', meaning: 'token checks the report service remembers (least recently used dropped first)' },
  { name: 'STEMWISE_DEFAULT_WOOD_DENSITY', default: '0.58', meaning: 'regional default wood density (g/cm³) when nothing better is known' },
  { name: 'STEMWISE_MIN_HEIGHTS', default: '30', meaning: 'measured heights a forest type needs before a height–diameter model is fitted' },
  { name: 'STEMWISE_REPORTING_DBH_MIN_CM', default: '10', meaning: 'reporting threshold (cm): the headline and regional stems/ha, basal area, biomass and carbon, and the stand tables, count live stems from this diameter up, so plots with other diameter minima or without a subplot compare; plots that did not measure down to it are left out of those figures (docs/methods.md#reporting-threshold); changing it needs a full recompute (`stemwise recompute --all`)' },
  { name: 'STEMWISE_STUMP_DBH_INTERCEPT_CM', default: '0', meaning: 'a of DBH = a + b · stump diameter (cm), the conversion of logged stumps before their basal area counts as removed (docs/methods.md#stump-diameter-to-dbh)' },
  { name: 'STEMWISE_STUMP_DBH_SLOPE', default: '0.8', meaning: 'b of DBH = a + b · stump diameter; the default is common practice, not a published value: set a relation fitted to local paired measurements' },
  { name: 'STEMWISE_HEIGHT_MODEL_TOLERANCE', default: '0.005', meaning: "a refitted height–diameter model replaces the stored one (and its forest type is recomputed) only when it moves some stem's biomass by more than this share; `recompute --all` always takes the refit" },
  { name: 'STEMWISE_SAMPLING_ERROR_T', default: 't', meaning: 'multiplier of the sampling error %: Student t, 1.96 or 2' },
  { name: 'STEMWISE_CAUTION_MIN_PLOTS', default: '20', meaning: 'estimates from fewer plots are marked on the pages and flagged `few_plots` in `caution_flag` (common practice, no single source)' },
  { name: 'STEMWISE_CAUTION_MAX_SAMPLING_ERROR_PCT', default: '20', meaning: 'estimates with a larger sampling error (%) are marked on the pages and flagged `wide_error` in `caution_flag` (common practice, no single source)' },
  { name: 'STEMWISE_FIT_METRIC', default: 'fisher_alpha', meaning: 'diversity column of the nightly curve fits' },
  { name: 'STEMWISE_FIT_AXIS', default: 'disturbance_index', meaning: 'disturbance column of the nightly curve fits' },
  { name: 'STEMWISE_BOOTSTRAP', default: '1000', meaning: 'bootstrap resamples for the vertex interval' },
  { name: 'STEMWISE_SEED', default: '20261201', meaning: 'seed of the bootstrap, so reruns give the same intervals' },
];

function parseTrustProxy(v: string): boolean | number | string[] {
  if (v === 'false') return false;
  if (v === 'true') return true;
  if (/^\d+$/.test(v)) return Number(v);
  return v.split(',');
}

function parseRootShoot(v: string | undefined, forestTypes: ReadonlyArray<{ code: string }>): Config['rootShoot'] {
  if (v === undefined) return [];
  const known = new Set(forestTypes.map((t) => t.code));
  const seen = new Set<string>();
  return v.split(',').map((pair) => {
    const [forestType, relation] = pair.split(':');
    if (!known.has(forestType)) throw new ConfigError('STEMWISE_ROOT_SHOOT', `${forestType} is not a forest type of STEMWISE_FOREST_TYPES (${[...known].join(', ')})`);
    if (seen.has(forestType)) throw new ConfigError('STEMWISE_ROOT_SHOOT', `${forestType} is listed twice`);
    seen.add(forestType);
    if (!(ROOT_SHOOT_RELATION_NAMES as readonly string[]).includes(relation)) {
      throw new ConfigError('STEMWISE_ROOT_SHOOT', `${relation} is not a root-to-shoot relation (known: ${ROOT_SHOOT_RELATION_NAMES.join(', ')})`);
    }
    return { forestType, relation: relation as RootShootRelationName };
  });
}

/** Parses the environment once into a typed configuration; a bad value throws a ConfigError naming it. */
export function loadConfig(env: Readonly<Record<string, string | undefined>> = process.env): Config {
  const cleaned: Record<string, string> = {};
  for (const key of Object.keys(envSchema.shape)) {
    const value = env[key];
    if (value !== undefined && value.trim() !== '') cleaned[key] = value.trim();
  }
  const parsed = envSchema.safeParse(cleaned);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new ConfigError(String(issue.path[0] ?? 'environment'), issue.message);
  }
  const e = parsed.data;
  const forestTypes = e.STEMWISE_FOREST_TYPES.split(',').map((pair) => {
    const [code, climate] = pair.split(':');
    return { code, climate: climate as Climate };
  });
  const dataDir = path.resolve(e.STEMWISE_DATA_DIR);
  return {
    databaseUrl: e.DATABASE_URL,
    redisUrl: e.REDIS_URL,
    dataDir,
    storageDir: path.resolve(e.STEMWISE_STORAGE_DIR ?? path.join(dataDir, 'uploads')),
    logLevel: e.STEMWISE_LOG_LEVEL,
    logFormat: e.STEMWISE_LOG_FORMAT,
    queuePrefix: e.STEMWISE_QUEUE_PREFIX,
    forestTypes,
    rootShoot: parseRootShoot(e.STEMWISE_ROOT_SHOOT, forestTypes),
    standingDeadShare: e.STEMWISE_STANDING_DEAD_SHARE,
    computeConcurrency: e.STEMWISE_COMPUTE_CONCURRENCY,
    computeThreads: e.STEMWISE_COMPUTE_THREADS,
    ingestConcurrency: e.STEMWISE_INGEST_CONCURRENCY,
    chunkPlots: e.STEMWISE_CHUNK_PLOTS,
    jobAttempts: e.STEMWISE_JOB_ATTEMPTS,
    nightlyCron: e.STEMWISE_NIGHTLY_CRON,
    timezone: e.STEMWISE_TIMEZONE,
    reconcileMinutes: e.STEMWISE_RECONCILE_MINUTES,
    stopGraceSeconds: e.STEMWISE_STOP_GRACE_SECONDS,
    jobLockSeconds: e.STEMWISE_JOB_LOCK_SECONDS,
    host: e.STEMWISE_HOST,
    port: e.STEMWISE_PORT,
    trustProxy: parseTrustProxy(e.STEMWISE_TRUST_PROXY),
    requestTimeoutMs: e.STEMWISE_REQUEST_TIMEOUT_SECONDS * 1000,
    idleTimeoutMs: e.STEMWISE_IDLE_TIMEOUT_SECONDS * 1000,
    headersTimeoutMs: e.STEMWISE_HEADERS_TIMEOUT_SECONDS * 1000,
    keepAliveMs: e.STEMWISE_KEEP_ALIVE_SECONDS * 1000,
    maxUploadBytes: e.STEMWISE_MAX_UPLOAD_MB * 1024 ** 2,
    maxUnpackedBytes: e.STEMWISE_MAX_UNPACKED_MB * 1024 ** 2,
    maxConcurrentUploads: e.STEMWISE_MAX_CONCURRENT_UPLOADS,
    rateLimitPerMinute: e.STEMWISE_RATE_LIMIT_PER_MINUTE,
    authFailuresPerMinute: e.STEMWISE_AUTH_FAILURES_PER_MINUTE,
    tokenCacheSize: e.STEMWISE_TOKEN_CACHE_SIZE,
    defaultWoodDensity: e.STEMWISE_DEFAULT_WOOD_DENSITY,
    minHeights: e.STEMWISE_MIN_HEIGHTS,
    reportingDbhMinCm: e.STEMWISE_REPORTING_DBH_MIN_CM,
    stumpToDbh: { interceptCm: e.STEMWISE_STUMP_DBH_INTERCEPT_CM, slope: e.STEMWISE_STUMP_DBH_SLOPE },
    heightModelTolerance: e.STEMWISE_HEIGHT_MODEL_TOLERANCE,
    samplingErrorT: e.STEMWISE_SAMPLING_ERROR_T,
    cautionMinPlots: e.STEMWISE_CAUTION_MIN_PLOTS,
    cautionMaxSamplingErrorPct: e.STEMWISE_CAUTION_MAX_SAMPLING_ERROR_PCT,
    fitMetric: e.STEMWISE_FIT_METRIC,
    fitAxis: e.STEMWISE_FIT_AXIS,
    bootstrap: e.STEMWISE_BOOTSTRAP,
    seed: e.STEMWISE_SEED,
  };
}
