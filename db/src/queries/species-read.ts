import type { Queryable } from '../connection';

// Read-only access to the species reference list for the compute service. The newest version is the
// current one; importing a list is the ingest/species command's job.

export interface SpeciesReferenceRow {
  name: string;
  family: string;
  guild: 'pioneer' | 'light_demander' | 'shade_tolerant';
  woodDensity: number | null;
  synonyms: string[];
}

/** Id of the current (newest) species reference version, or null when none was imported. */
export async function currentSpeciesVersion(db: Queryable): Promise<number | null> {
  const rows = await db.query<{ id: number }>(`select id from species_versions order by id desc limit 1`);
  return rows.length ? Number(rows[0].id) : null;
}

/** Every species of a reference version with its synonyms, in import order (stable across engines). */
export async function loadSpeciesReference(db: Queryable, versionId: number): Promise<SpeciesReferenceRow[]> {
  const rows = await db.query<{ name: string; family: string; guild: SpeciesReferenceRow['guild']; wood_density: number | null; synonyms: string[] | null }>(
    `select s.name, s.family, s.guild, s.wood_density,
            array(select y.synonym from species_synonyms y where y.species_id = s.id order by y.synonym collate "C") synonyms
       from species s
      where s.version_id = $1
      order by s.id`,
    [versionId],
  );
  return rows.map((r) => ({
    name: r.name,
    family: r.family,
    guild: r.guild,
    woodDensity: r.wood_density === null ? null : Number(r.wood_density),
    synonyms: r.synonyms ?? [],
  }));
}
