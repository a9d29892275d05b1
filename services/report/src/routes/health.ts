import type { FastifyInstance } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { countBatchesByState, lastFinishedRecompute, schema } from '@stemwise/db';
import { oneLine, QUEUE_NAMES } from '@stemwise/platform';
import type { RouteContext } from './auth';

const CHECK_TIMEOUT_MS = 2000;

class CheckTimeout extends Error {}

function withTimeout<T>(p: Promise<T>, what: string): Promise<T> {
  return Promise.race([p, new Promise<never>((_, reject) => setTimeout(() => reject(new CheckTimeout(`${what}: no answer within ${CHECK_TIMEOUT_MS} ms`)), CHECK_TIMEOUT_MS).unref())]);
}

const Ready = z.object({
  status: z.enum(['ready', 'not_ready']),
  checks: z.record(z.string(), z.object({ ok: z.boolean(), error: z.enum(['unreachable', 'no answer in time']).optional().describe('a short status; the reason is in the log') })),
});

/** Probes and scrapers call these often from a few addresses: they are not counted by the rate limit. */
const NOT_LIMITED = { rateLimit: false } as const;

/** Labels in the Prometheus text format: backslash, double quote and newline escaped. */
export const promLabel = (v: string): string => v.replace(/\\/g, '\\\\').replace(/"/g, '\\"').replace(/\n/g, '\\n');

/**
 * /healthz (the process answers), /readyz (PostgreSQL and, when configured, Redis answer) and /metrics
 * (Prometheus text). These three need no token: load balancers and scrapers call them, and they carry
 * no region data (keep the port off the public internet or filter /metrics at the proxy if needed).
 */
export function healthRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  r.get('/healthz', { config: NOT_LIMITED, schema: { summary: 'The process is alive', tags: ['health'], response: { 200: z.object({ status: z.literal('ok') }) } } }, async () => ({ status: 'ok' as const }));

  r.get(
    '/readyz',
    { config: NOT_LIMITED, schema: { summary: 'PostgreSQL and Redis (when configured) answer', tags: ['health'], response: { 200: Ready, 503: Ready } } },
    async (_request, reply) => {
      const checks: z.infer<typeof Ready>['checks'] = {};
      const probe = async (name: string, fn: () => Promise<unknown>) => {
        try {
          await withTimeout(fn(), name);
          checks[name] = { ok: true };
        } catch (err) {
          // The reason goes to the log only: this route needs no token, and driver messages name hosts, users and databases.
          ctx.deps.log.warn({ check: name, reason: oneLine(err) }, 'readiness check failed');
          checks[name] = { ok: false, error: err instanceof CheckTimeout ? 'no answer in time' : 'unreachable' };
        }
      };
      await Promise.all([
        probe('database', () => ctx.deps.db.query('select 1')),
        ...(ctx.deps.config.redisUrl && ctx.deps.queue.kind === 'bullmq' ? [probe('redis', () => ctx.deps.queue.counts())] : []),
      ]);
      const ok = Object.values(checks).every((c) => c.ok);
      return reply.code(ok ? 200 : 503).send({ status: ok ? 'ready' : 'not_ready', checks });
    },
  );

  r.get('/metrics', { config: NOT_LIMITED, schema: { summary: 'Queue depth, job counts, batches by state, last recompute (Prometheus text format)', tags: ['health'], produces: ['text/plain'] } }, async (_request, reply) => {
    const [counts, batches, last] = await Promise.all([ctx.deps.queue.counts(), countBatchesByState(ctx.deps.db), lastFinishedRecompute(ctx.deps.db)]);
    const lines: string[] = [];
    const metric = (name: string, type: string, help: string) => lines.push(`# HELP ${name} ${help}`, `# TYPE ${name} ${type}`);
    metric('stemwise_queue_depth', 'gauge', 'Jobs waiting or delayed per queue.');
    for (const q of QUEUE_NAMES) lines.push(`stemwise_queue_depth{queue="${q}"} ${counts[q].waiting + counts[q].delayed}`);
    metric('stemwise_queue_jobs', 'gauge', 'Jobs per queue and state.');
    for (const q of QUEUE_NAMES) for (const [state, n] of Object.entries(counts[q])) lines.push(`stemwise_queue_jobs{queue="${q}",state="${promLabel(state)}"} ${n}`);
    metric('stemwise_batches', 'gauge', 'Batches by state.');
    for (const state of schema.BATCH_STATES) lines.push(`stemwise_batches{state="${state}"} ${batches[state] ?? 0}`);
    metric('stemwise_last_recompute_finished_seconds', 'gauge', 'Unix time the last recompute run finished (0: none yet).');
    lines.push(`stemwise_last_recompute_finished_seconds ${last ? last.finishedAt.getTime() / 1000 : 0}`);
    metric('stemwise_last_recompute_failed', 'gauge', '1 when the last finished recompute run failed.');
    lines.push(`stemwise_last_recompute_failed ${last?.state === 'failed' ? 1 : 0}`);
    return reply.type('text/plain; version=0.0.4; charset=utf-8').send(lines.join('\n') + '\n');
  });
}
