// How long each stage of a recompute run took, as its processors recorded it in the run's details
// (`details.stages`, see recordRunStage): the plan (stale marks, height models, the flow queued), the
// plot metrics (from the first chunk's start to the stage's end: the chunks may run in parallel), the
// fits and the summaries. Times are wall clock on the clock of the process that ran each stage.

/** The stages in their order, with the words `stemwise recompute` prints for them. */
export const RUN_STAGES = [
  ['plan', 'plan'],
  ['metrics', 'plot metrics'],
  ['fits', 'fits'],
  ['summaries', 'summaries'],
] as const;

export type RunStage = (typeof RUN_STAGES)[number][0];

/** One stage's record: its start (epoch ms), its duration (ms) and its counts. */
export type StageTime = { start: number; ms: number } & Record<string, number>;

const seconds = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** What a stage did, in a few words (from its counts). */
function stageCounts(stage: RunStage, t: StageTime): string {
  switch (stage) {
    case 'plan':
      return `${plural(t.visits ?? 0, 'plot visit')} in ${plural(t.chunks ?? 0, 'chunk')}, ${plural(t.heightModels ?? 0, 'height model')} checked`;
    case 'metrics':
      return `${plural(t.visits ?? 0, 'plot visit')}, ${plural(t.stems ?? 0, 'stem')}, ${plural(t.chunks ?? 0, 'chunk')} (${seconds(t.chunkMs ?? 0)} of chunk work)`;
    case 'fits':
      return plural(t.forestTypes ?? 0, 'forest type');
    case 'summaries':
      return `${plural(t.regions ?? 0, 'region')}, ${plural(t.versions ?? 0, 'new version')}`;
  }
}

/**
 * The lines `stemwise recompute` prints about the stages' times: one per recorded stage, and the total
 * from the plan's start to the last recorded stage's end. Empty when no stage was recorded.
 */
export function stageTimeLines(stages: Partial<Record<RunStage, StageTime>> | undefined): string[] {
  const recorded = RUN_STAGES.filter(([key]) => stages?.[key]);
  if (!stages || !recorded.length) return [];
  const width = Math.max(...RUN_STAGES.map(([, label]) => label.length), 'total'.length);
  const lines = ['stage times (wall clock):'];
  for (const [key, label] of recorded) lines.push(`  ${label.padEnd(width)}  ${seconds(stages[key]!.ms).padStart(8)}  ${stageCounts(key, stages[key]!)}`);
  const times = recorded.map(([key]) => stages[key]!);
  const total = Math.max(...times.map((t) => t.start + t.ms)) - Math.min(...times.map((t) => t.start));
  lines.push(`  ${'total'.padEnd(width)}  ${seconds(total).padStart(8)}`);
  return lines;
}
