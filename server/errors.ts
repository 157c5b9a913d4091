import type { ApiErrorBody, ErrorCode } from '../lib/schemas';

type Issue = NonNullable<ApiErrorBody['error']['issues']>[number];

/** An error that already knows its status and its place in the contract's error shape. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly issues?: Issue[],
  ) {
    super(message);
  }

  toBody(): ApiErrorBody {
    return { error: { code: this.code, message: this.message, ...(this.issues ? { issues: this.issues } : {}) } };
  }
}

/** The body a handler writes itself (outside Express's error handler) in the contract's shape. */
export const errorBody = (code: ErrorCode, message: string): ApiErrorBody => ({ error: { code, message } });

export const notFound = (what = 'Not found') => new ApiError(404, 'not_found', what);
export const forbidden = (why: string) => new ApiError(403, 'forbidden', why);
export const unauthorized = () => new ApiError(401, 'unauthorized', 'Sign in to continue.');
export const conflict = (code: ErrorCode, why: string) => new ApiError(409, code, why);

/**
 * A 400 about one field that the schema alone could not judge (a tag of another campaign, phases
 * out of order). `summary` is the answer's message; `message` is the field's own issue.
 */
export const fieldError = (path: string, message: string, summary = 'Some fields are not valid.') =>
  new ApiError(400, 'validation_failed', summary, [{ path, message }]);
