import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import {
  type AbstractControl,
  FormBuilder,
  ReactiveFormsModule,
  type ValidationErrors,
  type ValidatorFn,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { firstValueFrom, merge } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import {
  type ColumnNames,
  DECIMAL_MARK_LABELS,
  DEFAULT_RULES,
  DELIMITER_LABELS,
  type DecimalMark,
  type Delimiter,
  ENCODING_LABELS,
  FILE_FORMAT_LABELS,
  type FileFormat,
  type InstrumentKind,
  type InstrumentProfile,
  JCAMP_POSITION_LABELS,
  type JcampPositionFrom,
  KIND_LABELS,
  PLATE_FORMAT_LABELS,
  type PlateFormat,
  type ProfileFields,
  type ProfileWithToken,
  type TextEncoding,
  type TryFailure,
  type TryResult,
  type TryRules,
  fileNamePatternProblem,
  runIdFromFileName,
} from './instrument-profile';
import { InstrumentsService } from './instruments.service';
import { TryFileResult } from './try-file-result';

export interface ProfileDialogData {
  /** Absent to add a new profile. */
  profile?: InstrumentProfile;
  /** Lab managers: every field shown, nothing changeable, no save. */
  readOnly?: boolean;
}

export type ProfileDialogResult =
  { kind: 'created'; created: ProfileWithToken } | { kind: 'updated'; profile: InstrumentProfile };

type Geometry = 'pathLength' | 'fillVolume';

/** A drop sub-folder is one plain folder name: no separators and no dots, so it cannot leave the drop folder. */
export const DROP_SUBFOLDER_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$/;

const positive: ValidatorFn = (control) =>
  control.value === null || control.value === '' || Number(control.value) > 0 ? null : { positive: true };

const fileNamePattern: ValidatorFn = (control) => {
  const value = String(control.value ?? '');
  const problem = value.trim() === '' ? null : fileNamePatternProblem(value);
  return problem ? { fileNamePattern: problem } : null;
};

/** A decimal comma cannot share the comma with the delimiter. */
const decimalNeedsOtherDelimiter: ValidatorFn = (group: AbstractControl): ValidationErrors | null =>
  group.get('decimalMark')?.value === ',' && group.get('delimiter')?.value === ','
    ? { decimalComma: true }
    : null;

function entries<K extends string>(labels: Record<K, string>): [K, string][] {
  return Object.entries(labels) as [K, string][];
}

/** Add or edit an instrument profile, and try a sample file with the rules as they stand. */
@Component({
  selector: 'eq-profile-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatRadioModule,
    MatSlideToggleModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    TryFileResult,
  ],
  templateUrl: './profile-dialog.html',
  styleUrl: './profile-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProfileDialog {
  private readonly instruments = inject(InstrumentsService);
  private readonly dialogRef = inject<MatDialogRef<ProfileDialog, ProfileDialogResult>>(MatDialogRef);
  protected readonly data = inject<ProfileDialogData>(MAT_DIALOG_DATA);
  protected readonly editing = !!this.data.profile;
  protected readonly readOnly = !!this.data.readOnly && !!this.data.profile;

  protected readonly kinds = entries(KIND_LABELS);
  protected readonly plateFormats = entries(PLATE_FORMAT_LABELS);
  protected readonly fileFormats = entries(FILE_FORMAT_LABELS);
  protected readonly jcampPositions = entries(JCAMP_POSITION_LABELS);
  protected readonly delimiters = entries(DELIMITER_LABELS);
  protected readonly decimalMarks = entries(DECIMAL_MARK_LABELS);
  protected readonly encodings = entries(ENCODING_LABELS);
  protected readonly columnFields: [keyof ColumnNames, string][] = [
    ['position', 'Position'],
    ['wavelength', 'Wavelength (nm)'],
    ['absorbance', 'Absorbance'],
    ['readTime', 'Read time'],
    ['temperature', 'Temperature (°C)'],
    ['replicate', 'Replicate'],
  ];

  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly form = this.buildForm(this.data.profile);

  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  protected readonly tryFileChosen = signal<File | null>(null);
  protected readonly trying = signal(false);
  protected readonly tryResult = signal<TryResult | null>(null);
  protected readonly tryError = signal<TryFailure | null>(null);

  private readonly formValue = toSignal(this.form.valueChanges, { initialValue: this.form.value });
  protected readonly isCuvette = computed(() => this.formValue().kind === 'cuvette_spectrophotometer');
  protected readonly geometry = computed(() => this.formValue().geometry);
  protected readonly runIdFromName = computed(() => {
    const pattern = this.formValue().fileNamePattern?.trim() ?? '';
    const file = this.tryFileChosen();
    if (!pattern || !file) return undefined;
    return runIdFromFileName(pattern, file.name);
  });

  constructor() {
    const c = this.form.controls;
    // A cuvette instrument reads a cuvette sequence through a fixed path length.
    c.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe((kind) => {
      if (kind === 'cuvette_spectrophotometer') {
        c.plateFormat.setValue('cuvette');
        c.geometry.setValue('pathLength');
        // The common cuvette is 1 cm; offered, not forced.
        if (c.pathLengthCm.value === null) c.pathLengthCm.setValue(1);
      } else if (c.plateFormat.value === 'cuvette') {
        c.plateFormat.setValue('96');
      }
    });
    merge(c.geometry.valueChanges, c.kind.valueChanges)
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.applyGeometryValidators());
    this.applyGeometryValidators();
    if (this.readOnly) this.form.disable({ emitEvent: false });
  }

  private buildForm(p: InstrumentProfile | undefined) {
    const rules = {
      ...DEFAULT_RULES,
      ...p?.rules,
      columns: { ...DEFAULT_RULES.columns, ...p?.rules.columns },
    };
    const column = (value: string) => this.fb.control(value, [Validators.required, Validators.maxLength(60)]);
    return this.fb.group({
      name: [p?.name ?? '', [Validators.required, Validators.maxLength(120)]],
      kind: [p?.kind ?? ('plate_reader' as InstrumentKind)],
      plateFormat: [p?.plateFormat ?? ('96' as PlateFormat)],
      fileFormat: [p?.fileFormat ?? ('long_table' as FileFormat)],
      rules: this.fb.group(
        {
          delimiter: [rules.delimiter as Delimiter],
          decimalMark: [rules.decimalMark as DecimalMark],
          encoding: [rules.encoding as TextEncoding],
          skipLines: [
            rules.skipLines,
            [Validators.required, Validators.min(0), Validators.max(1000), Validators.pattern(/^\d+$/)],
          ],
          columns: this.fb.group({
            position: column(rules.columns.position),
            wavelength: column(rules.columns.wavelength),
            absorbance: column(rules.columns.absorbance),
            readTime: column(rules.columns.readTime),
            temperature: column(rules.columns.temperature),
            replicate: column(rules.columns.replicate),
          }),
          spectrumWavelengthColumn: column(rules.spectrumWavelengthColumn),
          jcampPositionFrom: [rules.jcampPositionFrom as JcampPositionFrom],
        },
        { validators: decimalNeedsOtherDelimiter },
      ),
      // A new plate reader's light path follows from its fill volume and well diameter (a plate well is
      // not 1 cm deep); an existing profile keeps what it has.
      geometry: [(p ? (p.fillVolumeUl != null ? 'fillVolume' : 'pathLength') : 'fillVolume') as Geometry],
      pathLengthCm: [p ? p.pathLengthCm : (null as number | null), [positive, Validators.max(100)]],
      fillVolumeUl: [p?.fillVolumeUl ?? (null as number | null), [positive, Validators.max(5000)]],
      wellDiameterMm: [p?.wellDiameterMm ?? (null as number | null), [positive, Validators.max(100)]],
      defaultWavelengthNm: [
        p?.defaultWavelengthNm ?? (null as number | null),
        [positive, Validators.min(100), Validators.max(3300)],
      ],
      dropSubfolder: [
        p?.dropSubfolder ?? '',
        [Validators.required, Validators.pattern(DROP_SUBFOLDER_PATTERN)],
      ],
      fileNamePattern: [p?.fileNamePattern ?? '', [Validators.maxLength(200), fileNamePattern]],
      active: [p?.active ?? true],
    });
  }

  /** Path length, or fill volume with well diameter: whichever is in use is required. */
  private applyGeometryValidators(): void {
    const c = this.form.controls;
    const byVolume = c.geometry.value === 'fillVolume' && c.kind.value === 'plate_reader';
    const set = (control: AbstractControl, required: boolean, max: number) => {
      control.setValidators(
        required ? [Validators.required, positive, Validators.max(max)] : [positive, Validators.max(max)],
      );
      control.updateValueAndValidity({ emitEvent: false });
    };
    set(c.pathLengthCm, !byVolume, 100);
    set(c.fillVolumeUl, byVolume, 5000);
    set(c.wellDiameterMm, byVolume, 100);
  }

  /** The editable fields as the API wants them. */
  private fields(): ProfileFields {
    const v = this.form.getRawValue();
    const byVolume = v.geometry === 'fillVolume' && v.kind === 'plate_reader';
    const pattern = v.fileNamePattern.trim();
    return {
      name: v.name.trim(),
      kind: v.kind,
      plateFormat: v.plateFormat,
      fileFormat: v.fileFormat,
      rules: { ...v.rules, skipLines: Number(v.rules.skipLines) },
      pathLengthCm: byVolume ? null : v.pathLengthCm,
      fillVolumeUl: byVolume ? v.fillVolumeUl : null,
      wellDiameterMm: byVolume ? v.wellDiameterMm : null,
      defaultWavelengthNm: v.defaultWavelengthNm,
      dropSubfolder: v.dropSubfolder.trim(),
      fileNamePattern: pattern === '' ? null : pattern,
      active: v.active,
    };
  }

  /** The rules "try a file" sends: exactly what the form holds now, saved or not. */
  protected tryRules(): TryRules {
    const f = this.fields();
    const rules: TryRules = { ...f.rules, format: f.fileFormat, plateFormat: f.plateFormat };
    if (f.defaultWavelengthNm !== null) rules.defaultWavelengthNm = f.defaultWavelengthNm;
    return rules;
  }

  protected chooseTryFile(input: HTMLInputElement): void {
    const file = input.files?.[0] ?? null;
    input.value = ''; // choosing the same file again still fires a change
    if (!file) return;
    this.tryFileChosen.set(file);
    this.runTry();
  }

  protected runTry(): void {
    const file = this.tryFileChosen();
    if (!file) return;
    if (this.form.controls.rules.invalid) {
      this.form.controls.rules.markAllAsTouched();
      this.tryResult.set(null);
      this.tryError.set({ message: 'Fix the parsing rules marked above first.' });
      return;
    }
    this.trying.set(true);
    this.tryResult.set(null);
    this.tryError.set(null);
    this.instruments.tryFile(file, this.tryRules()).subscribe({
      next: (result) => {
        this.tryResult.set(result);
        this.trying.set(false);
      },
      error: (failure: TryFailure) => {
        this.tryError.set(failure);
        this.trying.set(false);
      },
    });
  }

  protected async save(): Promise<void> {
    if (this.readOnly) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.error.set('Some fields need attention; they are marked in red.');
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      if (this.data.profile) {
        const profile = await firstValueFrom(this.instruments.update(this.data.profile.id, this.fields()));
        this.dialogRef.close({ kind: 'updated', profile });
      } else {
        const created = await firstValueFrom(this.instruments.create(this.fields()));
        this.dialogRef.close({ kind: 'created', created });
      }
    } catch (err) {
      this.error.set(apiErrorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }
}
