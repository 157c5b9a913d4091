import { createContext, useCallback, useContext, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Text } from './text';

type Action = { label: string; run: () => void; testID?: string };
type Toast = { id: number; message: string; actions: Action[]; tone?: 'info' | 'danger' };
type Options = {
  action?: Action;
  /** Where a notice offers more than one action (e.g. Undo and Add details). */
  actions?: Action[];
  tone?: Toast['tone'];
  ms?: number;
  /**
   * Takes the notice away early once what it tells of is over (e.g. a kept entry was sent): it is
   * called with a function that closes the notice, and answers a function that stops listening.
   */
  until?: (close: () => void) => () => void;
};
type Show = (message: string, options?: Options) => void;

const ToastContext = createContext<Show | null>(null);
const ClearanceContext = createContext<((key: string, px: number) => void) | null>(null);

/** Short notices at the foot of the screen, with an action or two (usually "Undo"). */
export function ToastProvider({ children }: { children: ReactNode }) {
  const { colors } = useTheme();
  const [toast, setToast] = useState<Toast | null>(null);
  // What sits at the foot of the window (the phone's navigation, a screen's action bar), by owner.
  const [clearances, setClearances] = useState<Record<string, number>>({});
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const stop = useRef<(() => void) | undefined>(undefined);
  const next = useRef(1);
  const close = useCallback((id?: number) => {
    setToast((t) => (id === undefined || t?.id === id ? null : t));
  }, []);
  const show = useCallback<Show>(
    (message, options = {}) => {
      clearTimeout(timer.current);
      stop.current?.();
      stop.current = undefined;
      const id = next.current++;
      setToast({ id, message, actions: options.actions ?? (options.action ? [options.action] : []), tone: options.tone });
      timer.current = setTimeout(() => close(id), options.ms ?? 8000);
      if (options.until) stop.current = options.until(() => close(id));
    },
    [close],
  );
  // A notice that went (by time, by action or by being replaced) stops listening for its end.
  useEffect(() => {
    if (!toast) {
      stop.current?.();
      stop.current = undefined;
    }
  }, [toast]);
  useEffect(
    () => () => {
      clearTimeout(timer.current);
      stop.current?.();
    },
    [],
  );
  const setClearance = useCallback((key: string, px: number) => {
    setClearances((c) => (c[key] === px ? c : { ...c, [key]: px }));
  }, []);
  const bottom = useMemo(() => Object.values(clearances).reduce((sum, px) => sum + px, 0) + space.md, [clearances]);
  // Light text on the dark notice in the light theme and the other way round: the action is drawn in
  // the message's own colour, outlined, so it keeps the message's contrast (WCAG 2.1 AA asks 4.5:1).
  const fg = colors.bg;
  return (
    <ClearanceContext.Provider value={setClearance}>
      <ToastContext.Provider value={show}>
        {children}
        {toast ? (
          <View pointerEvents="box-none" style={[styles.wrap, { bottom }]}>
            <View
              role="status"
              aria-live="polite"
              testID="toast"
              style={[styles.toast, { backgroundColor: colors.text, borderColor: toast.tone === 'danger' ? colors.danger : colors.text }]}
            >
              <Text color={fg} style={styles.message}>
                {toast.message}
              </Text>
              {toast.actions.map((action) => (
                <Pressable
                  key={action.label}
                  accessibilityRole="button"
                  testID={action.testID ?? 'toast-action'}
                  onPress={() => {
                    action.run();
                    close(toast.id);
                  }}
                  style={({ pressed }) => [styles.action, { borderColor: fg, opacity: pressed ? 0.8 : 1 }]}
                >
                  <Text variant="label" color={fg}>
                    {action.label}
                  </Text>
                </Pressable>
              ))}
            </View>
          </View>
        ) : null}
      </ToastContext.Provider>
    </ClearanceContext.Provider>
  );
}

export function useToast(): Show {
  const show = useContext(ToastContext);
  if (!show) throw new Error('useToast outside ToastProvider');
  return show;
}

/**
 * Keeps notices above something fixed at the foot of the window (`px` high; 0 when it goes), so a
 * notice never covers the navigation or a screen's main button. `key` names what needs the room.
 */
export function useToastClearance(key: string, px: number) {
  const set = useContext(ClearanceContext);
  useEffect(() => {
    set?.(key, px);
    return () => set?.(key, 0);
  }, [key, px, set]);
}

const styles = StyleSheet.create({
  wrap: { position: 'absolute', left: 0, right: 0, alignItems: 'center', paddingHorizontal: space.lg },
  toast: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    columnGap: space.sm,
    rowGap: space.xs,
    borderRadius: radius.md,
    borderWidth: 1,
    paddingLeft: space.lg,
    paddingRight: space.sm,
    paddingVertical: space.xs,
    minHeight: 48,
    maxWidth: 560,
  },
  message: { flexShrink: 1, flexGrow: 1, paddingVertical: space.sm },
  action: {
    minHeight: 44,
    minWidth: 44,
    paddingHorizontal: space.md,
    borderRadius: radius.sm,
    borderWidth: 1,
    alignItems: 'center',
    justifyContent: 'center',
  },
});
