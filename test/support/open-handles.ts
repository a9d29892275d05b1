import { createHook } from 'node:async_hooks';

/**
 * Open-handle check for test files: what Node still holds open (sockets, servers, timers, child
 * processes, pipes) after a file's tests and hooks, compared with what it held when the file started.
 * Uses process.getActiveResourcesInfo() (Node >= 17), which names each resource by its kind
 * (TCPSocketWrap, TCPServerWrap, Timeout, ProcessWrap, PipeWrap, ...).
 */

export type ResourceCounts = Map<string, number>;

/** Kinds that are in-flight requests rather than held handles; a finished test file may still have one pending. */
const TRANSIENT = new Set(['FSReqCallback', 'FSReqPromise', 'FileHandleCloseReq', 'CloseReq', 'Immediate']);

export function snapshotResources(): ResourceCounts {
  const counts: ResourceCounts = new Map();
  for (const kind of process.getActiveResourcesInfo()) {
    if (TRANSIENT.has(kind)) continue;
    counts.set(kind, (counts.get(kind) ?? 0) + 1);
  }
  return counts;
}

/** Resources held now beyond the baseline, by kind (e.g. `{ kind: 'TCPSocketWrap', extra: 2 }`). */
export function leaksSince(baseline: ResourceCounts, now: ResourceCounts = snapshotResources()): Array<{ kind: string; extra: number }> {
  const leaks: Array<{ kind: string; extra: number }> = [];
  for (const [kind, n] of now) {
    const extra = n - (baseline.get(kind) ?? 0);
    if (extra > 0) leaks.push({ kind, extra });
  }
  return leaks.sort((a, b) => a.kind.localeCompare(b.kind));
}

/**
 * Leaks beyond the baseline that are still there after up to `graceMs`: sockets, servers and child
 * processes that were asked to close a moment ago get the time to do so.
 */
export async function findLeaks(baseline: ResourceCounts, graceMs = 1000): Promise<Array<{ kind: string; extra: number }>> {
  const deadline = Date.now() + graceMs;
  let leaks = leaksSince(baseline);
  while (leaks.length > 0 && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 50));
    leaks = leaksSince(baseline);
  }
  return leaks;
}

export function describeLeaks(leaks: Array<{ kind: string; extra: number }>): string {
  return (
    `this test file left resources open after its tests and afterAll hooks: ` +
    leaks.map((l) => `${l.extra} × ${l.kind}`).join(', ') +
    ` (close every pool, client, queue, worker, server, interval and child process it opened)`
  );
}

const TRACED = new Set(['Timeout', 'TCPWRAP', 'TCPSERVERWRAP', 'PROCESSWRAP', 'PIPEWRAP', 'PIPESERVERWRAP', 'UDPWRAP', 'FSEVENTWRAP', 'SIGNALWRAP']);

/**
 * With STEMWISE_LEAK_TRACE=1: records where each socket, server, timer and child process was created, so a
 * leak report can say which code opened what it names. Off by default (async hooks slow every file).
 */
export function traceCreations(): (() => string[]) | null {
  if (!process.env.STEMWISE_LEAK_TRACE) return null;
  const live = new Map<number, { type: string; stack: string; resource: { hasRef?: () => boolean; _destroyed?: boolean } }>();
  createHook({
    init(id, type, _trigger, resource) {
      if (TRACED.has(type)) live.set(id, { type, stack: new Error().stack ?? '', resource: resource as never });
    },
    destroy(id) {
      live.delete(id);
    },
  }).enable();
  return () =>
    [...live.values()]
      .filter(({ type, resource }) => type !== 'Timeout' || (!resource._destroyed && resource.hasRef?.() !== false))
      .map(({ type, stack }) => `${type} created ${stack.split('\n').slice(2).filter((l) => !l.includes('node:internal')).slice(0, 6).join('\n')}`);
}
