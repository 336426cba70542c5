import path from 'node:path';
import multer from 'multer';
import { AppError } from '../common/app-error';

/** Instrument exports are text tables; anything else is refused before it is read. */
export const EXPORT_EXTENSIONS: readonly string[] = ['.csv', '.tsv', '.txt', '.dat'];
export const MANIFEST_EXTENSIONS: readonly string[] = ['.csv', '.tsv', '.txt', '.xlsx'];

/** One file in memory, size-limited; the client's file name is only looked at for its extension. */
export function singleFileUpload(maxBytes: number, accepted: readonly string[] = EXPORT_EXTENSIONS) {
  const ACCEPTED_EXTENSIONS = new Set(accepted);
  return multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
    fileFilter: (_req, file, callback) => {
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
}
