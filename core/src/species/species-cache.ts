import { currentSpeciesVersion, loadSpeciesReference, type Queryable } from '@stemwise/db';
import { PermanentError } from '@stemwise/platform';
import { SpeciesIndex } from '../science/species-names';

export interface CurrentSpecies {
  /** null when no reference list was imported: every name is then unresolved. */
  versionId: number | null;
  index: SpeciesIndex;
}

// One index per database and reference version, built once per process (a version never changes
// after import; a new list is a new version).
const cache = new WeakMap<object, Map<number | null, Promise<SpeciesIndex>>>();

/** The current species reference as a SpeciesIndex (cached per database and version). */
export async function currentSpecies(db: Queryable): Promise<CurrentSpecies> {
  const versionId = await currentSpeciesVersion(db);
  let perDb = cache.get(db);
  if (!perDb) cache.set(db, (perDb = new Map()));
  let index = perDb.get(versionId);
  if (!index) {
    index = buildIndex(db, versionId);
    perDb.set(versionId, index);
    index.catch(() => perDb.delete(versionId));
  }
  return { versionId, index: await index };
}

async function buildIndex(db: Queryable, versionId: number | null): Promise<SpeciesIndex> {
  const rows = versionId === null ? [] : await loadSpeciesReference(db, versionId);
  try {
    return new SpeciesIndex(rows);
  } catch (err) {
    throw new PermanentError('species_reference_invalid', `species reference version ${versionId} cannot be used: ${(err as Error).message}`, { cause: err });
  }
}
