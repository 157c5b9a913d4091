import { createContext, useCallback, useContext, useEffect, useRef, useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { Button } from './button';
import { Text } from './text';

type Action = { label: string; run: () => void; testID?: string };
type Toast = { id: number; message: string; actions: Action[]; tone?: 'info' | 'danger' };
/** `action` is the usual one; `actions` where a notice offers more than one (e.g. Undo and Add details). */
type Show = (message: string, options?: { action?: Action; actions?: Action[]; tone?: Toast['tone']; ms?: number }) => void;

const ToastContext = createContext<Show | null>(null);

/** Short notices at the foot of the screen, with one action (usually "Undo"). */
export function ToastProvider({ children }: { children: ReactNode }) {
  const { colors } = useTheme();
  const [toast, setToast] = useState<Toast | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const next = useRef(1);
  const show = useCallback<Show>((message, options = {}) => {
    clearTimeout(timer.current);
    const id = next.current++;
    setToast({ id, message, actions: options.actions ?? (options.action ? [options.action] : []), tone: options.tone });
    timer.current = setTimeout(() => setToast((t) => (t?.id === id ? null : t)), options.ms ?? 8000);
  }, []);
  useEffect(() => () => clearTimeout(timer.current), []);
  return (
    <ToastContext.Provider value={show}>
      {children}
      {toast ? (
        <View pointerEvents="box-none" style={styles.wrap}>
          <View
            role="status"
            aria-live="polite"
            testID="toast"
            style={[styles.toast, { backgroundColor: colors.text, borderColor: toast.tone === 'danger' ? colors.danger : colors.text }]}
          >
            <Text color={colors.bg} style={styles.message}>
              {toast.message}
            </Text>
            {toast.actions.map((action) => (
              <Button
                key={action.label}
                label={action.label}
                tone="ghost"
                compact
                testID={action.testID ?? 'toast-action'}
                onPress={() => {
                  action.run();
                  setToast(null);
                }}
              />
            ))}
          </View>
        </View>
      ) : null}
    </ToastContext.Provider>
  );
}

export function useToast(): Show {
  const show = useContext(ToastContext);
  if (!show) throw new Error('useToast outside ToastProvider');
  return show;
}

const styles = StyleSheet.create({
  wrap: { position: 'absolute', left: 0, right: 0, bottom: 88, alignItems: 'center', paddingHorizontal: space.lg },
  toast: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.md,
    borderRadius: radius.md,
    borderWidth: 1,
    paddingLeft: space.lg,
    paddingRight: space.sm,
    minHeight: 48,
    maxWidth: 560,
  },
  message: { flexShrink: 1, paddingVertical: space.sm },
});
