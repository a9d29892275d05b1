import type { Queryable } from '../connection';
import type { species, speciesVersions } from '../schema/species';

type SpeciesVersion = typeof speciesVersions.$inferSelect;

// The species reference list is versioned: an import makes a new version; the newest is current.

/** A species to import, with its synonyms; `guild` is one its check constraint allows. */
export interface SpeciesRow extends Pick<typeof species.$inferSelect, 'name' | 'genus' | 'family' | 'woodDensity'> {
  guild: 'pioneer' | 'light_demander' | 'shade_tolerant';
  synonyms: string[];
}

/** Stores a whole reference list as a new version; returns its id. */
export async function insertSpeciesVersion(db: Queryable, source: string, contentHash: string, rows: readonly SpeciesRow[]): Promise<number> {
  const [{ id }] = await db.query<Pick<SpeciesVersion, 'id'>>(
    `insert into species_versions (source, content_hash, n_species) values ($1, $2, $3) returning id`,
    [source, contentHash, rows.length],
  );
  if (!rows.length) return id;
  const inserted = await db.query<Pick<typeof species.$inferSelect, 'id' | 'name'>>(
    `insert into species (version_id, name, genus, family, guild, wood_density)
     select $1, * from unnest($2::text[], $3::text[], $4::text[], $5::text[], $6::float8[]) returning id, name`,
    [id, rows.map((r) => r.name), rows.map((r) => r.genus), rows.map((r) => r.family), rows.map((r) => r.guild), rows.map((r) => r.woodDensity)],
  );
  const idOf = new Map(inserted.map((r) => [r.name, r.id]));
  const synonyms: string[] = [];
  const speciesIds: number[] = [];
  for (const r of rows) {
    for (const s of r.synonyms) {
      synonyms.push(s);
      speciesIds.push(idOf.get(r.name)!);
    }
  }
  if (synonyms.length) {
    await db.query(
      `insert into species_synonyms (version_id, synonym, species_id) select $1, * from unnest($2::text[], $3::int[])`,
      [id, synonyms, speciesIds],
    );
  }
  return id;
}

/** The newest version with its content hash (an import of identical content makes no new version), or null. */
export async function latestSpeciesVersion(db: Queryable): Promise<Omit<SpeciesVersion, 'source'> | null> {
  const rows = await db.query<Omit<SpeciesVersion, 'source'>>(
    `select id, content_hash "contentHash", n_species "nSpecies", created_at "createdAt" from species_versions order by id desc limit 1`,
  );
  return rows[0] ?? null;
}
