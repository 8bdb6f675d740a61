/** An error with an HTTP status and a stable machine-readable code; the error middleware sends it as JSON. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message)
    this.name = 'HttpError'
  }
}

export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found.`)
export const forbidden = (message = 'Your role does not allow this.') => new HttpError(403, 'forbidden', message)
