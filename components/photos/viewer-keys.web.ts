import { useEffect, useRef } from 'react';

/** ← and → step through the photos, Esc closes the viewer (not while typing in a field). */
export function useViewerKeys(handlers: { onPrevious: () => void; onNext: () => void; onClose: () => void }, active: boolean) {
  const latest = useRef(handlers);
  useEffect(() => {
    latest.current = handlers;
  });
  useEffect(() => {
    if (!active) return;
    const onKey = (e: KeyboardEvent) => {
      const target = e.target as HTMLElement | null;
      if (target && (target.tagName === 'INPUT' || target.tagName === 'TEXTAREA' || target.isContentEditable)) return;
      if (e.key === 'ArrowLeft') latest.current.onPrevious();
      else if (e.key === 'ArrowRight') latest.current.onNext();
      else if (e.key === 'Escape') latest.current.onClose();
      else return;
      e.preventDefault();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [active]);
}
