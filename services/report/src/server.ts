import fs from 'node:fs';
import path from 'node:path';
import fastifyRateLimit from '@fastify/rate-limit';
import fastifySwagger from '@fastify/swagger';
import fastifySwaggerUi from '@fastify/swagger-ui';
import Fastify, { LogController, type FastifyBaseLogger, type FastifyError, type FastifyInstance } from 'fastify';
import { hasZodFastifySchemaValidationErrors, jsonSchemaTransform, serializerCompiler, validatorCompiler } from 'fastify-type-provider-zod';
import type { ServiceDeps } from '@stemwise/core';
import { TokenVerifier } from './access';
import { AuditWriter } from './audit';
import { auditTokenUse, type AuthFailureLimit, type RouteContext } from './routes/auth';
import { batchRoutes } from './routes/batches';
import { changeRoutes } from './routes/change';
import { fitRoutes } from './routes/fits';
import { healthRoutes } from './routes/health';
import { nationalRoutes } from './routes/national';
import { pageRoutes } from './routes/pages';
import { regionRoutes } from './routes/regions';
import { SummaryCache } from './summary-cache';

export interface ReportServerOptions {
  /** How long a token check is remembered (ms); a revocation takes effect within it. Default 1000. */
  tokenCacheMs?: number;
  /** How often the latest summary versions are re-read (ms). Default 1000. */
  summaryCheckMs?: number;
  /** How often buffered audit entries are written (ms). Default 250. */
  auditFlushMs?: number;
}

const json = (code: string, message: string) => JSON.stringify({ error: code, message });

class TooManyRequests extends Error {
  readonly statusCode = 429;
}

/**
 * The report service's HTTP server (fastify, zod schemas, OpenAPI at /openapi.json, docs at /docs).
 * Not listening yet: tests call `inject`; `startReportServer` listens.
 */
