import { useCallback, useEffect, useRef, useState } from 'react';

import { storage } from './storage';

/**
 * Form state that survives a reload: kept in storage under `key` as it is typed (debounced),
 * restored on the next visit, cleared once the form is sent.
 */
export function useDraft<T extends object>(key: string, initial: () => T) {
  const [restored] = useState(() => {
    const raw = storage.get(key);
    if (!raw) return undefined;
    try {
      return JSON.parse(raw) as T;
    } catch {
      storage.remove(key);
      return undefined;
    }
  });
  const [value, setValue] = useState<T>(() => ({ ...initial(), ...restored }));
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const dirty = useRef(false);

  useEffect(() => {
    if (!dirty.current) return;
    clearTimeout(timer.current);
    timer.current = setTimeout(() => storage.set(key, JSON.stringify(value)), 300);
    return () => clearTimeout(timer.current);
  }, [key, value]);

  const update = useCallback((patch: Partial<T>) => {
    dirty.current = true;
    setValue((v) => ({ ...v, ...patch }));
  }, []);

  const clear = useCallback(() => {
    clearTimeout(timer.current);
    dirty.current = false;
    storage.remove(key);
    setValue(initial());
    // `initial` is a factory for a fresh form; a new identity each render must not re-run this.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);

  return { value, update, clear, wasRestored: restored !== undefined };
}
