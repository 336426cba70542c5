import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import type { TryFailure, TryResult } from './instrument-profile';

/** What a tried file gave: counts, run facts, warnings and the first readings, or where it failed. */
@Component({
  selector: 'eq-try-file-result',
  imports: [DecimalPipe, MatIconModule, MatTableModule],
  templateUrl: './try-file-result.html',
  styleUrl: './try-file-result.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TryFileResult {
  readonly fileName = input.required<string>();
  readonly result = input<TryResult | null>(null);
  readonly failure = input<TryFailure | null>(null);
  /** The run id the profile's file-name pattern takes from the file name; undefined when there is no pattern. */
  readonly runIdFromName = input<string | null | undefined>(undefined);

  protected readonly columns = [
    'position',
    'wavelengthNm',
    'absorbance',
    'readTime',
    'temperatureC',
    'replicate',
  ];
  protected readonly extra = computed(() => Object.entries(this.result()?.metadata.extra ?? {}));
  protected readonly wavelengths = computed(() =>
    (this.result()?.metadata.wavelengthsNm ?? []).map((nm) => `${nm} nm`).join(', '),
  );
}
