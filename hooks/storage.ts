/**
 * Small synchronous key-value storage for preferences and drafts: localStorage on the web,
 * memory elsewhere (and during the static render at build time, where there is no window).
 */
const memory = new Map<string, string>();

function local(): Storage | undefined {
  try {
    return typeof window !== 'undefined' && window.localStorage ? window.localStorage : undefined;
  } catch {
    // Some browsers throw on localStorage access in private modes; memory storage still works.
    return undefined;
  }
}

export const storage = {
  get(key: string): string | null {
    return local()?.getItem(key) ?? memory.get(key) ?? null;
  },
  set(key: string, value: string) {
    const ls = local();
    if (ls) {
      try {
        ls.setItem(key, value);
        return;
      } catch {
        // Quota exceeded: fall through to memory so the value is kept for this session at least.
      }
    }
    memory.set(key, value);
  },
  remove(key: string) {
    local()?.removeItem(key);
    memory.delete(key);
  },
};
