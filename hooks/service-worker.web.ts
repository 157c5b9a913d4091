/**
 * The service worker (`/sw.js`, written by the web build) keeps the app shell so the app opens
 * with no link. Registered once the page has loaded, so its own downloads never compete with the
 * first screen's; not in development, where the bundler serves files that change under it.
 */
export function registerServiceWorker(): void {
  if (__DEV__ || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
  const register = () => {
    navigator.serviceWorker.register('/sw.js').catch((err: unknown) => {
      // Without it the app still works online; only the reload without a link is lost.
      console.warn('The offline copy of the app could not be set up:', err);
    });
  };
  if (document.readyState === 'complete') register();
  else window.addEventListener('load', register, { once: true });
}
