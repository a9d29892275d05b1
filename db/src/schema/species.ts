import { check, doublePrecision, index, integer, pgTable, text, timestamp, unique } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/** A species reference list as imported; the newest version is the current one. */
export const speciesVersions = pgTable('species_versions', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  source: text('source').notNull(),
  contentHash: text('content_hash').notNull(),
  nSpecies: integer('n_species').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});

export const species = pgTable(
  'species',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    versionId: integer('version_id')
      .notNull()
      .references(() => speciesVersions.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    genus: text('genus').notNull(),
    family: text('family').notNull(),
    guild: text('guild').notNull(),
    woodDensity: doublePrecision('wood_density'),
  },
  (t) => [
    unique('species_version_name_uq').on(t.versionId, t.name),
    check('species_guild_chk', sql`${t.guild} in ('pioneer','light_demander','shade_tolerant')`),
    check('species_wood_density_chk', sql`${t.woodDensity} is null or ${t.woodDensity} between 0.1 and 1.5`),
    check('species_name_chk', sql`char_length(${t.name}) between 3 and 200`),
  ],
);

export const speciesSynonyms = pgTable(
  'species_synonyms',
  {
    versionId: integer('version_id')
      .notNull()
      .references(() => speciesVersions.id, { onDelete: 'cascade' }),
    synonym: text('synonym').notNull(),
    speciesId: integer('species_id')
      .notNull()
      .references(() => species.id, { onDelete: 'cascade' }),
  },
  (t) => [unique('species_synonyms_uq').on(t.versionId, t.synonym), index('species_synonyms_species_idx').on(t.speciesId)],
);
