import type { ServiceDeps } from '../deps';
import type { JobSpec } from '@stemwise/platform';

/** Id of the nightly recompute's job scheduler (one per queue prefix, however many workers register it). */
export const NIGHTLY_SCHEDULE = 'nightly-recompute';

export interface WantedSchedule {
  id: string;
  cron: string;
  timezone: string;
  spec: Omit<JobSpec<'maintenance.recompute'>, 'jobId' | 'children'>;
}

/** The repeating jobs compute workers keep registered: the nightly recompute of what is stale. */
export function wantedSchedules(config: ServiceDeps['config']): WantedSchedule[] {
  return [{ id: NIGHTLY_SCHEDULE, cron: config.nightlyCron, timezone: config.timezone, spec: { name: 'maintenance.recompute', data: { all: false, trigger: 'nightly' } } }];
}

/**
 * Registers the schedules that are missing (Redis lost them, or this is the first worker) or whose
 * cron or time zone changed; returns the ids it registered. A schedule already as wanted is left
 * alone: registering it again would replace its next run, and drop tonight's run if it is waiting
 * for a free worker right now. BullMQ keeps one scheduler per id, so workers starting together
 * register it once. Does nothing without Redis (the in-process runner has no clock).
 */
export async function ensureSchedules(deps: Pick<ServiceDeps, 'config' | 'queue' | 'log'>): Promise<string[]> {
  const { config, queue, log } = deps;
  if (queue.kind !== 'bullmq') return [];
  const existing = new Map((await queue.schedules()).map((s) => [s.id, s]));
  const registered: string[] = [];
  for (const want of wantedSchedules(config)) {
    const have = existing.get(want.id);
    if (have && have.cron === want.cron && have.timezone === want.timezone && have.name === want.spec.name) continue;
    await queue.schedule(want.id, want.cron, want.timezone, want.spec);
    registered.push(want.id);
    log.info({ schedule: want.id, cron: want.cron, timezone: want.timezone, replaced: Boolean(have) }, have ? 'schedule updated' : 'schedule registered');
  }
  return registered;
}
