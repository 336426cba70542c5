import { ChangeDetectionStrategy, Component, Injector, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTab, MatTabContent, MatTabGroup } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import type { Exclusion } from '@equilight/analysis';
import {
  auditTime,
  catchError,
  debounceTime,
  distinctUntilChanged,
  EMPTY,
  filter,
  from,
  merge,
  of,
  Subject,
  switchMap,
} from 'rxjs';
import type { PlateFormat } from '../batches/batch';
import { BatchStateLabel } from '../shared/batch-state/batch-state-label';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { type LiveEvent, LiveEventsService } from '../core/live/live-events.service';
import { inOwnTask } from '../core/tasks/own-task';
import { whenIdle } from '../core/tasks/when-idle';
import { type BatchAnalysis, type EpsilonCandidate, guessFormat } from './batch-analysis';
import { ApprovalRecordPanel } from './approval-record-panel';
import { BatchComments } from './batch-comments';
import { BatchDetailService } from './batch-detail.service';
import { CalibrationPanel } from './calibration-panel';
import { EquilibriumPanel } from './equilibrium-panel';
import { formatNumber, kUnitOf } from '../shared/format/number-format';
import { PlateMap } from './plate-map';
import { QcPanel } from './qc-panel';
import { SpectraPanel } from './spectra-panel';
import { hasSpectra } from './spectra-presence';
import type { ReasonDialogData } from './reason-dialog';
import { UnknownsTable } from './unknowns-table';
import { noVerdictText, shortVerdict } from './verdict-sentence';
import {
  NO_EDITS,
  type WhatIfEdits,
  describeEdits,
  effectiveExclusions,
  epsilonSourceLabel,
  hasEdits,
  settingsPatch,
  wavelengthsOf,
  whatIfSettings,
  withExclusion,
  withoutExclusion,
} from './what-if';
import { type EpsilonSourceValue, type ExclusionRow, WhatIfPanel } from './what-if-panel';
import { WhatIfRunner } from './what-if-runner';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { Notice } from '../shared/page/notice';
import { loadOrOfferReload } from '../core/routing/app-updated';
import { PartNotLoaded } from '../shared/page/part-not-loaded';
import { prepareRoleImages } from '../shared/role-code/role-style';

/** Quiet time after the last live event before the page asks again: a burst of files costs one request. */
export const LIVE_REFRESH_DEBOUNCE_MS = 300;
/** What-if edits are analysed once they stop changing for this long (an analysis takes ~15 ms). */
export const WHAT_IF_DEBOUNCE_MS = 40;

/** The batch page's sections, as the tab group's ids. */
type SectionTab = 'equilibrium' | 'spectra' | 'calibration' | 'unknowns' | 'qc' | 'files';

/** Does a live event concern this batch? */
export function concernsBatch(event: LiveEvent, batchId: number): boolean {
  if (event.type === 'batch.updated') return event.data.id === batchId;
  return event.type === 'file.stored' && event.data.batchId === batchId;
}

/**
 * One batch, live: its map, calibration, unknowns, equilibrium and QC, what-if edits recomputed in the
 * browser with the shared analysis module, and review/approval by role.
 */
@Component({
  selector: 'eq-batch-detail-page',
  imports: [
    PartNotLoaded,
    DateTimePipe,
    TableScroll,
    RouterLink,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatTabGroup,
    MatTab,
    MatTabContent,
    BatchStateLabel,
    PlateMap,
    CalibrationPanel,
    UnknownsTable,
    EquilibriumPanel,
    QcPanel,
    SpectraPanel,
    WhatIfPanel,
    ApprovalRecordPanel,
    BatchComments,
  ],
  templateUrl: './batch-detail-page.html',
  styleUrl: './batch-detail-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  providers: [WhatIfRunner],
})
export class BatchDetailPage {
  private readonly service = inject(BatchDetailService);
  private readonly auth = inject(AuthService);
  /** Lab managers and admins reach the Intake page and the raw files (the intake routes' roles). */
  protected readonly seesIntake = computed(() => this.auth.hasRole('admin', 'lab_manager'));
  private readonly live = inject(LiveEventsService);
  private readonly injector = inject(Injector);
  private readonly notice = inject(Notice);
  private readonly whatIfRunner = inject(WhatIfRunner);

  /** Route parameter `:id` (component input binding). */
  readonly id = input.required<string>();
  protected readonly batchId = computed(() => Number(this.id()));

  protected readonly data = signal<BatchAnalysis | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly edits = signal<WhatIfEdits>(NO_EDITS);
  protected readonly selected = signal<string | null>(null);
  protected readonly connected = this.live.connected;
  private readonly reload$ = new Subject<void>();

