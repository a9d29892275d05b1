import type { ServiceDeps } from '../deps';
import type { StartedService } from '../service';
import { reconcile } from './reconcile';

/**
 * Work that PostgreSQL says is due but no queued job covers is queued again, and the nightly schedule
 * registered again if Redis lost it, at start and every few minutes. The timer lives in the process
 * (not in Redis) so that it survives Redis losing its data; every compute worker runs it, which is safe.
 */
export async function startReconciler(deps: ServiceDeps): Promise<StartedService> {
  const { config, log, queue } = deps;
  await reconcile(deps);
  const timer = setInterval(() => void reconcile(deps).catch((err) => log.error({ err }, 'reconcile failed')), config.reconcileMinutes * 60_000);
  if (queue.kind === 'bullmq') log.info({ cron: config.nightlyCron, timezone: config.timezone }, 'nightly recompute scheduled');
  return {
    stop: async () => clearInterval(timer),
  };
}
