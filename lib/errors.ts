/**
 * Domain errors. Each class maps to one HTTP status and carries a sentence that is safe to show a
 * user as it is: no stack traces, no internals. Anything that is not one of these is unexpected
 * and is logged with context before a generic 500.
 */

export type ErrorCode =
  | "bad-log"
  | "bad-input"
  | "bad-usage"
  | "not-found"
  | "unauthenticated"
  | "forbidden"
  | "limit-exceeded"
  | "conflict"
  | "too-many-requests"
  | "server-busy"
  | "insufficient-storage"
  | "bad-config"
  | "bad-record";

export abstract class DomainError extends Error {
  abstract readonly code: ErrorCode;
  abstract readonly httpStatus: number;
}

/** The class body every domain error shares: its code, its one HTTP status and its name. */
function domainError<C extends ErrorCode>(code: C, httpStatus: number, name: string) {
  return class extends DomainError {
    readonly code: C = code;
    readonly httpStatus = httpStatus;
    override readonly name = name;
  };
}

/** Where in a log file a problem was found. Lines and columns are 1-based, as an editor shows them. */
export interface LogLocation {
  line?: number;
  column?: number;
  columnName?: string;
}

/** A log file that cannot be read: the message names the line, column and what was expected. */
export class LogFormatError extends domainError("bad-log", 422, "LogFormatError") {
  readonly location: LogLocation;
  constructor(message: string, location: LogLocation = {}) {
    super(formatLocated(message, location));
    this.location = location;
  }
}

function formatLocated(message: string, at: LogLocation): string {
  const parts: string[] = [];
  if (at.line !== undefined) parts.push(`line ${at.line}`);
  if (at.column !== undefined) {
    parts.push(at.columnName ? `column ${at.column} (${at.columnName})` : `column ${at.column}`);
  } else if (at.columnName) {
    parts.push(`column "${at.columnName}"`);
  }
  return parts.length > 0 ? `${parts.join(", ")}: ${message}` : message;
}

/** Input that fails validation (a form field, an option value, a column map). */
export class InputError extends domainError("bad-input", 400, "InputError") {
  readonly field?: string;
  constructor(message: string, field?: string) {
    super(message);
    this.field = field;
  }
}

/** A command line that does not parse (CLI exit code 2). */
export class UsageError extends domainError("bad-usage", 400, "UsageError") {}

/** An id or name that is unknown, or another team's (which is never told apart from unknown). */
export class NotFoundError extends domainError("not-found", 404, "NotFoundError") {
  constructor(what: string) {
    super(`${what} was not found.`);
  }
}

/** No session, an ended one, or no valid API token. */
export class UnauthenticatedError extends domainError(
  "unauthenticated",
  401,
  "UnauthenticatedError",
) {
  constructor(message = "Sign in first.") {
    super(message);
  }
}

/** Signed in, but the role (or the team) does not allow it. */
export class ForbiddenError extends domainError("forbidden", 403, "ForbiddenError") {
  constructor(message = "Your role in this team does not allow that.") {
    super(message);
  }
}

/** Something is larger than its limit (an upload, a file's lines). */
export class LimitExceededError extends domainError("limit-exceeded", 413, "LimitExceededError") {}

/** The change clashes with what is already recorded (a name in use, a part already fitted). */
export class ConflictError extends domainError("conflict", 409, "ConflictError") {}

/**
 * An environment variable that does not parse (lib/config.ts). The server cannot run as asked, so
 * it is the operator's to fix: `npm start` stops with this sentence before it starts anything.
 */
export class ConfigError extends domainError("bad-config", 500, "ConfigError") {
  constructor(variable: string, value: string | undefined, expected: string) {
    super(`${variable} must be ${expected}; it is set to "${value ?? ""}".`);
  }
}

/**
 * A row of the database this version cannot read (lib/server/stored.ts): JSON that does not parse,
 * a version newer than this code, a status that is not one. It is the server's fault, not the
 * user's: a 500 with a sentence that says what to redo.
 */
export class StoredRecordError extends domainError("bad-record", 500, "StoredRecordError") {
  constructor(what: string) {
    super(
      `${what} could not be read (written by another version of heatcheck, or damaged); re-run the log's analysis or set the baseline again.`,
    );
  }
}

/** Too many uploads or queued analyses at once; `retryAfterSeconds` goes out as Retry-After. */
export class TooManyRequestsError extends domainError(
  "too-many-requests",
  429,
  "TooManyRequestsError",
) {
  readonly retryAfterSeconds: number;
  constructor(message: string, retryAfterSeconds: number) {
    super(message);
    this.retryAfterSeconds = retryAfterSeconds;
  }
}

/**
 * The server is taking as many uploads as it can at once (503 with Retry-After, RFC 9110 §15.6.4):
 * the file was neither parsed nor kept, and the same request a moment later will be taken.
 */
export class ServerBusyError extends domainError("server-busy", 503, "ServerBusyError") {
  readonly retryAfterSeconds: number;
  constructor(message: string, retryAfterSeconds: number) {
    super(message);
    this.retryAfterSeconds = retryAfterSeconds;
  }
}

/** The server's disk is full: nothing was kept (507 Insufficient Storage, RFC 4918). */
export class InsufficientStorageError extends domainError(
  "insufficient-storage",
  507,
  "InsufficientStorageError",
) {
  constructor(
    message = "The server's disk is full, so nothing was kept; free some space on the server and try again.",
  ) {
    super(message);
  }
}

export function isDomainError(e: unknown): e is DomainError {
  return e instanceof DomainError;
}
