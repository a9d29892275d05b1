import type { ServiceDeps, StartedService } from '@stemwise/core';
import { loadServices, processorsOf, SERVICE_NAMES, type ServiceName } from '../processors';
import { defineCommand, usageError, type Parsed } from '../command';
import type { Runtime } from '../runtime';

const CHOICES = ['ingest', 'compute', 'report', 'all'] as const;

const options = {} as const;

export const command = defineCommand({
  usage: `usage: stemwise serve [ingest|compute|report|all]

Runs until SIGTERM or SIGINT (then lets running jobs finish for STEMWISE_STOP_GRACE_SECONDS).
  ingest    a worker that validates and loads uploaded batches
  compute   a worker that computes plot figures and curve fits, plans recomputes, runs the nightly one
  report    the report service (API, pages, uploads) at STEMWISE_HOST:STEMWISE_PORT, and its summary jobs
  all       all three in one process (the default)
Logs are JSON lines on stderr (STEMWISE_LOG_FORMAT=text for lines to read).
`,
  options,
  positionals: true,
  logs: 'json',
  run: serve,
});

/** After a stop, how long closing connections may take before the process ends anyway. */
const EXIT_DEADLINE_MS = 5000;

async function serve({ positionals }: Parsed<typeof options>, rt: Runtime): Promise<number> {
  const which = (positionals[0] ?? 'all') as (typeof CHOICES)[number];
  if (!CHOICES.includes(which) || positionals.length > 1) throw usageError('serve', `takes one of ${CHOICES.join(', ')}, not '${positionals.join(' ')}'`);
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
  const { processors, ...work } = processorsOf(deps, descriptors);
  const { queues } = work;
  await queue.work(processors, work);

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