export async function buildServer(deps: ServiceDeps, options: ReportServerOptions = {}): Promise<FastifyInstance> {
  const { config } = deps;
  const app = Fastify({
    loggerInstance: deps.log.child({ service: 'report-http' }) as unknown as FastifyBaseLogger,
    logController: new LogController({ disableRequestLogging: true }), // page URLs may carry a token; errors are logged below
    bodyLimit: 1024 * 1024,
    trustProxy: config.trustProxy as boolean | string[], // a hop count is accepted too (fastify's types omit it)
    // A client that sends nothing, or too slowly, loses its connection (settings STEMWISE_*_TIMEOUT_SECONDS).
    requestTimeout: config.requestTimeoutMs,
    connectionTimeout: config.idleTimeoutMs,
    keepAliveTimeout: config.keepAliveMs,
    http: {
      requestTimeout: config.requestTimeoutMs,
      headersTimeout: Math.min(config.headersTimeoutMs, config.requestTimeoutMs),
      // how often node checks the two above (its default, 30 s, would let a short timeout run long)
      connectionsCheckingInterval: Math.max(100, Math.min(30_000, Math.min(config.headersTimeoutMs, config.requestTimeoutMs) / 4)),
    },
  }) as unknown as FastifyInstance;
  app.setValidatorCompiler(validatorCompiler);
  app.setSerializerCompiler(serializerCompiler);

  // Per client address (X-Forwarded-For only from a trusted proxy): every route but the health routes.
  await app.register(fastifyRateLimit, {
    global: true,
    max: config.rateLimitPerMinute,
    timeWindow: 60_000,
    errorResponseBuilder: (_request, limit) => new TooManyRequests(`more than ${limit.max} requests a minute from this address; try again in ${limit.after}`),
  });
  const authLimit = app.createRateLimit({ max: config.authFailuresPerMinute, timeWindow: 60_000, keyGenerator: (request) => `auth-failure:${request.ip}` });
  const authFailures: AuthFailureLimit = {
    async blockedFor(request) {
      const r = await authLimit(request, { increment: false });
      return !r.isAllowed && r.remaining <= 0 ? Math.max(1, r.ttlInSeconds) : 0;
    },
    async count(request) {
      await authLimit(request);
    },
  };

  const ctx: RouteContext = {
    deps,
    verifier: new TokenVerifier(deps.db, options.tokenCacheMs ?? 1000, config.tokenCacheSize).start(),
    audit: new AuditWriter(deps.db, deps.log, options.auditFlushMs ?? 250),
    cache: new SummaryCache(deps.db, options.summaryCheckMs ?? 1000).start(),
    authFailures,
  };
  app.addHook('onClose', async () => {
    ctx.verifier.stop();
    ctx.cache.stop();
    await ctx.audit.close();
  });

  await app.register(fastifySwagger, {
    openapi: {
      openapi: '3.0.3',
      info: {
        title: 'stemwise report API',
        version: '1',
        description:
          'Regional summaries of the forest inventory (stratified estimates with their uncertainty), plots, fits and batches. ' +
          'Every /v1 route needs `Authorization: Bearer <token>` (tokens: `stemwise token create`). Readers see only the regions named on their token.',
      },
      components: { securitySchemes: { bearer: { type: 'http', scheme: 'bearer', description: 'a token from `stemwise token create`' } } },
      tags: [
        { name: 'regions', description: 'summaries and plots per region' },
        { name: 'fits', description: 'diversity–disturbance fits' },
        { name: 'batches', description: 'uploads' },
        { name: 'health', description: 'liveness, readiness, metrics (no token)' },
      ],
    },
    transform: jsonSchemaTransform,
  });
  await app.register(fastifySwaggerUi, { routePrefix: '/docs' });
  app.get('/openapi.json', { schema: { hide: true } }, async () => app.swagger());

  app.setErrorHandler((err: FastifyError, request, reply) => {
    if (hasZodFastifySchemaValidationErrors(err)) {
      const issue = err.validation[0];
      const where = issue?.instancePath ? `${err.validationContext ?? 'request'}${issue.instancePath.replace(/\//g, '.')}` : (err.validationContext ?? 'request');
      return reply.code(400).type('application/json; charset=utf-8').send(json('bad_request', `${where}: ${issue?.message ?? err.message}`));
    }
    const status = (err as { statusCode?: number }).statusCode;
    if (status && status >= 400 && status < 500) {
      const code = status === 429 ? 'too_many_requests' : status === 413 ? 'too_large' : 'bad_request';
      return reply.code(status).type('application/json; charset=utf-8').send(json(code, err.message));
    }
    request.log.error({ err, route: request.routeOptions.url }, 'request failed');
    return reply.code(500).type('application/json; charset=utf-8').send(json('internal', 'the server failed to answer; the reason is in its log'));
  });
  app.setNotFoundHandler((request, reply) => reply.code(404).type('application/json; charset=utf-8').send(json('not_found', `no route ${request.method} ${request.url.split('?')[0]}`)));

  auditTokenUse(app, ctx);
  healthRoutes(app, ctx);
  regionRoutes(app, ctx);
  nationalRoutes(app, ctx);
  changeRoutes(app, ctx);
  fitRoutes(app, ctx);
  batchRoutes(app, ctx);
  pageRoutes(app, ctx);
  return app;
}

/**
 * Spool folders left by a process that was killed mid-upload: none can belong to a live upload once it
 * is older than the request timeout (several report processes may share the storage folder).
 */
async function removeStaleSpools(deps: ServiceDeps): Promise<void> {
  const incoming = path.join(deps.config.storageDir, '.incoming');
  const names = await fs.promises.readdir(incoming).catch(() => [] as string[]);
  const before = Date.now() - deps.config.requestTimeoutMs - 60_000;
  for (const name of names) {
    const p = path.join(incoming, name);
    const st = await fs.promises.stat(p).catch(() => null);
    if (st && st.mtimeMs < before) await fs.promises.rm(p, { recursive: true, force: true });
  }
}

/** Builds the server and listens on STEMWISE_HOST:STEMWISE_PORT; `close()` stops it (and flushes the audit log). */
export async function startReportServer(deps: ServiceDeps, options: ReportServerOptions & { port?: number; host?: string } = {}): Promise<{ app: FastifyInstance; url: string; close(): Promise<void> }> {
  const app = await buildServer(deps, options);
  await removeStaleSpools(deps);
  const host = options.host ?? deps.config.host;
  const port = options.port ?? deps.config.port;
  await app.listen({ host, port });
  const address = app.server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  const url = `http://${host.includes(':') ? `[${host}]` : host}:${actualPort}`;
  deps.log.info({ url }, 'report service listening');
  return { app, url, close: () => app.close() };
}
