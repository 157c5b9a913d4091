/** Devices step with the on-screen buttons; the web build also listens to the keyboard. */
export function useViewerKeys(_handlers: { onPrevious: () => void; onNext: () => void; onClose: () => void }, _active: boolean) {}
