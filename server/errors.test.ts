import { z } from 'zod';
import { describe, expect, it } from 'vitest';
import { ERROR_CODES, errorBodySchema } from '../shared/errors';
import {
  AccountDisabledError,
  ConflictError,
  CsrfError,
  ForbiddenError,
  httpError,
  InvalidCredentialsError,
  InvalidTokenError,
  isDatabaseUnavailable,
  NotFoundError,
  PayloadTooLargeError,
  RateLimitedError,
  STATUS_OF_CODE,
  UnauthenticatedError,
  UnavailableError,
  ValidationError,
  validationErrorFromZod,
  zodDetails,
} from './errors';

describe('error mapping', () => {
  it('gives every code one HTTP status', () => {
    expect(Object.keys(STATUS_OF_CODE).sort()).toEqual([...ERROR_CODES].sort());
  });

  it.each([
    [new ValidationError('bad'), 400, 'VALIDATION'],
    [new InvalidTokenError('bad link'), 400, 'INVALID_TOKEN'],
    [new UnauthenticatedError(), 401, 'UNAUTHENTICATED'],
    [new InvalidCredentialsError(), 401, 'INVALID_CREDENTIALS'],
    [new ForbiddenError('no'), 403, 'FORBIDDEN'],
    [new CsrfError(), 403, 'CSRF'],
    [new AccountDisabledError(), 403, 'ACCOUNT_DISABLED'],
    [new NotFoundError('gone'), 404, 'NOT_FOUND'],
    [new ConflictError('twice'), 409, 'CONFLICT'],
    [new PayloadTooLargeError('big'), 413, 'PAYLOAD_TOO_LARGE'],
    [new RateLimitedError('slow down'), 429, 'RATE_LIMITED'],
    [new UnavailableError(), 503, 'UNAVAILABLE'],
  ] as const)('%s → %i %s', (err, status, code) => {
    const r = httpError(err);
    expect(r.status).toBe(status);
    expect(r.body.error.code).toBe(code);
    expect(r.body.error.message).toBe(err.message);
    expect(errorBodySchema.safeParse(r.body).success).toBe(true);
  });

  it('the wrong-credentials message names neither part', () => {
    expect(new InvalidCredentialsError().message).toBe('E-mail or password is wrong');
  });

  it('keeps details and leaves them out when there are none', () => {
    expect(httpError(new ValidationError('bad', [{ path: 'email', message: 'Required' }])).body).toEqual({
      error: { code: 'VALIDATION', message: 'bad', details: [{ path: 'email', message: 'Required' }] },
    });
    expect('details' in httpError(new NotFoundError('gone')).body.error).toBe(false);
  });

  it('maps anything else to a 500 that does not leak the internal message', () => {
    const r = httpError(new Error('relation "secret_table" does not exist'));
    expect(r.status).toBe(500);
    expect(r.body.error).toEqual({ code: 'INTERNAL', message: 'Something went wrong on the server' });
  });

  it('maps an unreachable database (also when wrapped by drizzle as `cause`) to 503', () => {
    const refused = Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), { code: 'ECONNREFUSED' });
    expect(httpError(refused).status).toBe(503);
    expect(httpError(new Error('Failed query: select 1', { cause: refused })).status).toBe(503);
    expect(httpError(new Error('Connection terminated unexpectedly')).status).toBe(503);
    expect(httpError(Object.assign(new Error('the database system is shutting down'), { code: '57P03' })).body.error.code).toBe('UNAVAILABLE');
    expect(isDatabaseUnavailable(new Error('syntax error'))).toBe(false);
  });

  it('maps integrity violations: unique/foreign key → 409, check → 400', () => {
    const pgErr = (code: string) => new Error('Failed query', { cause: Object.assign(new Error('violation'), { code, constraint: 'areas_code_unique' }) });
    expect(httpError(pgErr('23505')).status).toBe(409);
    expect(httpError(pgErr('23503')).status).toBe(409);
    expect(httpError(pgErr('23514')).status).toBe(400);
  });
});

describe('zod issues → details', () => {
  const schema = z.object({ email: z.string({ error: 'E-mail is required' }).email(), n: z.number({ error: 'n must be a number' }), inner: z.object({ k: z.string().min(2) }) }).strict();

  it('names each field by its dotted path; a missing field reads "Required"; unknown keys are named one by one', () => {
    const input = { email: 'not-an-email', inner: { k: 'x' }, extra: 1, other: 2 };
    const r = schema.safeParse(input);
    expect(r.success).toBe(false);
    const details = zodDetails(r.error!, input);
    expect(details.map((d) => d.path).sort()).toEqual(['email', 'extra', 'inner.k', 'n', 'other']);
    expect(details.find((d) => d.path === 'n')!.message).toBe('Required');
    expect(details.find((d) => d.path === 'extra')!.message).toBe('Unknown field');
  });

  it('a present but wrong-typed value keeps the schema message', () => {
    const input = { email: 'a@b.example', n: 'seven', inner: { k: 'xy' } };
    const err = validationErrorFromZod(schema.safeParse(input).error!, input);
    expect(err.code).toBe('VALIDATION');
    expect(err.message).toBe('Invalid input: n');
    expect(err.details).toEqual([{ path: 'n', message: 'n must be a number' }]);
  });
});
