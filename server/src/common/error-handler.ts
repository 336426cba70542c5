import type { ErrorRequestHandler, RequestHandler } from 'express';
import { AppError } from './app-error';

/** Unknown routes under /api answer JSON, never the web app's index page. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(AppError.notFound(`No API route ${req.method} ${req.originalUrl}.`));
};

interface HttpLikeError {
  status?: number;
  statusCode?: number;
  type?: string;
  code?: string;
  message?: string;
}

/** Translate errors raised by Express' own middleware (body parser, multer) into AppErrors. */
function fromFramework(err: HttpLikeError): AppError | undefined {
  if (err.type === 'entity.parse.failed') return AppError.badRequest('The request body is not valid JSON.');
  if (err.type === 'entity.too.large')
    return new AppError('payload_too_large', 413, 'The request body is too large.');
  if (err.code === 'LIMIT_FILE_SIZE')
    return new AppError('payload_too_large', 413, 'The file is larger than the upload limit.');
  if (typeof err.code === 'string' && err.code.startsWith('LIMIT_'))
    return AppError.badRequest(err.message ?? 'Upload rejected.');
  const status = err.status ?? err.statusCode;
  if (status && status >= 400 && status < 500)
    return new AppError('bad_request', status, err.message ?? 'Bad request.');
  return undefined;
}

export function createErrorHandler(log: (message: string, err: unknown) => void): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    const appError = err instanceof AppError ? err : fromFramework((err ?? {}) as HttpLikeError);
    if (!appError) {
      log(`Unhandled error on ${req.method} ${req.originalUrl}`, err);
      res.status(500).json({
        error: { code: 'internal', message: 'Something went wrong on the server; it has been logged.' },
      });
      return;
    }
    if (appError.status >= 500) log(`Error on ${req.method} ${req.originalUrl}`, err);
    const body: { code: string; message: string; details?: unknown } = {
      code: appError.code,
      message: appError.message,
    };
    if (appError.details !== undefined) body.details = appError.details;
    res.status(appError.status).json({ error: body });
  };
}
