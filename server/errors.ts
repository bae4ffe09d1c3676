/** The one error class routes throw; the error handler turns it into the JSON envelope. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "HttpError";
  }
}

export const unauthorized = () => new HttpError(401, "unauthorized", "Sign in to use Ironledger.");
export const forbidden = (what = "this") =>
  new HttpError(403, "forbidden", `Your role does not allow access to ${what}.`);
export const notFound = (what: string) => new HttpError(404, "not_found", `${what} was not found.`);
