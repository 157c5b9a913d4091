import type { ReactNode } from 'react';

import type { PickedFile } from '@/hooks/photo-upload';

/** Devices have no files to drop; the web build accepts them (drop-zone.web.tsx). */
export function DropZone({ children }: { children: ReactNode; onFiles: (files: PickedFile[]) => void; enabled: boolean }) {
  return <>{children}</>;
}
