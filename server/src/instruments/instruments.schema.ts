import { z } from 'zod';

const columnName = z.string().trim().min(1).max(60);

export const rulesSchema = z.strictObject({
  delimiter: z.enum(['auto', ',', ';', '\t']).default('auto'),
  decimalMark: z.enum(['.', ',']).default('.'),
  encoding: z.enum(['utf-8', 'latin1', 'utf-16le']).default('utf-8'),
  skipLines: z.number().int().min(0).max(1000).default(0),
  columns: z
    .strictObject({
      position: columnName.default('position'),
      wavelength: columnName.default('wavelength_nm'),
      absorbance: columnName.default('absorbance'),
      readTime: columnName.default('read_time'),
      temperature: columnName.default('temperature_c'),
      replicate: columnName.default('replicate'),
    })
    .default({
      position: 'position',
      wavelength: 'wavelength_nm',
      absorbance: 'absorbance',
      readTime: 'read_time',
      temperature: 'temperature_c',
      replicate: 'replicate',
    }),
  spectrumWavelengthColumn: columnName.default('wavelength_nm'),
  /** JCAMP-DX files: a block's position is read from its title or its sample description. */
  jcampPositionFrom: z.enum(['title', 'sample_description']).default('title'),
});

const regexText = z
  .string()
  .max(200)
  .refine(
    (text) => {
      try {
        new RegExp(text);
        return true;
      } catch {
        return false;
      }
    },
    { message: 'is not a valid regular expression' },
  );

const profileFields = {
  name: z.string().trim().min(1, 'is required').max(120),
  kind: z.enum(['plate_reader', 'cuvette_spectrophotometer']),
  plateFormat: z.enum(['96', '384', 'cuvette']),
  fileFormat: z.enum(['long_table', 'plate_grid', 'spectrum', 'jcamp_dx']),
  rules: rulesSchema.default(rulesSchema.parse({})),
  pathLengthCm: z.number().positive().max(100).nullable().default(null),
  fillVolumeUl: z.number().positive().max(5000).nullable().default(null),
  wellDiameterMm: z.number().positive().max(100).nullable().default(null),
  defaultWavelengthNm: z.number().min(100).max(3300).nullable().default(null),
  dropSubfolder: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$/, 'must be letters, digits, - or _ (no slashes or dots)'),
  fileNamePattern: regexText.nullable().default(null),
  active: z.boolean().default(true),
};

export const createProfileSchema = z
  .strictObject(profileFields)
  .refine((p) => p.kind !== 'cuvette_spectrophotometer' || p.plateFormat === 'cuvette', {
    message: 'a cuvette spectrophotometer uses the cuvette sequence format',
    path: ['plateFormat'],
  })
  .refine((p) => !(p.rules.decimalMark === ',' && p.rules.delimiter === ','), {
    message: 'a decimal comma needs a ";" or tab delimiter',
    path: ['rules', 'delimiter'],
  });
export type CreateProfileInput = z.infer<typeof createProfileSchema>;

export const updateProfileSchema = z.strictObject({
  name: profileFields.name.optional(),
  kind: profileFields.kind.optional(),
  plateFormat: profileFields.plateFormat.optional(),
  fileFormat: profileFields.fileFormat.optional(),
  rules: rulesSchema.partial().optional(),
  pathLengthCm: z.number().positive().max(100).nullable().optional(),
  fillVolumeUl: z.number().positive().max(5000).nullable().optional(),
  wellDiameterMm: z.number().positive().max(100).nullable().optional(),
  defaultWavelengthNm: z.number().min(100).max(3300).nullable().optional(),
  dropSubfolder: profileFields.dropSubfolder.optional(),
  fileNamePattern: regexText.nullable().optional(),
  active: z.boolean().optional(),
});
export type UpdateProfileInput = z.infer<typeof updateProfileSchema>;

/** The `rules` form field of a "try a file" request: parsing rules plus format. */
export const tryRulesSchema = rulesSchema.partial().extend({
  format: z.enum(['long_table', 'plate_grid', 'spectrum', 'jcamp_dx']).default('long_table'),
  plateFormat: z.enum(['96', '384', 'cuvette']).default('96'),
  defaultWavelengthNm: z.number().min(100).max(3300).nullable().optional(),
});
export type TryRulesInput = z.infer<typeof tryRulesSchema>;
