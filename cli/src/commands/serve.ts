import { parseArgs } from 'node:util';
import type { ServiceDeps, StartedService } from '@stemwise/core';
import { StemwiseError } from '@stemwise/platform';
import { loadServices, processorsOf, SERVICE_NAMES, type ServiceName } from '../processors';
import type { Runtime } from '../runtime';

export const summary = 'runs services and workers: serve [ingest|compute|report|all]';

const CHOICES = ['ingest', 'compute', 'report', 'all'] as const;

/** After a stop, how long closing connections may take before the process ends anyway. */
const EXIT_DEADLINE_MS = 5000;

export async function run(args: string[], rt: Runtime): Promise<number> {
  const { positionals } = parseArgs({ args, allowPositionals: true, options: {} });
  const which = (positionals[0] ?? 'all') as (typeof CHOICES)[number];
  if (!CHOICES.includes(which)) throw new StemwiseError('usage', `serve takes one of ${CHOICES.join(', ')}, not '${which}'`);
  const services: ServiceName[] = which === 'all' ? SERVICE_NAMES : [which];

  // Listen for the stop signal from the start: a SIGTERM while starting up stops right after.
  const stopRequested = new Promise<string>((resolve) => {
    process.once('SIGTERM', () => resolve('SIGTERM'));
    process.once('SIGINT', () => resolve('SIGINT'));
  });

  const deps: ServiceDeps = { config: rt.config, db: await rt.db(), log: rt.log, queue: await rt.queue() };
  const { config, log, queue } = deps;
  if (queue.kind === 'in-process') log.warn('REDIS_URL is not set: jobs run in this process only and are not durable (fine for one machine, not for production)');

  const descriptors = await loadServices(services);
  const { processors, queues } = processorsOf(deps, descriptors);
  await queue.work(processors, {
    queues,
    concurrency: { ingest: config.ingestConcurrency, compute: config.computeConcurrency, report: 1, maintenance: 1 },
  });

  // What each service runs beside its workers (compute: the reconciler; report: the HTTP server).
  const running: StartedService[] = [];
  for (const d of descriptors) if (d.start) running.push(await d.start(deps));
  const url = running.find((s) => s.url)?.url;
  log.info({ services, queues, queue: queue.kind, url }, 'serving');
  process.stderr.write(`stemwise: serving ${services.join(', ')} (queues: ${queues.join(', ')}; ${queue.kind})${url ? ` at ${url}` : ''}\n`);

  // Graceful stop: take no new jobs, let running ones finish for STEMWISE_STOP_GRACE_SECONDS, hand back
  // (to the queue, for another worker) those still running, close. A second signal ends the process at
  // once; BullMQ then gives its running jobs to another worker when their locks expire.
  const signal = await stopRequested;
  const started = Date.now();
  log.info({ signal, graceSeconds: config.stopGraceSeconds }, 'stopping: running jobs may finish');
  const again = () => {
    log.warn('second stop signal: exiting now');
    process.exit(1);
  };
  process.once('SIGTERM', again);
  process.once('SIGINT', again);
  const [{ handedBack }] = await Promise.all([queue.stop(config.stopGraceSeconds * 1000), ...running.map((s) => s.stop())]);
  log.info({ handedBack, ms: Date.now() - started }, 'stopped');
  process.stderr.write(`stemwise: stopped${handedBack.length ? ` (handed back ${handedBack.join(', ')})` : ''}\n`);
  // A handed-back job's processor may still hold a database connection; ending the process rolls it back.
  setTimeout(() => process.exit(0), handedBack.length ? 0 : EXIT_DEADLINE_MS).unref();
  return 0;
}
