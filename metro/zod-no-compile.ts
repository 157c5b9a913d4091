// What the web bundle gets for zod's ahead-of-time compiler (`z.compile`): its names, not the
// compiler. Nothing in the app opts into it, zod checks every answer without it, and it weighed
// as much as the rest of zod's object checks. The names stay so zod's own re-exports resolve.
export const INVALID = Symbol.for('zod.compile.invalid');
export class ZodCompileAsyncError extends Error {}
export class ZodCompileUnsupportedError extends Error {}
const unavailable = (): never => {
  throw new Error('z.compile is not part of the web bundle.');
};
export const compile = unavailable;
export const withParser = unavailable;
export const compileFn = unavailable;
