import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { type ManifestMismatch, type ManifestProblem, sortMismatches, sortProblems } from './manifest';

/**
 * Everything a check found, all at once: problems with their row and column (in file order), and
 * where the manifest and the layout disagree. Problems can be picked to jump to their row.
 */
@Component({
  selector: 'eq-manifest-problem-list',
  imports: [MatIconModule],
  templateUrl: './manifest-problem-list.html',
  styleUrl: './manifest-problem-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ManifestProblemList {
  readonly problems = input<readonly ManifestProblem[]>([]);
  readonly mismatches = input<readonly ManifestMismatch[]>([]);
  /** Problems are buttons that report which one was picked (for rows typed in the app). */
  readonly selectable = input(false);

  readonly problemSelected = output<ManifestProblem>();

  protected readonly sortedProblems = computed(() => sortProblems(this.problems()));
  protected readonly sortedMismatches = computed(() => sortMismatches(this.mismatches()));
}
