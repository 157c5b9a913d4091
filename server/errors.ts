import type { ApiErrorBody } from '../lib/schemas';

type Issue = NonNullable<ApiErrorBody['error']['issues']>[number];

/** An error that already knows its status and its place in the contract's error shape. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly issues?: Issue[],
  ) {
    super(message);
  }

  toBody(): ApiErrorBody {
    return { error: { code: this.code, message: this.message, ...(this.issues ? { issues: this.issues } : {}) } };
  }
}

export const notFound = (what = 'Not found') => new ApiError(404, 'not_found', what);
export const forbidden = (why: string) => new ApiError(403, 'forbidden', why);
export const unauthorized = () => new ApiError(401, 'unauthorized', 'Sign in to continue.');
export const conflict = (code: string, why: string) => new ApiError(409, code, why);