  protected readonly format = toSignal<PlateFormat | null, null>(
    toObservable(computed(() => this.data()?.batch.layoutId ?? null)).pipe(
      distinctUntilChanged(),
      filter((id): id is number => id !== null),
      switchMap((layoutId) =>
        this.service
          .layoutFormat(layoutId)
          .pipe(
            catchError(() => of(guessFormat(this.data()?.result.positions.map((p) => p.position) ?? []))),
          ),
      ),
      inOwnTask(),
    ),
    { initialValue: null },
  );

  /**
   * Calibrations that can lend ε: asked again when the batch's settings change (its wavelength may). Only
   * the what-if panel (rendered in an idle moment) lists them, so they are asked for in an idle moment too,
   * not while the result and the plate map render.
   */
  protected readonly epsilonCandidates = toSignal(
    toObservable(
      computed(() => {
        const b = this.data()?.batch;
        return b ? `${b.id}|${b.updatedAt}` : null;
      }),
    ).pipe(
      distinctUntilChanged(),
      filter((key): key is string => key !== null),
      switchMap(() => whenIdle()),
      switchMap(() =>
        this.service.epsilonSources(this.batchId()).pipe(catchError(() => of([] as EpsilonCandidate[]))),
      ),
    ),
    { initialValue: [] as EpsilonCandidate[] },
  );

  /** The what-if analysis, run in a worker once the edits settle; null when there are none. */
  protected readonly whatIf = toSignal(
    toObservable(computed(() => ({ data: this.data(), edits: this.edits() }))).pipe(
      debounceTime(WHAT_IF_DEBOUNCE_MS),
      switchMap(({ data, edits }) =>
        data && hasEdits(edits)
          ? this.whatIfRunner.run(data.readings, data.samples, data.settings, edits)
          : of(null),
      ),
    ),
    { initialValue: null },
  );

  protected readonly unsaved = computed(() => hasEdits(this.edits()));
  protected readonly editLines = computed(() => describeEdits(this.edits()));
  protected readonly result = computed(() => {
    const w = this.whatIf();
    return (this.unsaved() && w?.result) || this.data()?.result || null;
  });
  protected readonly batch = computed(() => this.data()?.batch ?? null);
  /** The approval record an approved batch is shown from. */
  protected readonly record = computed(() => this.data()?.record ?? null);
  protected readonly engineCheck = computed(() => this.data()?.engineCheck ?? null);
  /** Approval records a reopening superseded. */
  protected readonly earlierApprovals = computed(() =>
    (this.data()?.approvals ?? []).filter((r) => r.supersededAt !== null),
  );
  protected readonly savedEpsilonFrom = computed(() => {
    const source = this.batch()?.settings.epsilonSource;
    return source ? epsilonSourceLabel(source) : null;
  });
  /** The result in one short sentence (model and K); the long verdict is behind "Details". */
  protected readonly verdict = computed(() => {
    const r = this.result();
    return r ? shortVerdict(r) : null;
  });
  protected readonly noVerdict = computed(() => {
    const r = this.result();
    return r ? noVerdictText(r) : '';
  });
  protected readonly detailsOpen = signal(false);
  /** A batch with equilibrium mixtures; a plain calibration batch hides the equilibrium tab and controls. */
  protected readonly equilibrium = computed(() => (this.result()?.mixtures.length ?? 0) > 0);
  /** The tab the page opens on: Equilibrium, or Calibration for a batch without mixtures. */
  protected readonly tabs = computed<readonly SectionTab[]>(() => [
    ...(this.equilibrium() ? (['equilibrium'] as const) : []),
    ...(this.spectra() ? (['spectra'] as const) : []),
    'calibration',
    'unknowns',
    'qc',
    'files',
  ]);
  /**
   * The tab the person opened; it stays open while live updates add or remove tabs before it (a
   * stored file that brings the first mixtures must not switch the page away from Spectra).
   */
  private readonly chosenTab = signal<SectionTab | null>(null);
  protected readonly tabIndex = computed(() => {
    const tabs = this.tabs();
    const at = tabs.indexOf(this.chosenTab() ?? (this.equilibrium() ? 'equilibrium' : 'calibration'));
    return Math.max(0, at);
  });
  protected readonly best = computed(() => {
    const s = this.result()?.stoichiometry;
    return s?.candidates.find((c) => c.model === s.best) ?? null;
  });

