import { getRecomputeRun } from '@stemwise/db';
import { liveRecompute, planRecompute, stageTimeLines, type ServiceDeps, type StageTime } from '@stemwise/core';
import { StemwiseError, type JobName } from '@stemwise/platform';
import { allProcessors } from '../processors';
import { defineCommand, type Parsed } from '../command';
import { printErr, printOut } from '../output';
import type { Runtime } from '../runtime';

/** How long `--now` waits for queued work before giving up (the jobs stay queued). */
const WAIT_LIMIT_MS = 60 * 60_000;

// Without REDIS_URL the run happens here, to completion. With REDIS_URL, `recompute` queues the
// planner job (a compute worker plans and runs it); `recompute --now` plans here and waits until the
// workers have finished the run's flow, then prints what ran.
const options = { now: { type: 'boolean', default: false }, all: { type: 'boolean', default: false } } as const;

export const command = defineCommand({
  usage: `usage: stemwise recompute [--now] [--all]

Recomputes the plot figures, curve fits and region summaries that new or changed plots made stale.
Without REDIS_URL the run happens in this process, to completion.
  --now   with REDIS_URL: plan the run here and wait until the workers have finished it
          (otherwise a compute worker is asked to plan and run it, and the command returns at once)
  --all   recompute everything, not only what is stale
`,
  options,
  run: recompute,
});

async function recompute({ values }: Parsed<typeof options>, rt: Runtime): Promise<number> {
  const all = values.all === true;
  const deps: ServiceDeps = { config: rt.config, db: await rt.db(), log: rt.log, queue: await rt.queue() };

  if (deps.queue.kind === 'in-process') {
    const { processors, ...work } = await allProcessors(deps);
    await deps.queue.work(processors, work);
    const plan = await planRecompute(deps, 'manual', all);
    if (!plan) return nothingStale(deps);
    const failures = await deps.queue.drain();
    await printRun(deps, plan.runId);
    for (const f of failures) printErr(`stemwise: job ${f.jobId} failed: ${f.error}\n`);
    // A job that failed before this process started waiting is not in `failures`: the root's state tells.
    const root = await deps.queue.state(plan.rootJobId, 'report.summaries');
    if (!failures.length && root !== 'completed') {
      printErr(`stemwise: run ${plan.runId} did not complete (its last stage is ${root}); see the log above\n`);
      return 1;
    }
    return failures.length ? 1 : 0;
  }

  if (!values.now) {
    const jobId = `recompute.manual.${new Date().toISOString().replace(/\D/g, '').slice(0, 17)}`;
    await deps.queue.add({ name: 'maintenance.recompute', data: { trigger: 'manual', all }, jobId });
    printOut(`queued ${jobId} (a compute worker plans and runs it; 'stemwise recompute --now' waits for the result)\n`);
    return 0;
  }

  const plan = await planRecompute(deps, 'manual', all);
  if (!plan) return nothingStale(deps);
  printErr(`stemwise: run ${plan.runId} queued (${plan.visits} plot visits in ${plan.chunks} chunks); waiting for the workers\n`);
  const stages: Array<[string, JobName, string]> = [
    [`plots.${plan.runId}`, 'compute.plots', 'plot metrics'],
    [`fits.${plan.runId}`, 'compute.fits', 'fits'],
    [plan.rootJobId, 'report.summaries', 'summaries'],
  ];
  const started = Date.now();
  let done = 0;
  let hinted = false;
  for (;;) {
    const [jobId, name, label] = stages[done];
    const state = await deps.queue.state(jobId, name);
    if (state === 'failed') {
      await printRun(deps, plan.runId);
      throw new StemwiseError('job_failed', `${label} of run ${plan.runId} failed (job ${jobId}); see the worker log`);
    }
    if (state === 'completed') {
      printErr(`stemwise: ${label} done\n`);
      if (++done === stages.length) break;
      continue;
    }
    if (!hinted && Date.now() - started > 15_000 && done === 0) {
      printErr("stemwise: still waiting — is a compute worker running ('stemwise serve compute')?\n");
      hinted = true;
    }
    if (Date.now() - started > WAIT_LIMIT_MS) throw new StemwiseError('timeout', `run ${plan.runId} still not finished after an hour; its jobs stay queued`);
    await new Promise((r) => setTimeout(r, 250));
  }
  await printRun(deps, plan.runId);
  return 0;
}

/** No run was planned: nothing is stale, or a run is in progress and the run after it takes what is stale now. */
async function nothingStale(deps: ServiceDeps): Promise<number> {
  const running = await liveRecompute(deps);
  printOut(running ? `run ${running} is in progress; what is stale now is recomputed by the run that follows it\n` : 'nothing stale\n');
  return 0;
}

/** What a run did, from its record in PostgreSQL. */
async function printRun(deps: ServiceDeps, runId: string): Promise<void> {
  const run = await getRecomputeRun(deps.db, runId);
  if (!run) return;
  const d = run.details as {
    plan?: { visits: number; chunks: number; outdatedSpecies: number; heightModels: Array<{ forestType: string; heights: number; outcome: string; biomassShift?: number | null }> };
    metrics?: { visits: number; stems: number; chunks: number };
    fits?: Array<{ forestType: string; n: number; verdict: string; regions: number }>;
    stages?: Record<string, StageTime>;
  };
  const lines = [`run ${run.id} (${run.trigger}): ${run.state}`];
  if (d.metrics) lines.push(`plot metrics: ${d.metrics.visits} plot visits, ${d.metrics.stems} stems, ${d.metrics.chunks} chunk${d.metrics.chunks === 1 ? '' : 's'}`);
  else if (d.plan) lines.push(`plot metrics: ${d.plan.visits} plot visits planned in ${d.plan.chunks} chunks`);
  if (d.plan?.outdatedSpecies) lines.push(`species reference changed: ${d.plan.outdatedSpecies} visits recomputed`);
  for (const h of d.plan?.heightModels ?? []) {
    const shift = h.biomassShift == null ? '' : ` (moves some stem's biomass by ${(100 * h.biomassShift).toFixed(2)} %)`;
    const what =
      h.outcome === 'fitted'
        ? `refitted${shift}`
        : h.outcome === 'none'
          ? 'none (too few heights; Chave et al. 2005 without height)'
          : h.outcome === 'kept'
            ? `kept: the refit moves some stem's biomass by ${(100 * (h.biomassShift ?? 0)).toFixed(2)} %, within the tolerance`
            : 'unchanged';
    lines.push(`height model ${h.forestType}: ${what}, ${h.heights} measured heights`);
  }
  for (const f of d.fits ?? []) lines.push(`fits ${f.forestType}: ${f.verdict} (n = ${f.n}${f.regions ? `, ${f.regions} region fits` : ''})`);
  lines.push(...stageTimeLines(d.stages));
  printOut(lines.join('\n') + '\n');
}
