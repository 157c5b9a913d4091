/**
 * Work run one after another per key (a dive's imports, the mails to one address), each piece
 * starting once the one before it has ended, whether that one succeeded or failed.
 */
export function oneAtATimePerKey() {
  const tails = new Map<string, Promise<unknown>>();
  return async function run<T>(key: string, work: () => Promise<T>): Promise<T> {
    const before = (tails.get(key) ?? Promise.resolve()).catch(() => undefined);
    const mine = before.then(work);
    const tail = mine.catch(() => undefined);
    tails.set(key, tail);
    try {
      return await mine;
    } finally {
      if (tails.get(key) === tail) tails.delete(key);
    }
  };
}
