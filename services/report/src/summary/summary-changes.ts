import type { RegionRow } from '@stemwise/core';

// "What changed" between two versions of a region summary: plots added and removed (from the plot keys
// kept with each version) and the estimates that moved by more than their standard error
// (|new − old| > SE of the new estimate; docs/methods.md#what-changed-between-versions).

export interface MovedEstimate {
  readonly forest_type: string;
  readonly variable: string;
  readonly old_mean: number;
  readonly new_mean: number;
  /** SE of the new estimate, the yardstick of the move. */
  readonly se: number;
}

export interface SummaryChanges {
  readonly version: number;
  /** null: this is the first version. */
  readonly previous_version: number | null;
  /** null when either version was made before plot keys were kept. */
  readonly plots_added: readonly string[] | null;
  readonly plots_removed: readonly string[] | null;
  readonly moved: readonly MovedEstimate[];
}

export interface SummaryVersionSide {
  readonly version: number;
  readonly rows: readonly RegionRow[];
  readonly plotKeys: readonly string[] | null;
}

/** The changes from `previous` (null: none) to `current`. */
export function summaryChanges(current: SummaryVersionSide, previous: SummaryVersionSide | null): SummaryChanges {
  if (!previous) return { version: current.version, previous_version: null, plots_added: null, plots_removed: null, moved: [] };
  const before = new Map(previous.rows.map((r) => [`${r.forest_type}\u0000${r.variable}`, r]));
  const moved: MovedEstimate[] = [];
  for (const r of current.rows) {
    const o = before.get(`${r.forest_type}\u0000${r.variable}`);
    if (!o || o.mean === null || r.mean === null || r.se === null) continue;
    if (Math.abs(r.mean - o.mean) > r.se) moved.push({ forest_type: r.forest_type, variable: r.variable, old_mean: o.mean, new_mean: r.mean, se: r.se });
  }
  let added: string[] | null = null;
  let removed: string[] | null = null;
  if (current.plotKeys && previous.plotKeys) {
    const now = new Set(current.plotKeys);
    const then = new Set(previous.plotKeys);
    added = current.plotKeys.filter((k) => !then.has(k));
    removed = previous.plotKeys.filter((k) => !now.has(k));
  }
  return { version: current.version, previous_version: previous.version, plots_added: added, plots_removed: removed, moved };
}
