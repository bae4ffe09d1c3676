import { z } from "zod";

/**
 * zod's own messages in words a user reads, for the checks a schema leaves without a message of its own
 * ("Too big: expected string to have <=100 characters" becomes "is at most 100 characters long"). A message a
 * schema gives is kept. Phrased to follow the field's name: "Search is at most 100 characters long".
 * Installed once (server and client) with installZodWords().
 */
type Issue = { code: string; origin?: string; maximum?: unknown; minimum?: unknown; inclusive?: boolean; expected?: string; input?: unknown; values?: readonly unknown[]; format?: string; keys?: readonly string[] };

const n = (v: unknown) => (typeof v === "number" || typeof v === "bigint" ? Number(v).toLocaleString("en-US") : String(v));

export function zodWords(issue: Issue): string | undefined {
  switch (issue.code) {
    case "too_big": {
      const or = issue.inclusive === false ? "less than" : "at most";
      if (issue.origin === "string") return `is ${or} ${n(issue.maximum)} characters long`;
      if (issue.origin === "array" || issue.origin === "set") return `holds ${or} ${n(issue.maximum)} items`;
      return `is ${or} ${n(issue.maximum)}`;
    }
    case "too_small": {
      const or = issue.inclusive === false ? "more than" : "at least";
      if (issue.origin === "string") return Number(issue.minimum) === 1 ? "is empty; write something" : `is ${or} ${n(issue.minimum)} characters long`;
      if (issue.origin === "array" || issue.origin === "set") return Number(issue.minimum) === 1 ? "needs at least one" : `holds ${or} ${n(issue.minimum)} items`;
      return `is ${or} ${n(issue.minimum)}`;
    }
    case "invalid_type":
      if (issue.input === undefined) return "is missing";
      return issue.expected === "number" ? "should be a number" : issue.expected === "string" ? "should be text" : issue.expected === "boolean" ? "should be yes or no" : `should be ${issue.expected === "array" ? "a list" : issue.expected === "object" ? "a set of fields" : `of type ${issue.expected}`}`;
    case "invalid_value":
      return issue.values && issue.values.length ? `should be one of: ${issue.values.map(String).join(", ")}` : "is not a value this takes";
    case "invalid_format":
      if (issue.format === "date") return "should be a date like 2025-01-31";
      if (issue.format === "datetime") return "should be a date and time like 2025-01-31T14:00:00Z";
      if (issue.format === "email") return "should be an e-mail address";
      return "is not in the form this takes";
    case "unrecognized_keys":
      return `holds fields this does not take: ${(issue.keys ?? []).join(", ")}`;
    case "not_multiple_of":
      return "is not a whole step of what this takes";
    default:
      return undefined;
  }
}

let installed = false;
export function installZodWords(): void {
  if (installed) return;
  installed = true;
  z.config({ customError: (iss) => zodWords(iss as unknown as Issue) });
}

const PREDICATE = /^(is|should|holds|needs) /;

/** One issue as a sentence part: "Search is at most 100 characters long", "to: The From date is after the To date". */
export function issueInWords(path: readonly PropertyKey[], message: string, labels: Record<string, string> = {}): string {
  if (!path.length) return message;
  const key = path.map(String).join(".");
  const label = labels[key] ?? key;
  return PREDICATE.test(message) ? `${label} ${message}` : `${label}: ${message}`;
}
