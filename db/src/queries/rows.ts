// Rows of raw SQL, typed from the schema. The queries kept in SQL for speed (unnest, COPY, window and
// lateral queries) name their result columns after the schema's fields ("plotKey", "visitId"), so a
// query's row type is a Pick of its table's $inferSelect. The two engines agree on every column type
// the queries read (int4, float8, boolean, text, jsonb, timestamptz as Date) except int8 (bigint,
// bigserial): node-postgres hands it over as text, PGlite as a number (a bigint beyond 2^53). Each row
// type converts its int8 fields in one place, with `int8Row`.

/** An int8 value as the drivers hand it over. */
export type Int8Wire = number | string | bigint;

/** Fields of T that hold numbers (or null): the ones an int8 column may fill. */
type NumberKeys<T> = { [K in keyof T]-?: T[K] extends number | null ? K : never }[keyof T];

/** A row of T as a driver returns it: its int8 fields K may come as text or bigint. */
export type Wire<T, K extends NumberKeys<T>> = Omit<T, K> & { [P in K]: null extends T[P] ? Int8Wire | null : Int8Wire };

/** One int8 value as a number (ids and counts stay far below 2^53). */
export function int8(v: Int8Wire): number {
  return typeof v === 'number' ? v : Number(v);
}

/** The converter of one row type: its int8 fields K become numbers (null stays null), the rest pass as they are. */
export function int8Row<T extends object, K extends NumberKeys<T>>(...keys: readonly K[]): (row: Wire<T, K>) => T {
  return (row) => {
    const out: Record<PropertyKey, unknown> = { ...row };
    for (const k of keys) {
      const v = out[k] as Int8Wire | null;
      out[k] = v === null ? null : int8(v);
    }
    return out as T;
  };
}
