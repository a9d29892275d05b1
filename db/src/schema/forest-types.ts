import { check, pgTable, text } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/** Strata of the inventory (configured list); `climate` picks the no-height biomass model (Chave et al. 2005). */
export const forestTypes = pgTable(
  'forest_types',
  {
    code: text('code').primaryKey(),
    climate: text('climate').notNull(),
  },
  (t) => [
    check('forest_types_code_chk', sql`${t.code} ~ '^[A-Za-z0-9_.-]{1,40}$'`),
    check('forest_types_climate_chk', sql`${t.climate} in ('dry','moist','wet')`),
  ],
);