  protected readonly canEdit = computed(
    () => this.auth.hasRole('lab_manager', 'scientist') && this.batch()?.state !== 'approved',
  );
  protected readonly readOnlyNote = computed(() => {
    if (this.batch()?.state === 'approved')
      return 'This batch is approved and read-only. A lab manager can reopen it to change the analysis.';
    if (!this.auth.hasRole('lab_manager', 'scientist'))
      return 'Only scientists and lab managers change the analysis of a batch.';
    return null;
  });
  protected readonly canReview = computed(
    () => this.batch()?.state === 'open' && this.auth.hasRole('scientist', 'lab_manager'),
  );
  protected readonly canApprove = computed(
    () => this.batch()?.state === 'reviewed' && this.auth.hasRole('lab_manager'),
  );
  protected readonly canReopen = computed(
    () => !!this.batch() && this.batch()?.state !== 'open' && this.auth.hasRole('lab_manager'),
  );

  protected readonly exclusionRows = computed<ExclusionRow[]>(() => {
    const saved = this.batch()?.settings.exclusions ?? [];
    const savedKey = new Map(saved.map((e) => [e.position, e.reason]));
    return effectiveExclusions(saved, this.edits()).map((e) => ({
      ...e,
      unsaved: savedKey.get(e.position) !== e.reason,
    }));
  });
  protected readonly positionChoices = computed(() =>
    (this.result()?.positions ?? [])
      .filter((p) => p.role !== null)
      .map((p) => ({ position: p.position, sampleId: p.sampleId, role: p.role })),
  );
  protected readonly wavelengths = computed(() => wavelengthsOf(this.data()?.readings ?? []));
  /** A batch read as spectra (many wavelengths per position) gets the Spectra section. */
  protected readonly spectra = computed(() => hasSpectra(this.data()?.readings ?? []));
  /** The settings the Spectra section starts from: the saved ones with the what-if edits on top. */
  protected readonly spectraBase = computed(() => {
    const d = this.data();
    return d ? whatIfSettings(d.settings, this.edits()) : null;
  });
  protected readonly effective = computed(() => {
    const saved = this.batch()?.settings;
    const e = this.edits();
    return {
      candidates: e.candidates ?? saved?.candidates ?? [],
      wavelengthNm: e.wavelengthNm !== undefined ? e.wavelengthNm : (saved?.wavelengthNm ?? null),
      pathLengthCm: e.pathLengthCm ?? saved?.pathLengthCm ?? 1,
      epsilon: e.epsilon ? e.epsilon.lPerMolCm : (saved?.epsilonLPerMolCm ?? null),
      fitBaseline: e.fitBaseline ?? saved?.fitBaseline ?? false,
    };
  });
  protected readonly epsilonSource = computed<EpsilonSourceValue>(() => {
    const e = this.edits().epsilon;
    if (e) return e.sourceBatchId !== null ? `batch:${e.sourceBatchId}` : 'own';
    return this.batch()?.settings.epsilonLPerMolCm != null ? 'saved' : 'own';
  });
  protected readonly qcCount = computed(() => this.result()?.qc.length ?? 0);

  protected readonly fmt = formatNumber;
  protected readonly kUnit = kUnitOf;

  constructor() {
    prepareRoleImages();
    toObservable(this.batchId)
      .pipe(
        switchMap((id) =>
          merge(
            of(undefined),
            this.reload$,
            this.live.ofType('batch.updated', 'file.stored').pipe(
              filter((e) => concernsBatch(e, id)),
              auditTime(LIVE_REFRESH_DEBOUNCE_MS),
            ),
          ).pipe(
            switchMap(() =>
              this.service.analysis(id, true).pipe(
                catchError((err: unknown) => {
                  this.loadError.set(apiErrorMessage(err, 'The batch could not be loaded.'));
                  this.loading.set(false);
                  return EMPTY;
                }),
              ),
            ),
          ),
        ),
        inOwnTask(),
        takeUntilDestroyed(),
      )
      .subscribe((analysis) => {
        this.data.set(analysis);
        this.loadError.set(null);
        this.loading.set(false);
      });
  }

  protected ci(pair: [number | null, number | null] | null | undefined): string {
    return pair ? `${formatNumber(pair[0])} – ${formatNumber(pair[1])}` : '—';
  }

  protected chooseTab(id: string | null): void {
    const tab = this.tabs().find((t) => t === id);
    if (tab) this.chosenTab.set(tab);
  }

  protected select(position: string): void {
    this.selected.set(position);
  }

  protected exclude(exclusion: Exclusion): void {
    this.edits.update((e) => withExclusion(e, exclusion));
    this.selected.set(null);
  }

