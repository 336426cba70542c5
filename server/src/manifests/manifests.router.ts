import { type Request, Router } from 'express';
import { requireRole } from '../auth/roles';
import { AppError } from '../common/app-error';
import { describeIssues, idParam } from '../common/validate';
import { MANIFEST_EXTENSIONS, singleFileUpload } from '../ingest/upload';
import { type ManifestMetaInput, manifestMetaSchema } from '../contracts/manifests';
import type { ManifestInput, ManifestsService } from './manifests.service';

const READERS = requireRole('admin', 'lab_manager', 'scientist');
const EDITORS = requireRole('admin', 'lab_manager');

/** The manifest fields of a JSON body or a multipart form, checked at the boundary. */
function readInput(req: Request): { meta: ManifestMetaInput; input: ManifestInput } {
  const meta = manifestMetaSchema.safeParse(req.body ?? {});
  if (!meta.success) throw AppError.badRequest(`Invalid request: ${describeIssues(meta.error.issues)}`);
  const input: ManifestInput = {
    layoutId: meta.data.layoutId,
    rows: meta.data.rows,
    file: req.file ? { buffer: req.file.buffer, originalName: req.file.originalname } : undefined,
  };
  return { meta: meta.data, input };
}

/** Manifests: uploaded (CSV/XLSX) or typed in, checked against a layout; lab managers and admins edit. */
export function manifestsRouter(manifests: ManifestsService, maxBytes: number): Router {
  const router = Router();
  const upload = singleFileUpload(maxBytes, MANIFEST_EXTENSIONS);

  router.get('/', READERS, async (_req, res) => {
    res.json(await manifests.list());
  });
  router.get('/:id', READERS, async (req, res) => {
    res.json(await manifests.get(idParam(req.params['id'], 'Manifest')));
  });
  router.get('/:id/versions/:version', READERS, async (req, res) => {
    res.json(
      await manifests.get(idParam(req.params['id'], 'Manifest'), idParam(req.params['version'], 'Version')),
    );
  });
  /** Every problem and every mismatch with the layout, before anything is saved. */
  router.post('/check', EDITORS, upload, async (req, res) => {
    res.json(await manifests.check(readInput(req).input));
  });
  router.post('/', EDITORS, upload, async (req, res) => {
    const { meta, input } = readInput(req);
    if (!meta.name) throw AppError.badRequest('Invalid request: name: is required');
    res.status(201).json(await manifests.create(meta.name, input, meta.acceptMismatches ?? false, req.user!));
  });
  router.put('/:id', EDITORS, upload, async (req, res) => {
    const { meta, input } = readInput(req);
    const id = idParam(req.params['id'], 'Manifest');
    res.json(await manifests.update(id, input, meta.acceptMismatches ?? false, meta.reason, req.user!));
  });
  return router;
}
