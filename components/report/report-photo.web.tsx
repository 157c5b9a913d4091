import { apiUrl } from '@/hooks/api';
import type { Photo } from '@/lib/schemas';

/**
 * An entry's photo in the report: a plain image loaded at once (not lazily, unlike the gallery),
 * since printing lays out the whole report and a lazy image off screen would print blank.
 */
export function ReportPhoto({ photo, label }: { photo: Photo; label: string }) {
  return (
    <img
      src={apiUrl(photo.urls.display)}
      alt={label}
      width={photo.width}
      height={photo.height}
      data-testid="report-photo"
      style={{ width: 240, maxWidth: '100%', height: 'auto', display: 'block' }}
    />
  );
}
