import { createContext, useCallback, useContext, useMemo, useState, type ReactNode } from 'react';
import { useColorScheme } from 'react-native';

import { palettes, type Palette } from '@/lib/tokens';
import { storage } from './storage';

export type ThemePreference = 'system' | 'light' | 'dark';

type ThemeValue = {
  scheme: 'light' | 'dark';
  colors: Palette;
  preference: ThemePreference;
  setPreference: (p: ThemePreference) => void;
};

const ThemeContext = createContext<ThemeValue | null>(null);
const KEY = 'bathynote.theme';

function readPreference(): ThemePreference {
  const v = storage.get(KEY);
  return v === 'light' || v === 'dark' ? v : 'system';
}

export function ThemeProvider({ children }: { children: ReactNode }) {
  const system = useColorScheme();
  const [preference, setPref] = useState<ThemePreference>(readPreference);
  const setPreference = useCallback((p: ThemePreference) => {
    storage.set(KEY, p);
    setPref(p);
  }, []);
  const scheme = preference === 'system' ? (system === 'light' ? 'light' : 'dark') : preference;
  const value = useMemo(() => ({ scheme, colors: palettes[scheme], preference, setPreference }), [scheme, preference, setPreference]);
  return <ThemeContext.Provider value={value}>{children}</ThemeContext.Provider>;
}

export function useTheme(): ThemeValue {
  const v = useContext(ThemeContext);
  if (!v) throw new Error('useTheme outside ThemeProvider');
  return v;
}

/**
 * Holds a part of the screen to one scheme whatever the reader chose: the printable report is
 * always light, so it reads like the paper it prints on.
 */
export function FixedScheme({ scheme, children }: { scheme: 'light' | 'dark'; children: ReactNode }) {
  const outer = useTheme();
  const value = useMemo(() => ({ ...outer, scheme, colors: palettes[scheme] }), [outer, scheme]);
  return <ThemeContext.Provider value={value}>{children}</ThemeContext.Provider>;
}
