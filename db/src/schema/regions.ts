import { check, integer, pgTable, text } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

export const regions = pgTable(
  'regions',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    name: text('name').notNull().unique(),
  },
  (t) => [check('regions_name_chk', sql`char_length(${t.name}) between 1 and 80`)],
);
