import type { Database } from '@tierscope/db';
import { sql } from 'drizzle-orm';

export async function pingDatabase(db: Database): Promise<boolean> {
  try {
    await db.execute(sql`select 1`);
    return true;
  } catch {
    // An unreachable database is the answer the health check exists to give.
    return false;
  }
}
