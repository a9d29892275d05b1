import {
  deleteHeightModel,
  listHeightModels,
  loadMeasuredHeights,
  markForestTypeVisitsStale,
  upsertHeightModel,
  type Db,
  type HeightModelRow,
} from '@stemwise/db';
import { fitHeightDiameter, hasEnoughHeights, type HeightDiameterModel } from '../science/height-diameter';

// Height–diameter models per forest type (science/height-diameter.ts: the Chave et al. 2014 eq. 6a
// form), fitted on every measured height of a live stem of the type and stored in height_models.
//
// WHEN: at the start of a recompute run, by the planner (maintenance.recompute), for each forest type
// that has stale visits (every type with --all) — before the chunk jobs are queued, so every chunk of
// the run sees the same model. A refit whose model differs from the stored one (or a model that
// appears or disappears) marks every visit of that type stale in the same transaction: modelled
// heights, and so biomass, must come from one model across a forest type. Fewer than
// config.minHeights measured heights: no model; the science then uses Chave et al. 2005 by climate.

export const HEIGHT_MODEL_FORM = 'ln H = a + b ln D + c (ln D)^2 (Chave et al. 2014 eq. 6a form)';

export interface HeightModelChange {
  forestType: string;
  /** Measured heights found. */
  heights: number;
  /** fitted: a model is stored; none: too few heights (no model); unchanged: same model as before. */
  outcome: 'fitted' | 'none' | 'unchanged';
  /** Visits marked stale because the model changed. */
  visitsMarked: number;
}

/** The stored form of a fitted model. */
export function heightModelRow(forestType: string, m: HeightDiameterModel): HeightModelRow {
  return {
    forestType,
    form: HEIGHT_MODEL_FORM,
    coefficients: { a: m.a, b: m.b, c: m.c, biasCorrection: m.biasCorrection },
    stats: { n: m.n, rse: m.rse, r2: m.r2, dbhMinCm: m.dbhMinCm, dbhMaxCm: m.dbhMaxCm, ...(m.covariance ? { covariance: m.covariance } : {}) },
  };
}

/** A stored model back as the science's HeightDiameterModel. */
export function heightModelFromRow(row: HeightModelRow): HeightDiameterModel {
  const c = row.coefficients;
  const s = row.stats as { n: number; rse: number; r2: number | null; dbhMinCm: number; dbhMaxCm: number; covariance?: number[] };
  const m = { a: c.a, b: c.b, c: c.c, biasCorrection: c.biasCorrection, n: s.n, rse: s.rse, r2: s.r2, dbhMinCm: s.dbhMinCm, dbhMaxCm: s.dbhMaxCm };
  return s.covariance ? { ...m, covariance: s.covariance } : m;
}

// Keys sorted: a stored model comes back from jsonb with its keys in jsonb's order, not the order written.
const canonical = (o: Record<string, unknown>): string => JSON.stringify(Object.keys(o).sort().map((k) => [k, o[k]]));
// The parameter covariance is left out of the comparison: it changes no prediction (only the carbon
// uncertainty reads it), so a model stored before it was kept gets it without marking visits stale.
const predictive = (stats: Record<string, unknown>): Record<string, unknown> => {
  const { covariance: _, ...rest } = stats;
  return rest;
};
const same = (a: HeightModelRow | undefined, b: HeightModelRow | null): boolean =>
  a === undefined
    ? b === null
    : b !== null && a.form === b.form && canonical(a.coefficients) === canonical(b.coefficients) && canonical(predictive(a.stats)) === canonical(predictive(b.stats));

/** Refits the models of the given forest types; see the note at the top of this file. */
export async function refitHeightModels(db: Db, forestTypes: readonly string[], minHeights: number): Promise<HeightModelChange[]> {
  const changes: HeightModelChange[] = [];
  if (!forestTypes.length) return changes;
  const stored = new Map((await listHeightModels(db, forestTypes)).map((m) => [m.forestType, m]));
  const heights = await db.transaction((tx) => loadMeasuredHeights(tx, forestTypes));
  for (const forestType of forestTypes) {
    const { dbhCm, heightM } = heights.get(forestType)!;
    let next: HeightModelRow | null = null;
    if (hasEnoughHeights(dbhCm.length, Math.max(4, minHeights))) {
      try {
        next = heightModelRow(forestType, fitHeightDiameter(dbhCm, heightM, { minHeights: Math.max(4, minHeights) }));
      } catch (err) {
        // e.g. all diameters equal: no usable model, like too few heights
        if (!(err instanceof RangeError)) throw err;
      }
    }
    if (same(stored.get(forestType), next)) {
      if (next && (stored.get(forestType)?.stats as Record<string, unknown>).covariance === undefined && next.stats.covariance !== undefined) await upsertHeightModel(db, next);
      changes.push({ forestType, heights: dbhCm.length, outcome: 'unchanged', visitsMarked: 0 });
      continue;
    }
    const visitsMarked = await db.transaction(async (tx) => {
      if (next) await upsertHeightModel(tx, next);
      else await deleteHeightModel(tx, forestType);
      return markForestTypeVisitsStale(tx, [forestType]);
    });
    changes.push({ forestType, heights: dbhCm.length, outcome: next ? 'fitted' : 'none', visitsMarked });
  }
  return changes;
}
