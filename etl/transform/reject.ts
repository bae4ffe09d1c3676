/** Why a row was not loaded: a stable code for filtering and a sentence for the shop manager. */
export type RejectCode =
  | "wrong_column_count"
  | "unreadable_row"
  | "missing_field"
  | "bad_date"
  | "bad_number"
  | "future_date"
  | "closed_before_opened"
  | "received_before_ordered"
  | "delivered_before_built"
  | "negative_value"
  | "absurd_value"
  | "unknown_code"
  | "unknown_machine"
  | "unknown_repair_line"
  | "hour_meter_backwards"
  | "duplicate_in_file"
  | "conflicting_duplicate"
  | "tmin_above_tmax"
  | "unknown_shop"
  | "bad_characters"
  | "bad_encoding"
  | "too_long"
  | "unbalanced_quote";

export class RowRejected extends Error {
  constructor(
    readonly code: RejectCode,
    readonly reason: string,
  ) {
    super(reason);
  }
}

export function reject(code: RejectCode, reason: string): never {
  throw new RowRejected(code, reason);
}
