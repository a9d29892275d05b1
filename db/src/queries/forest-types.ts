import type { Climate } from '@stemwise/platform';
import type { Queryable } from '../connection';

/** Makes the configured forest types known (adds new ones, updates climates; never drops one in use). */
export async function syncForestTypes(db: Queryable, types: ReadonlyArray<{ code: string; climate: Climate }>): Promise<void> {
  await db.query(
    `insert into forest_types (code, climate) select * from unnest($1::text[], $2::text[])
     on conflict (code) do update set climate = excluded.climate`,
    [types.map((t) => t.code), types.map((t) => t.climate)],
  );
}

export async function listForestTypes(db: Queryable): Promise<Array<{ code: string; climate: Climate }>> {
  return db.query(`select code, climate from forest_types order by code`);
}
