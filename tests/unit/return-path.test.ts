import { describe, expect, it } from 'vitest';

import { isReturnPath } from '@/lib/return-path';

// What leaves a site is from the WHATWG URL Standard (a leading "//" is a scheme-relative URL, and
// special schemes read "\" as "/"), and the OWASP Unvalidated Redirects and Forwards Cheat Sheet.
describe('a path to return to after signing in', () => {
  it.each(['/dives/abc', '/observations/x/edit', '/campaigns/c?welcome=1', '/account'])('takes %j', (path) => {
    expect(isReturnPath(path)).toBe(true);
  });

  it.each(['//elsewhere.example/', '/\\elsewhere.example', '/a\\b', 'https://elsewhere.example/', 'dives/abc', '/', '/sign-in', '', null])(
    'refuses %j',
    (path) => {
      expect(isReturnPath(path)).toBe(false);
    },
  );
});
