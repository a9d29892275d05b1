import {
  deleteHeightModel,
  listHeightModels,
  loadMeasuredHeights,
  markForestTypeVisitsStale,
  upsertHeightModel,
  type Db,
  type HeightModelRow,
} from '@stemwise/db';
import { fitHeightDiameter, hasEnoughHeights, heightModelBiomassShift, type HeightDiameterModel } from '../science/height-diameter';

// Height–diameter models per forest type (science/height-diameter.ts: the Chave et al. 2014 eq. 6a
// form), fitted on every measured height of a live stem of the type and stored in height_models.
//
// WHEN: at the start of a recompute run, by the planner (maintenance.recompute), for each forest type
// that has stale visits (every type with --all) — before the chunk jobs are queued, so every chunk of
// the run sees the same model. Fewer than config.minHeights measured heights: no model; the science
// then uses Chave et al. 2005 by climate.
//
// RELEASES (docs/methods.md#height-model-releases): modelled heights, and so biomass, come from one
// model across a forest type, and a few new plots should not recompute every plot of their type. The
// run of an uploaded batch fits only the types that have no model yet (it keeps the stored ones, and
// does not read their heights); the nightly, manual and full runs refit every forest type. A refit
// replaces the stored model only when it moves some stem's biomass by more than
// config.heightModelTolerance (heightModelBiomassShift), when the type had no model, when the type no
// longer has enough heights, or in a full recompute (--all: every visit is computed anyway, so the result
// equals a fresh start). Otherwise the stored model is kept ('kept'). A replacement marks every visit of
// that type stale in the same transaction.

export const HEIGHT_MODEL_FORM = 'ln H = a + b ln D + c (ln D)^2 (Chave et al. 2014 eq. 6a form)';

export interface HeightModelChange {
  forestType: string;
  /** Measured heights found. */
  heights: number;
  /**
   * fitted: a new model is stored; none: too few heights (no model); unchanged: the refit is the stored
   * model; kept: the refit differs from the stored model within the tolerance, the stored one stays.
   */
  outcome: 'fitted' | 'none' | 'unchanged' | 'kept';
  /** Visits marked stale because the model changed. */
  visitsMarked: number;
  /** Largest relative change of a stem's biomass from the stored model to the refit (null when either is missing). */
  biomassShift: number | null;
}

/** The stored form of a fitted model. */
export function heightModelRow(forestType: string, m: HeightDiameterModel): HeightModelRow {
  return {
    forestType,
    form: HEIGHT_MODEL_FORM,
    coefficients: { a: m.a, b: m.b, c: m.c, biasCorrection: m.biasCorrection },
    stats: { n: m.n, rse: m.rse, r2: m.r2, dbhMinCm: m.dbhMinCm, dbhMaxCm: m.dbhMaxCm },
  };
}

/** A stored model back as the science's HeightDiameterModel. */
export function heightModelFromRow(row: HeightModelRow): HeightDiameterModel {
  const c = row.coefficients;
  const s = row.stats as { n: number; rse: number; r2: number | null; dbhMinCm: number; dbhMaxCm: number };
  return { a: c.a, b: c.b, c: c.c, biasCorrection: c.biasCorrection, n: s.n, rse: s.rse, r2: s.r2, dbhMinCm: s.dbhMinCm, dbhMaxCm: s.dbhMaxCm };
}

// Keys sorted: a stored model comes back from jsonb with its keys in jsonb's order, not the order written.
const canonical = (o: Record<string, unknown>): string => JSON.stringify(Object.keys(o).sort().map((k) => [k, o[k]]));
const same = (a: HeightModelRow | undefined, b: HeightModelRow | null): boolean =>
  a === undefined ? b === null : b !== null && a.form === b.form && canonical(a.coefficients) === canonical(b.coefficients) && canonical(a.stats) === canonical(b.stats);

export interface RefitPolicy {
  minHeights: number;
  /** Largest biomass shift a refit may bring without replacing the stored model (config.heightModelTolerance). */
  tolerance: number;
  /** A full recompute: any refit that differs replaces the stored model. */
  release: boolean;
  /** Only the types without a stored model are fitted (a batch's run); the others are not read. */
  newOnly?: boolean;
}

/** Refits the models of the given forest types; see the note at the top of this file. */
export async function refitHeightModels(db: Db, forestTypes: readonly string[], policy: RefitPolicy): Promise<HeightModelChange[]> {
  const { minHeights } = policy;
  const changes: HeightModelChange[] = [];
  if (!forestTypes.length) return changes;
  const stored = new Map((await listHeightModels(db, forestTypes)).map((m) => [m.forestType, m]));
  const todo = policy.newOnly ? forestTypes.filter((t) => !stored.has(t)) : forestTypes;
  if (!todo.length) return changes;
  const heights = await db.transaction((tx) => loadMeasuredHeights(tx, todo));
  for (const forestType of todo) {
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
    const before = stored.get(forestType);
    if (same(before, next)) {
      changes.push({ forestType, heights: dbhCm.length, outcome: 'unchanged', visitsMarked: 0, biomassShift: before ? 0 : null });
      continue;
    }
    const biomassShift = before && next ? heightModelBiomassShift(heightModelFromRow(before), heightModelFromRow(next)) : null;
    if (biomassShift !== null && !policy.release && biomassShift <= policy.tolerance) {
      changes.push({ forestType, heights: dbhCm.length, outcome: 'kept', visitsMarked: 0, biomassShift });
      continue;
    }
    const visitsMarked = await db.transaction(async (tx) => {
      if (next) await upsertHeightModel(tx, next);
      else await deleteHeightModel(tx, forestType);
      return markForestTypeVisitsStale(tx, [forestType]);
    });
    changes.push({ forestType, heights: dbhCm.length, outcome: next ? 'fitted' : 'none', visitsMarked, biomassShift });
  }
  return changes;
}
