import type { PhotoImageProps } from './photo-image-props';

/**
 * A real image element: the browser fetches it only when it comes near the screen (`lazy`), so
 * a long gallery on a thin link loads the thumbnails it shows and no more.
 */
export function PhotoImage({ uri, label, fit = 'cover', testID, onLoad }: PhotoImageProps) {
  return (
    <img
      src={uri}
      alt={label}
      loading="lazy"
      decoding="async"
      draggable={false}
      data-testid={testID}
      onLoad={onLoad}
      style={{ position: 'absolute', inset: 0, width: '100%', height: '100%', objectFit: fit, display: 'block' }}
    />
  );
}
