// Errors are classes with a literal `code`; this file is the ONE place that maps a code to an
// HTTP status and turns anything thrown into the body { error: { code, message, details? } }.
import type { ErrorCode, ErrorBody, ErrorDetail } from '../shared/errors';
import { z } from 'zod';

export const STATUS_OF_CODE: Record<ErrorCode, number> = {
  VALIDATION: 400,
  INVALID_TOKEN: 400,
  UNAUTHENTICATED: 401,
  INVALID_CREDENTIALS: 401,
  FORBIDDEN: 403,
  CSRF: 403,
  ACCOUNT_DISABLED: 403,
  NOT_FOUND: 404,
  CONFLICT: 409,
  PAYLOAD_TOO_LARGE: 413,
  BAD_FILE: 400,
  UNMAPPED_COLUMNS: 400,
  DUPLICATE: 409,
  RATE_LIMITED: 429,
  INTERNAL: 500,
  UNAVAILABLE: 503,
};

export abstract class AppError extends Error {
  abstract readonly code: ErrorCode;
  readonly details?: ErrorDetail[];
  constructor(message: string, details?: ErrorDetail[]) {
    super(message);
    this.name = new.target.name;
    if (details) this.details = details;
  }
}

export class ValidationError extends AppError {
  readonly code = 'VALIDATION' as const;
}
export class InvalidTokenError extends AppError {
  readonly code = 'INVALID_TOKEN' as const;
}
export class UnauthenticatedError extends AppError {
  readonly code = 'UNAUTHENTICATED' as const;
  constructor(message = 'Sign in first') {
    super(message);
  }
}
export class InvalidCredentialsError extends AppError {
  readonly code = 'INVALID_CREDENTIALS' as const;
  /** Deliberately the same whichever of e-mail and password was wrong. */
  constructor() {
    super('E-mail or password is wrong');
  }
}
export class ForbiddenError extends AppError {
  readonly code = 'FORBIDDEN' as const;
}
export class CsrfError extends AppError {
  readonly code = 'CSRF' as const;
  constructor(message = 'Missing or wrong CSRF token: fetch GET /api/auth/csrf and send it in the x-csrf-token header') {
    super(message);
  }
}
export class AccountDisabledError extends AppError {
  readonly code = 'ACCOUNT_DISABLED' as const;
  constructor() {
    super('This account is disabled; ask an administrator');
  }
}
export class NotFoundError extends AppError {
  readonly code = 'NOT_FOUND' as const;
}
export class ConflictError extends AppError {
  readonly code = 'CONFLICT' as const;
}
export class PayloadTooLargeError extends AppError {
  readonly code = 'PAYLOAD_TOO_LARGE' as const;
}
export class RateLimitedError extends AppError {
  readonly code = 'RATE_LIMITED' as const;
}
export class InternalError extends AppError {
  readonly code = 'INTERNAL' as const;
}
export class UnavailableError extends AppError {
  readonly code = 'UNAVAILABLE' as const;
  constructor(message = 'A backing service is unavailable; try again shortly') {
    super(message);
  }
}

/** zod issues → one detail per offending field; `input` lets "missing" read as "Required". */
export function zodDetails(error: z.ZodError, input?: unknown): ErrorDetail[] {
  const out: ErrorDetail[] = [];
  for (const issue of error.issues) {
    const base = issue.path.map(String);
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) out.push({ path: [...base, key].join('.'), message: 'Unknown field' });
      continue;
    }
    let message = issue.message;
    if (issue.code === 'invalid_type' && input !== undefined && valueAt(input, issue.path) === undefined) {
      message = 'Required';
    }
    out.push({ path: base.join('.'), message });
  }
  return out;
}

function valueAt(input: unknown, path: PropertyKey[]): unknown {
  let v: unknown = input;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[k];
  }
  return v;
}

/** One 400 for all the wrong fields; the message lists them, the details say what is wrong. */
export function validationError(details: ErrorDetail[]): ValidationError {
  const fields = [...new Set(details.map((d) => d.path || '(body)'))];
  return new ValidationError(`Invalid input: ${fields.join(', ')}`, details);
}

export function validationErrorFromZod(error: z.ZodError, input?: unknown): ValidationError {
  return validationError(zodDetails(error, input));
}

// ---------------------------------------------------------------- PostgreSQL errors

/** SQLSTATE classes/codes that mean "the database is not reachable right now". */
const PG_UNAVAILABLE = new Set(['57P01', '57P02', '57P03', '53300', '08000', '08001', '08003', '08004', '08006']);
const NET_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EHOSTUNREACH', 'EAI_AGAIN']);

export function isDatabaseUnavailable(err: unknown): boolean {
  for (let e: unknown = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && (PG_UNAVAILABLE.has(code) || NET_CODES.has(code))) return true;
    const msg = e instanceof Error ? e.message : '';
    if (
      /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error|the database system is (starting up|shutting down)|Connection refused/i.test(
        msg,
      )
    ) {
      return true;
    }
    if (e instanceof AggregateError && e.errors.some((x) => isDatabaseUnavailable(x))) return true;
  }
  return false;
}

/** The pg error (drizzle wraps it in `cause`) with its SQLSTATE, if any. */
export function pgErrorOf(err: unknown): { code: string; constraint?: string; detail?: string } | null {
  for (let e: unknown = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && /^[0-9A-Z]{5}$/.test(code)) {
      const { constraint, detail } = e as { constraint?: string; detail?: string };
      return { code, constraint, detail };
    }
  }
  return null;
}

/** Unknown thrown values → an AppError (database outages → UNAVAILABLE, the rest → INTERNAL). */
export function toAppError(err: unknown): AppError {
  if (err instanceof AppError) return err;
  if (isDatabaseUnavailable(err)) return new UnavailableError('The database is unavailable; try again shortly');
  const pgErr = pgErrorOf(err);
  if (pgErr?.code === '23505') return new ConflictError('That already exists', constraintDetails(pgErr));
  if (pgErr?.code === '23503') {
    return new ConflictError('It is still referenced by other records (or refers to one that does not exist)', constraintDetails(pgErr));
  }
  if (pgErr?.code === '23514') return new ValidationError('A value breaks a rule of the data model', constraintDetails(pgErr));
  return new InternalError('Something went wrong on the server');
}

function constraintDetails(p: { constraint?: string; detail?: string }): ErrorDetail[] | undefined {
  return p.constraint ? [{ path: '', message: `${p.constraint}${p.detail ? `: ${p.detail}` : ''}` }] : undefined;
}

export function errorBody(err: AppError): ErrorBody {
  return {
    error: { code: err.code, message: err.message, ...(err.details && err.details.length ? { details: err.details } : {}) },
  };
}

export function httpError(err: unknown): { status: number; body: ErrorBody; appError: AppError } {
  const appError = toAppError(err);
  return { status: STATUS_OF_CODE[appError.code], body: errorBody(appError), appError };
}
