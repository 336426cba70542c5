import { type Signal, effect } from '@angular/core';
import type { MatSort } from '@angular/material/sort';
import { MatTableDataSource } from '@angular/material/table';

/**
 * A table's data source that sorts by the page's MatSort as soon as the table is rendered. Call it in a
 * field initialiser after the page's `viewChild(MatSort)`:
 * `private readonly sort = viewChild(MatSort); protected readonly dataSource = sortedDataSource<Row>(this.sort);`
 */
export function sortedDataSource<T>(sort: Signal<MatSort | undefined>): MatTableDataSource<T> {
  const dataSource = new MatTableDataSource<T>([]);
  effect(() => {
    const current = sort();
    if (current) dataSource.sort = current;
  });
  return dataSource;
}
