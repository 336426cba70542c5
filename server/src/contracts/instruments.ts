import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { readingSchema } from './analysis-types';
import {
  FILE_FORMATS,
  fileFormatSchema,
  instrumentKindSchema,
  PLATE_FORMATS,
  plateFormatSchema,
  dropFolderNameSchema,
} from './enums';
import { rulesSchema } from './settings';

export { type ColumnNames, DEFAULT_PARSING_RULES, type ParsingRules, rulesSchema } from './settings';

const regexText = /* @__PURE__ */ lazySchema(() =>
  z
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
    ),
);

const profileFields = {
  name: z.string().trim().min(1, 'is required').max(120),
  kind: instrumentKindSchema,
  plateFormat: plateFormatSchema,
  fileFormat: fileFormatSchema,
  rules: rulesSchema.default(() => rulesSchema.parse({})),
  pathLengthCm: z.number().positive().max(100).nullable().default(null),
  fillVolumeUl: z.number().positive().max(5000).nullable().default(null),
  wellDiameterMm: z.number().positive().max(100).nullable().default(null),
  defaultWavelengthNm: z.number().min(100).max(3300).nullable().default(null),
  dropSubfolder: dropFolderNameSchema,
  fileNamePattern: regexText.nullable().default(null),
  active: z.boolean().default(true),
};

export const createProfileSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .strictObject(profileFields)
    .refine((p) => p.kind !== 'cuvette_spectrophotometer' || p.plateFormat === 'cuvette', {
      message: 'a cuvette spectrophotometer uses the cuvette sequence format',
      path: ['plateFormat'],
    })
    .refine((p) => !(p.rules.decimalMark === ',' && p.rules.delimiter === ','), {
      message: 'a decimal comma needs a ";" or tab delimiter',
      path: ['rules', 'delimiter'],
    }),
);
export type CreateProfileInput = z.infer<typeof createProfileSchema>;

export const updateProfileSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
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
  }),
);
export type UpdateProfileInput = z.infer<typeof updateProfileSchema>;

/** The `rules` form field of a "try a file" request: parsing rules plus format. */
export const tryRulesSchema = /* @__PURE__ */ lazySchema(() =>
  rulesSchema.partial().extend({
    format: z.enum(FILE_FORMATS).default('long_table'),
    plateFormat: z.enum(PLATE_FORMATS).default('96'),
    defaultWavelengthNm: z.number().min(100).max(3300).nullable().optional(),
  }),
);
export type TryRulesInput = z.infer<typeof tryRulesSchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

/** An instrument profile as the API returns it (the token itself never, only whether there is one). */
export const profileSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    kind: instrumentKindSchema,
    plateFormat: plateFormatSchema,
    fileFormat: fileFormatSchema,
    rules: rulesSchema,
    pathLengthCm: z.number().nullable(),
    fillVolumeUl: z.number().nullable(),
    wellDiameterMm: z.number().nullable(),
    defaultWavelengthNm: z.number().nullable(),
    dropSubfolder: z.string(),
    fileNamePattern: z.string().nullable(),
    active: z.boolean(),
    hasToken: z.boolean(),
    tokenPrefix: z.string().nullable(),
    tokenCreatedAt: z.string().nullable(),
    createdAt: z.string(),
    updatedAt: z.string(),
  }),
);
export type ProfileDto = z.infer<typeof profileSchema>;

/** A profile together with its plaintext token, which the server shows this once only. */
export const profileWithTokenSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ profile: profileSchema, token: z.string() }),
);
export type ProfileWithToken = z.infer<typeof profileWithTokenSchema>;

/** GET /api/instruments/summary: what every signed-in person may know of the instruments. */
export const instrumentSummarySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    name: z.string(),
    kind: instrumentKindSchema,
    plateFormat: plateFormatSchema,
    active: z.boolean(),
  }),
);
export type InstrumentSummary = z.infer<typeof instrumentSummarySchema>;

/** POST /api/instruments/try: what the rules read from a sample file, saving nothing. */
export const tryResultSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    readingCount: z.number(),
    readings: z.array(readingSchema),
    metadata: z.object({
      runId: z.string().optional(),
      wavelengthsNm: z.array(z.number()),
      temperatureC: z.number().optional(),
      readTime: z.string().optional(),
      extra: z.record(z.string(), z.string()),
    }),
    warnings: z.array(z.string()),
  }),
);
export type TryResult = z.infer<typeof tryResultSchema>;