  protected restore(position: string): void {
    this.edits.update((e) => withoutExclusion(e, position, this.batch()?.settings.exclusions ?? []));
  }

  protected setCandidates(candidates: string[]): void {
    this.edits.update((e) => ({ ...e, candidates }));
  }

  protected setWavelength(wavelengthNm: number | null): void {
    this.edits.update((e) => ({ ...e, wavelengthNm }));
  }

  protected setPathLength(pathLengthCm: number): void {
    this.edits.update((e) => ({ ...e, pathLengthCm }));
  }

  /** Back to the saved value drops the edit, so an unchanged what-if is no what-if. */
  protected setFitBaseline(fitBaseline: boolean): void {
    const saved = this.batch()?.settings.fitBaseline ?? false;
    this.edits.update((e) => {
      const next: WhatIfEdits = { ...e, fitBaseline };
      if (fitBaseline === saved) delete next.fitBaseline;
      return next;
    });
  }

  protected setEpsilonSource(value: EpsilonSourceValue): void {
    const savedEpsilon = this.batch()?.settings.epsilonLPerMolCm ?? null;
    const dropEdit = () =>
      this.edits.update((e) => {
        const next = { ...e };
        delete next.epsilon;
        return next;
      });
    if (value === 'saved' || (value === 'own' && savedEpsilon === null)) return dropEdit();
    if (value === 'own') {
      this.edits.update((e) => ({
        ...e,
        epsilon: { lPerMolCm: null, sourceBatchId: null, label: "this batch's standards" },
      }));
      return;
    }
    const sourceId = Number(value.replace('batch:', ''));
    const candidate = this.epsilonCandidates().find((c) => c.batchId === sourceId);
    if (!candidate) {
      void this.notice.show('That batch no longer offers a calibration at this wavelength.', {
        action: 'OK',
        durationMs: 6000,
      });
      return;
    }
    this.edits.update((e) => ({
      ...e,
      epsilon: {
        lPerMolCm: candidate.epsilonLPerMolCm,
        sourceBatchId: candidate.batchId,
        sourceRecordId: candidate.recordId,
        label: epsilonSourceLabel(candidate),
      },
    }));
  }

  protected reset(): void {
    this.edits.set(NO_EDITS);
  }

  protected save(): void {
    const batch = this.batch();
    if (!batch || !this.unsaved()) return;
    const patch = settingsPatch(batch.settings, this.edits());
    this.askReason({
      title: 'Save the what-if',
      message: "These changes become the batch's analysis settings:",
      details: this.editLines(),
      fieldLabel: 'Reason',
      confirmLabel: 'Save',
    }).subscribe((reason) =>
      this.run(this.service.saveSettings(batch.id, patch, reason), 'Settings saved.', () =>
        this.edits.set(NO_EDITS),
      ),
    );
  }

  protected review(): void {
    const batch = this.batch();
    if (batch) this.run(this.service.review(batch.id), 'Marked reviewed.');
  }

  protected approve(): void {
    const batch = this.batch();
    if (!batch) return;
    this.askReason({
      title: `Approve ${batch.name}`,
      message:
        'An approved batch is locked: its analysis can no longer change until a lab manager reopens it.',
      fieldLabel: 'Comment',
      confirmLabel: 'Approve',
    }).subscribe((comment) => this.run(this.service.approve(batch.id, comment), 'Approved.'));
  }

  protected reopen(): void {
    const batch = this.batch();
    if (!batch) return;
    this.askReason({
      title: `Reopen ${batch.name}`,
      message: 'The batch goes back to open and can be changed and reviewed again.',
      fieldLabel: 'Reason',
      confirmLabel: 'Reopen',
    }).subscribe((reason) => this.run(this.service.reopen(batch.id, reason), 'Reopened.'));
  }

  /**
   * The dialog (and its form fields) loads on first use, not with the page; when its script cannot be
   * fetched, the person is offered a reload and the action does not go ahead.
   */
  private askReason(data: ReasonDialogData) {
    return from(loadOrOfferReload(() => import('./reason-dialog'))).pipe(
      switchMap((m) => (m ? m.askReason(this.injector, data) : EMPTY)),
    );
  }

  private run(request: ReturnType<BatchDetailService['review']>, done: string, after?: () => void): void {
    this.busy.set(true);
    request.subscribe({
      next: () => {
        this.busy.set(false);
        after?.();
        void this.notice.show(done, { durationMs: 3000 });
        this.reload$.next();
      },
      error: (err: unknown) => {
        this.busy.set(false);
        void this.notice.show(apiErrorMessage(err), { action: 'OK' });
      },
    });
  }
}
