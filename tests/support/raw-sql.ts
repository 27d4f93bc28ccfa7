import { sqliteOf, type Db } from '../../db/client';

/**
 * Raw SQL on a test's database, behind the product's back (tampering, counting), on either database. `?` marks a
 * parameter; rows come back as the driver gives them (snake_case names).
 */
export async function rawSql<T = Record<string, unknown>>(db: Db, text: string, ...params: unknown[]): Promise<T[]> {
  const client = sqliteOf(db);
  if (client) {
    const st = client.prepare(text);
    if (st.reader) return st.all(...params) as T[];
    st.run(...params);
    return [];
  }
  let i = 0;
  const pool = (db as unknown as { $client: { query(q: string, v: unknown[]): Promise<{ rows: T[] }> } }).$client;
  return (
    await pool.query(
      text.replace(/\?/g, () => `$${++i}`),
      params,
    )
  ).rows;
}

/** How many rows a table holds. */
export const rowCount = async (db: Db, table: string) => Number((await rawSql<{ n: number | string }>(db, `select count(*) as n from "${table}"`))[0]!.n);
