/**
 * A problem with a whole file (unreadable, unknown profile, wrong kind, header not recognised, a column
 * named twice, a shop that is not registered, a profile saved by someone else meanwhile). Nothing of
 * the file is loaded; the message is one line a shop manager can act on.
 */
export class EtlFatalError extends Error {
  constructor(
    readonly code: "FILE_UNREADABLE" | "UNKNOWN_PROFILE" | "WRONG_KIND" | "HEADER_NOT_RECOGNISED" | "AMBIGUOUS_PROFILE" | "UNKNOWN_SHOP" | "DUPLICATE_COLUMN" | "UNBALANCED_QUOTE" | "CANCELLED" | "PROFILE_CHANGED",
    message: string,
  ) {
    super(message);
    this.name = "EtlFatalError";
  }
}
