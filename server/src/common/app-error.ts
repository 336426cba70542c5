/** The one error type services throw; the error handler turns it into `{ error: { code, message } }`. */
export class AppError extends Error {
  constructor(
    readonly code: string,
    readonly status: number,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AppError';
  }

  static badRequest(message: string, details?: unknown): AppError {
    return new AppError('bad_request', 400, message, details);
  }
  static unauthorized(message = 'Sign in first.'): AppError {
    return new AppError('unauthorized', 401, message);
  }
  static forbidden(message = 'Your role does not allow this.'): AppError {
    return new AppError('forbidden', 403, message);
  }
  static notFound(message: string): AppError {
    return new AppError('not_found', 404, message);
  }
  static conflict(message: string): AppError {
    return new AppError('conflict', 409, message);
  }
}
