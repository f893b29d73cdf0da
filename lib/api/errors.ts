/**
 * One table of error codes for the whole API. Each code has one HTTP status; routes throw
 * `new AppError('not_found', 'Project not found')` and the route wrapper answers
 * `{"error":{"code":"not_found","message":"Project not found"}}` with status 404.
 */
export const ERROR_CODES = {
  bad_json: { status: 400, summary: 'The request body is not valid JSON.' },
  bad_request: { status: 400, summary: 'The request is malformed.' },
  unauthenticated: { status: 401, summary: 'Not signed in, or the API token is missing, malformed, revoked or expired.' },
  forbidden: { status: 403, summary: 'Signed in, but the role does not allow this.' },
  not_found: { status: 404, summary: 'The object does not exist or is not visible to your organisation.' },
  conflict: { status: 409, summary: 'The request conflicts with the current state (e.g. a duplicate name).' },
  too_large: { status: 413, summary: 'The request body is over the size limit.' },
  unsupported_format: { status: 415, summary: 'The file or media type is not supported.' },
  invalid: { status: 422, summary: 'The content failed validation; details lists each problem.' },
  rate_limited: { status: 429, summary: 'Too many attempts; try again later.' },
  internal: { status: 500, summary: 'An unexpected error; it has been logged.' },
} as const satisfies Record<string, { status: number; summary: string }>;

export type ErrorCode = keyof typeof ERROR_CODES;

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly details?: unknown;
  constructor(code: ErrorCode, message: string, details?: unknown) {
    super(message);
    this.name = 'AppError';
    this.code = code;
    this.details = details;
  }
  get status(): number {
    return ERROR_CODES[this.code].status;
  }
}

export interface ErrorBody {
  error: { code: ErrorCode; message: string; details?: unknown };
}

/** The JSON body for an error, e.g. `errorBody('forbidden', 'Admins only')`. */
export function errorBody(code: ErrorCode, message: string, details?: unknown): ErrorBody {
  return { error: details === undefined ? { code, message } : { code, message, details } };
}
