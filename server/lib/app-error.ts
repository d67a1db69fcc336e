/** The one error type services throw: an HTTP status and a message a user can act on. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly details?: Record<string, string>,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const notFound = (what: string) => new AppError(404, `${what} not found`);
export const forbidden = (message = 'You do not have permission to do this') => new AppError(403, message);
