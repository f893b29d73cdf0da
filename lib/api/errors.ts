/**
 * One table of error codes for the whole API. Each code has one HTTP status; routes throw
 * `new AppError('not_found', 'Project not found')` and the route wrapper answers
 * `{"error":{"code":"not_found","message":"Project not found"}}` with status 404.
 */
export const ERROR_CODES = {
  bad_json: { status: 400, summary: 'The request body is not valid JSON.' },
  bad_request: { status: 400, summary: 'The request is malformed.' },
  bad_parameter: { status: 400, summary: 'A query or path parameter has a value the route does not take; the message names it and lists the values it does.' },
  unauthenticated: { status: 401, summary: 'Not signed in, or the API token is missing, malformed, revoked or expired.' },
  forbidden: { status: 403, summary: 'Signed in, but the role does not allow this.' },
  not_found: { status: 404, summary: 'The object does not exist or is not visible to your organisation.' },
  conflict: { status: 409, summary: 'The request conflicts with the current state (e.g. a duplicate name).' },
  too_large: { status: 413, summary: 'The request body is over the size limit.' },
  unsupported_format: { status: 415, summary: 'The file or media type is not supported.' },
  invalid: { status: 422, summary: 'The content failed validation; details lists each problem.' },
  empty_range: { status: 422, summary: 'The range left out of matching holds no fix of the upload; the message gives the fixes\' own span.' },
  // upload content (lib/ingest): one code per way a file can be refused
  empty_file: { status: 422, summary: 'The file is empty.' },
  unknown_format: { status: 415, summary: 'The content is not a format Trenchbook reads; the message lists those it does.' },
  malformed: { status: 422, summary: 'The file is malformed or truncated; the message says where.' },
  unsafe_xml: { status: 422, summary: 'The XML declares a DOCTYPE or entities, which are refused.' },
  unsafe_zip: { status: 422, summary: 'A zip entry has an absolute or parent-directory path.' },
  zip_limits: { status: 413, summary: 'The zip inflates beyond the size or entry-count limit.' },
  missing_parts: { status: 422, summary: 'A shapefile set lacks its .shp, .shx or .dbf.' },
  crs_required: { status: 422, summary: 'The coordinate system is unknown; send its EPSG code in the crs field.' },
  unknown_crs: { status: 422, summary: 'The EPSG code is not in the coordinate system catalogue.' },
  out_of_range: { status: 422, summary: 'Coordinates are out of range (latitude beyond ±90, longitude beyond ±180).' },
  swapped_axes: { status: 422, summary: 'Latitude/longitude or easting/northing look swapped.' },
  too_few_points: { status: 422, summary: 'No track or line has the two points a line needs.' },
  // photos (issue 14): a photo must be placed
  position_required: { status: 422, summary: 'The photo has no GPS position of its own and none was given; details name the fields to fill.' },
  // handover packages (issue 16)
  nothing_to_package: { status: 422, summary: 'No current, approved section lies in the chosen scope of the handover package.' },
  range_not_satisfiable: { status: 416, summary: 'The Range header asks for bytes outside the file; Content-Range gives its size.' },
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
