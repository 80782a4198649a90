/**
 * Read every row of a query in pages. Prisma loads an `include` with one `IN (...)` list of parent ids;
 * pages keep that list below the database's bound-parameter limit (SQLite refuses a few thousand),
 * so a campaign with many trials never turns a read into a server error.
 */
export const PAGE_SIZE = 400;

export async function readAllPaged<T>(page: (skip: number, take: number) => Promise<T[]>, size = PAGE_SIZE): Promise<T[]> {
  const out: T[] = [];
  for (let skip = 0; ; skip += size) {
    const rows = await page(skip, size);
    out.push(...rows);
    if (rows.length < size) return out;
  }
}
