import { Injectable, type Provider } from '@angular/core';
import {
  DateAdapter,
  MAT_DATE_FORMATS,
  MAT_DATE_LOCALE,
  MAT_NATIVE_DATE_FORMATS,
  NativeDateAdapter,
} from '@angular/material/core';
import { formatDateTime } from './date-format';

/** The date field's display format: the date part of `formatDateTime`. */
const DATE_INPUT = { dateStyle: 'medium' } as const;

/**
 * The Material datepicker's dates as the rest of the app shows them (`formatDateTime`, the browser's
 * locale); typed dates are read as ISO 8601 days ("2026-03-01", a local calendar day) or as the
 * browser's date parser reads them ("1 Mar 2026", "Mar 1, 2026").
 */
@Injectable()
export class AppDateAdapter extends NativeDateAdapter {
  override parse(value: unknown, parseFormat?: unknown): Date | null {
    if (typeof value === 'string') {
      const iso = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value.trim());
      if (iso) {
        const [year, month, day] = [Number(iso[1]), Number(iso[2]) - 1, Number(iso[3])];
        const date = new Date(year, month, day);
        return date.getMonth() === month && date.getDate() === day ? date : this.invalid();
      }
    }
    return super.parse(value, parseFormat);
  }

  override format(date: Date, displayFormat: object): string {
    if (!this.isValid(date)) throw Error('AppDateAdapter: cannot format an invalid date.');
    return displayFormat === DATE_INPUT ? formatDateTime(date, 'date') : super.format(date, displayFormat);
  }
}

/** Providers for a page with a `mat-datepicker`: one adapter and display format for the whole app. */
export function provideDateInput(): Provider[] {
  return [
    { provide: DateAdapter, useClass: AppDateAdapter },
    // The calendar's month and day names in the reader's language, as formatDateTime writes dates.
    { provide: MAT_DATE_LOCALE, useFactory: () => globalThis.navigator?.language ?? 'en' },
    {
      provide: MAT_DATE_FORMATS,
      useValue: {
        ...MAT_NATIVE_DATE_FORMATS,
        display: { ...MAT_NATIVE_DATE_FORMATS.display, dateInput: DATE_INPUT },
      },
    },
  ];
}
