/**
 * The one error class of Bellwether. Every failure a person or the LIS should read is an
 * AppError with a code; the API turns it into application/problem+json (RFC 9457), server
 * actions into a status the form shows.
 */
export const ERROR_STATUS = {
  bad_request: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  invalid: 422,
  too_many_requests: 429,
  internal: 500,
  unavailable: 503,
} as const;

export type ErrorCode = keyof typeof ERROR_STATUS;

const TITLES: Record<ErrorCode, string> = {
  bad_request: "Bad request",
  unauthenticated: "Sign-in required",
  forbidden: "Not allowed",
  not_found: "Not found",
  conflict: "Conflict",
  payload_too_large: "Request too large",
  unsupported_media_type: "Unsupported media type",
  invalid: "Invalid input",
  too_many_requests: "Too many requests",
  internal: "Internal error",
  unavailable: "Service unavailable",
};

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly details?: Record<string, unknown>;

  constructor(code: ErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = "AppError";
    this.code = code;
    this.details = details;
  }

  get status(): number {
    return ERROR_STATUS[this.code];
  }

  get title(): string {
    return TITLES[this.code];
  }
}
