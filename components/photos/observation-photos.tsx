import type { ObservationDetail } from '@/lib/schemas';

/** The photos of one entry, and adding more (for its author and the lead). */
export function ObservationPhotos(_props: { observation: ObservationDetail }) {
  return null;
}
