import { useEffect, useRef } from 'react';

/**
 * Single-key shortcuts for wide screens (on the web). Keys typed into a field are left alone,
 * and so are keys pressed with Ctrl, Alt or Cmd, which belong to the browser.
 */
export function useKeyboardShortcuts(shortcuts: Record<string, () => void>, enabled = true) {
  const current = useRef(shortcuts);
  useEffect(() => {
    current.current = shortcuts;
  });
  useEffect(() => {
    if (!enabled || typeof window === 'undefined') return;
    const onKey = (e: KeyboardEvent) => {
      if (e.ctrlKey || e.metaKey || e.altKey) return;
      const target = e.target as HTMLElement | null;
      if (target && (target.isContentEditable || /^(INPUT|TEXTAREA|SELECT)$/.test(target.tagName))) return;
      const run = current.current[e.key];
      if (run) {
        e.preventDefault();
        run();
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [enabled]);
}
