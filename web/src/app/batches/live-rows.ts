/** Rows of a list that live events refresh; each has an id. */
export interface LiveRow {
  id: number;
}

/** What the page shows after a live refresh, and what it holds back. */
export interface LiveMerge<T extends LiveRow> {
  /** The rows on screen: the same rows in the same order, each replaced by its fresh copy. */
  rows: T[];
  /** The fresh page in its own order, held back until the person asks for it; null when nothing waits. */
  held: T[] | null;
  /** How many of the held rows are not on screen yet. */
  newCount: number;
}

/**
 * Merge a page fetched because of a live event into the rows on screen. Rows never move while the
 * person works in the table (`steady`): each is updated where it stands, and rows that are new are
 * counted and held back for a "show" button. Without new rows and outside the table, or when nothing is
 * on screen yet, the fresh page (possibly in a new order) is shown as it is.
 */
export function mergeLiveRows<T extends LiveRow>(
  shown: readonly T[],
  fresh: readonly T[],
  steady: boolean,
): LiveMerge<T> {
  const freshById = new Map(fresh.map((row) => [row.id, row]));
  const shownIds = new Set(shown.map((row) => row.id));
  const newCount = fresh.filter((row) => !shownIds.has(row.id)).length;
  // Nothing on screen to keep in place: the fresh page is simply shown.
  if (!shown.length || (!newCount && !steady)) return { rows: [...fresh], held: null, newCount: 0 };
  const inPlace = shown.map((row) => freshById.get(row.id) ?? row);
  const sameOrder = fresh.length === shown.length && fresh.every((row, i) => row.id === shown[i]!.id);
  return { rows: inPlace, held: sameOrder ? null : [...fresh], newCount };
}
