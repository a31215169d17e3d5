// The pads of some readings, grouped by reading: one query for a page of readings (a page's ids
// at most, never another query's whole result), grouped in a Map rather than looped over.
import { inArray } from "drizzle-orm";
import { readingPad } from "~/db/schema";
import { db } from "~/lib/db.server";

export type Pad = typeof readingPad.$inferSelect;
/** the database, or a transaction inside it */
type Query = Pick<typeof db, "select">;

export async function padsByReading(readingIds: string[], q: Query = db): Promise<Map<string, Pad[]>> {
  const out = new Map<string, Pad[]>();
  if (readingIds.length === 0) return out;
  for (const p of await q.select().from(readingPad).where(inArray(readingPad.readingId, readingIds))) {
    const list = out.get(p.readingId);
    if (list) list.push(p);
    else out.set(p.readingId, [p]);
  }
  return out;
}

/** The pads of one reading. */
export async function padsOf(readingId: string, q: Query = db): Promise<Pad[]> {
  return (await padsByReading([readingId], q)).get(readingId) ?? [];
}
