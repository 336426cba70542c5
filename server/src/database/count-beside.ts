import type { ObjectLiteral, SelectQueryBuilder } from 'typeorm';

/**
 * A page and its total in one query: the count of `counter` (the same filter, joined only to what it
 * filters on) as a scalar subquery beside every row of `page`, in the column `total`.
 */
export function withCountBeside<T extends ObjectLiteral>(
  page: SelectQueryBuilder<T>,
  counter: SelectQueryBuilder<ObjectLiteral>,
): SelectQueryBuilder<T> {
  counter.select('COUNT(*)', 'n');
  page.addSelect(`(${counter.getQuery()})`, 'total');
  return page.setParameters({ ...page.getParameters(), ...counter.getParameters() });
}

/** The total a page's rows carry; past the last page (or with no match) no row does, so it is counted. */
export async function totalBeside(
  rows: readonly { total?: unknown }[],
  counter: SelectQueryBuilder<ObjectLiteral>,
): Promise<number> {
  if (rows.length) return Number(rows[0].total);
  return Number((await counter.select('COUNT(*)', 'n').getRawOne<{ n: number | string }>())?.n ?? 0);
}
