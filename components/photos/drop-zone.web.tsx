import { useEffect, useState, type DragEvent, type ReactNode } from 'react';

import type { PickedFile } from '@/hooks/photo-upload';
import { useTheme } from '@/hooks/theme';
import { radius } from '@/lib/tokens';
import { pickedFromFiles } from './pick-photos';

const carriesFiles = (e: DragEvent) => Array.from(e.dataTransfer.types).includes('Files');

/** Photos dragged in from the desktop land in the entry's upload queue. */
export function DropZone({
  children,
  onFiles,
  enabled,
}: {
  children: ReactNode;
  onFiles: (files: PickedFile[]) => void;
  enabled: boolean;
}) {
  const { colors } = useTheme();
  const [over, setOver] = useState(false);
  useEffect(() => {
    if (!enabled) return;
    // A photo dropped just beside the zone would make the browser open it in place of the app,
    // and a half-written entry with it; while a zone is on screen, stray file drops do nothing.
    const ignoreStray = (e: globalThis.DragEvent) => {
      if (e.dataTransfer && Array.from(e.dataTransfer.types).includes('Files')) e.preventDefault();
    };
    window.addEventListener('dragover', ignoreStray);
    window.addEventListener('drop', ignoreStray);
    return () => {
      window.removeEventListener('dragover', ignoreStray);
      window.removeEventListener('drop', ignoreStray);
    };
  }, [enabled]);
  if (!enabled) return <>{children}</>;
  // Both dragenter and dragover must be cancelled for the zone to count as a drop target
  // (HTML drag-and-drop model); otherwise a browser may send the drop to the page instead.
  const accept = (e: DragEvent) => {
    if (!carriesFiles(e)) return;
    e.preventDefault();
    e.dataTransfer.dropEffect = 'copy';
    setOver(true);
  };
  return (
    <div
      data-testid="photo-drop-zone"
      onDragEnter={accept}
      onDragOver={accept}
      onDragLeave={(e) => {
        // Moving onto a button or text inside the zone is not leaving it.
        if (e.relatedTarget instanceof Node && e.currentTarget.contains(e.relatedTarget)) return;
        setOver(false);
      }}
      onDrop={(e) => {
        if (!carriesFiles(e)) return;
        e.preventDefault();
        setOver(false);
        const files = pickedFromFiles(Array.from(e.dataTransfer.files));
        if (files.length > 0) onFiles(files);
      }}
      style={{
        borderRadius: radius.lg,
        outline: over ? `2px dashed ${colors.accent}` : '2px dashed transparent',
        outlineOffset: 4,
        display: 'flex',
        flexDirection: 'column',
      }}
    >
      {children}
    </div>
  );
}
