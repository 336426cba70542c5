import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam, validateBody } from '../common/validate';
import { singleFileUpload } from '../ingest/upload';
import { ParseError, parseInstrumentFile, resolveParseRules } from '../parsers';
import { createProfileSchema, tryRulesSchema, updateProfileSchema } from '../contracts/instruments';
import type { InstrumentsService } from './instruments.service';

const PREVIEW_READINGS = 50;

/** Instrument profiles and their tokens: admins change them; lab managers read them. */
export function instrumentsRouter(instruments: InstrumentsService, maxBytes: number): Router {
  const router = Router();
  /** Names and formats only, for choosing an instrument (e.g. creating a batch): every signed-in role. */
  router.get('/summary', requireRole('admin', 'lab_manager', 'scientist'), async (_req, res) => {
    res.json(
      (await instruments.list()).map(({ id, name, kind, plateFormat, active }) => ({
        id,
        name,
        kind,
        plateFormat,
        active,
      })),
    );
  });
  /** Full profiles (formats, file-name pattern, rules) to read: admins and lab managers; only admins change them. */
  router.get('/', requireRole('admin', 'lab_manager'), async (_req, res) => {
    res.json(await instruments.list());
  });
  router.use(requireRole('admin'));

  router.post('/', validateBody(createProfileSchema), async (req, res) => {
    res.status(201).json(await instruments.create(req.body, req.user!));
  });

  /** Parse a sample file with the rules in the form, before anything is saved. */
  router.post('/try', singleFileUpload(maxBytes), async (req, res) => {
    if (!req.file) throw AppError.badRequest('Choose a file to try (multipart field "file").');
    let rulesInput: unknown;
    try {
      rulesInput = JSON.parse(typeof req.body?.rules === 'string' ? req.body.rules : '{}');
    } catch {
      throw AppError.badRequest('The "rules" field must be JSON.');
    }
    const rules = tryRulesSchema.safeParse(rulesInput);
    if (!rules.success)
      throw AppError.badRequest(`Invalid parsing rules: ${describeIssues(rules.error.issues)}`);
    const { plateFormat, defaultWavelengthNm, ...rest } = rules.data;
    try {
      const parsed = await parseInstrumentFile(
        req.file.buffer,
        req.file.originalname,
        resolveParseRules({
          ...rest,
          plateFormat,
          defaultWavelengthNm: defaultWavelengthNm ?? undefined,
        }),
      );
      res.json({
        readingCount: parsed.readings.length,
        readings: parsed.readings.slice(0, PREVIEW_READINGS),
        metadata: parsed.metadata,
        warnings: parsed.warnings,
      });
    } catch (err) {
      if (!(err instanceof ParseError)) throw err;
      throw new AppError('parse_error', 422, err.message, { line: err.line, column: err.column });
    }
  });

  router.patch('/:id', validateBody(updateProfileSchema), async (req, res) => {
    res.json(await instruments.update(idParam(req.params['id'], 'Instrument profile'), req.body, req.user!));
  });

  router.post('/:id/token', async (req, res) => {
    res.json(await instruments.rotateToken(idParam(req.params['id'], 'Instrument profile'), req.user!));
  });

  router.delete('/:id/token', async (req, res) => {
    res.json(await instruments.revokeToken(idParam(req.params['id'], 'Instrument profile'), req.user!));
  });

  return router;
}
