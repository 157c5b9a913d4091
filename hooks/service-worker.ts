/** iOS and Android carry the app with them: there is no shell to keep (the web's is in service-worker.web.ts). */
export function registerServiceWorker(): void {}
