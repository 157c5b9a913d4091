import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';

import { isReturnPath } from '@/lib/return-path';
// Straight from the module, not the index of every schema: the sign-in screen loads this file.
import { meSchema, type Me } from '@/lib/schemas/core';
import { ApiError, request } from './api';
import { sessionKeys } from './query-keys';

export { sessionKeys };

/** The signed-in person, or null when nobody is signed in (a 401 is an answer, not an error). */
export const meQuery = queryOptions({
  queryKey: sessionKeys.me(),
  queryFn: async (): Promise<Me | null> => {
    try {
      const me = await request('/api/me', meSchema);
      openingAnswered(true);
      return me;
    } catch (err) {
      if (err instanceof ApiError && err.status === 401) {
        openingAnswered(false);
        return null;
      }
      throw err;
    }
  },
  staleTime: 60_000,
});

/**
 * The address the app was opened at, read when the app starts: the sign-in screen's own code
 * loads later (each route is a file of its own on the web), after the router has already moved a
 * signed-out person to it. It is kept to return to only if the first answer on who is signed in
 * says nobody: a person who signs out later and hands the screen over has nothing to return to.
 */
let opening: string | null = typeof window !== 'undefined' && window.location ? window.location.pathname + window.location.search : null;

let returnPath: string | null = null;

function openingAnswered(signedIn: boolean) {
  if (opening !== null && !signedIn && isReturnPath(opening)) returnPath = opening;
  opening = null;
}

/** The kept deep link, once. */
export function takeReturnPath(): string | null {
  const path = returnPath;
  returnPath = null;
  return path;
}

export function useMe() {
  return useQuery(meQuery);
}

const signInLinkAnswer = z.object({ ok: z.literal(true), message: z.string() });

/** "E-mail me a sign-in link": the same answer whether or not the address is a member's. */
export function useRequestSignInLink() {
  return useMutation({
    mutationFn: (email: string) => request('/api/auth/sign-in/magic-link', signInLinkAnswer, { body: { email } }),
  });
}

/** A first password, for a person who joined by an invitation link and has none yet. */
export function useSetFirstPassword() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (newPassword: string) => request('/api/me/password', z.undefined(), { body: { newPassword } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: sessionKeys.me() }),
  });
}

const signInResponse = z.object({ user: z.object({ id: z.string() }) }).loose();

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { email: string; password: string }) =>
      request('/api/auth/sign-in/email', signInResponse, { body: { ...input, rememberMe: true } }),
    onSuccess: async () => {
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.root[0] });
      await qc.invalidateQueries({ queryKey: sessionKeys.root });
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => request('/api/auth/sign-out', z.unknown(), { body: {} }),
    onSettled: () => {
      // `me` is set rather than cleared with the rest: the screens' guard watches that very query,
      // and a cleared cache would leave it watching a query that is gone (still signed in, to it).
      qc.setQueryData(sessionKeys.me(), null);
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.root[0] });
    },
  });
}
