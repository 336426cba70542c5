import path from 'node:path';
import type { RequestHandler } from 'express';
import multer from 'multer';
import { AppError } from '../common/app-error';
import { cleanFileName } from '../common/file-name';

/** Instrument exports are text tables or JCAMP-DX spectra; anything else is refused before it is read. */
export const EXPORT_EXTENSIONS: readonly string[] = ['.csv', '.tsv', '.txt', '.dat', '.jdx', '.dx', '.jcamp'];
export const MANIFEST_EXTENSIONS: readonly string[] = ['.csv', '.tsv', '.txt', '.xlsx'];

/**
 * One file in memory, size-limited; the client's file name is only looked at for its extension, read as
 * UTF-8 (browsers send `filename="Lösung.csv"` as raw UTF-8 bytes) and cleaned of hidden formatting
 * characters. A body that is not a well-formed multipart form is a 400, not a server fault.
 */
export function singleFileUpload(
  maxBytes: number,
  accepted: readonly string[] = EXPORT_EXTENSIONS,
): RequestHandler {
  const ACCEPTED_EXTENSIONS = new Set(accepted);
  const upload = multer({
    storage: multer.memoryStorage(),
    defParamCharset: 'utf8',
    limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
    fileFilter: (_req, file, callback) => {
      file.originalname = cleanFileName(file.originalname);
      const extension = path.extname(file.originalname).toLowerCase();
      if (!ACCEPTED_EXTENSIONS.has(extension)) {
        callback(
          new AppError(
            'unsupported_file_type',
            415,
            `Only these file types are accepted here: ${[...ACCEPTED_EXTENSIONS].join(', ')}; "${extension || 'no extension'}" is not one of them.`,
          ),
        );
        return;
      }
      callback(null, true);
    },
  }).single('file');
  return (req, res, next) =>
    upload(req, res, (err?: unknown) => {
      if (!err || err instanceof AppError || err instanceof multer.MulterError) return next(err);
      const reason = err instanceof Error ? err.message : String(err);
      next(
        AppError.badRequest(`The upload is not a readable multipart form (${reason}); send the file again.`),
      );
    });
}
