/**
 * Whether a path may be returned to after signing in: a path of this site only. It starts with one
 * slash and has no second one after it nor any backslash (browsers read "\" as "/"), so
 * "//elsewhere.example" or "/\elsewhere.example" cannot send anyone to another site; the sign-in
 * screen and the start page are not worth returning to.
 */
export function isReturnPath(path: string | null | undefined): path is string {
  return !!path && /^\/(?!\/)/.test(path) && !path.includes('\\') && path !== '/' && !/^\/sign-in(?:[/?#]|$)/.test(path);
}
