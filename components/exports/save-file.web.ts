import { apiUrl } from '@/hooks/api';

/**
 * The browser fetches the file itself (with the session cookie, same origin) and saves it under
 * the name the server gives, so a large export streams to disk instead of through the page.
 */
export function saveFile(path: string): void {
  const link = document.createElement('a');
  link.href = apiUrl(path);
  link.download = '';
  link.rel = 'noopener';
  document.body.appendChild(link);
  link.click();
  link.remove();
}
