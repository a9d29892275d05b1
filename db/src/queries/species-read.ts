import type { Queryable } from '../connection';
import type { species, speciesVersions } from '../schema/species';

// Read-only access to the species reference list for the compute service. The newest version is the
// current one; importing a list is the ingest/species command's job.

/** A species of the reference list with its synonyms; `guild` is one its check constraint allows. */
export interface SpeciesReferenceRow extends Pick<typeof species.$inferSelect, 'name' | 'family' | 'woodDensity'> {
  guild: 'pioneer' | 'light_demander' | 'shade_tolerant';
  synonyms: string[];
}

/** Id of the current (newest) species reference version, or null when none was imported. */
export async function currentSpeciesVersion(db: Queryable): Promise<number | null> {
  const rows = await db.query<Pick<typeof speciesVersions.$inferSelect, 'id'>>(`select id from species_versions order by id desc limit 1`);
  return rows[0]?.id ?? null;
}

/** Every species of a reference version with its synonyms, in import order (stable across engines). */
export async function loadSpeciesReference(db: Queryable, versionId: number): Promise<SpeciesReferenceRow[]> {
  return db.query<SpeciesReferenceRow>(
    `select s.name, s.family, s.guild, s.wood_density "woodDensity",
            array(select y.synonym from species_synonyms y where y.species_id = s.id order by y.synonym collate "C") synonyms
       from species s
      where s.version_id = $1
      order by s.id`,
    [versionId],
  );
}
