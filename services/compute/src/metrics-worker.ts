import { parentPort } from 'node:worker_threads';
import { SpeciesIndex, type SpeciesReference } from '@stemwise/core/science';
import { computeVisits, type ChunkTask } from './chunk-metrics';

// A worker thread of the metrics pool (metrics-pool.ts): computes the visits it is sent and posts their
// outcomes back. The species reference comes once per reference (by the pool's id for it), not with every slice.

export interface MetricsRequest {
  id: number;
  speciesId: number;
  /** The reference's rows, when this worker has not been sent them yet. */
  speciesRows?: readonly SpeciesReference[];
  task: Omit<ChunkTask, 'species'>;
}

export type MetricsReply = { id: number; outcomes: ReturnType<typeof computeVisits> } | { id: number; error: string };

/** References kept (a process rarely sees more than one; tests see one per database). */
const KEEP = 4;
const indexes = new Map<number, SpeciesIndex>();

parentPort?.on('message', (msg: MetricsRequest) => {
  let reply: MetricsReply;
  try {
    if (msg.speciesRows) {
      indexes.set(msg.speciesId, new SpeciesIndex(msg.speciesRows));
      for (const old of indexes.keys()) if (indexes.size > KEEP) indexes.delete(old);
    }
    const species = indexes.get(msg.speciesId);
    if (!species) throw new Error(`metrics worker: species reference ${msg.speciesId} was never sent`);
    reply = { id: msg.id, outcomes: computeVisits({ ...msg.task, species }) };
  } catch (err) {
    reply = { id: msg.id, error: (err as Error).stack ?? String(err) };
  }
  parentPort!.postMessage(reply);
});
