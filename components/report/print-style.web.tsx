import { useEffect } from 'react';

import { PAGE_BREAK, type PaperSize } from './paper';

const PATH = 'bn-print-path';

/**
 * The report's print stylesheet. The app's frame (navigation, title bar, the report's own
 * controls, the depth profile's view switch and pointer read-out) is hidden; every element
 * between the page and the report is taken out of the screen's fixed-height scrolling layout, so
 * the whole report flows onto as many pages as it needs rather than the one screenful the scroll
 * view shows; sections start on a new page; colours are the light ones whatever the theme; the
 * paper size sets `@page`.
 */
export function PrintStyle({ paper, rootTestID }: { paper: PaperSize; rootTestID: string }) {
  useEffect(() => {
    const root = document.querySelector(`[data-testid="${rootTestID}"]`);
    const marked: Element[] = [];
    for (let el = root?.parentElement; el && el !== document.documentElement; el = el.parentElement) {
      el.classList.add(PATH);
      marked.push(el);
    }
    return () => marked.forEach((el) => el.classList.remove(PATH));
  });

  const css = `
@page { size: ${paper === 'A4' ? 'A4' : 'letter'} portrait; margin: 15mm; }
@media print {
  html, body, #root { height: auto !important; overflow: visible !important; background: #ffffff !important; }
  .${PATH} {
    display: block !important; position: static !important; overflow: visible !important;
    height: auto !important; min-height: 0 !important; max-height: none !important;
    transform: none !important; background: #ffffff !important; padding: 0 !important; margin: 0 !important;
  }
  .${PATH} > :not(.${PATH}):not([data-testid="${rootTestID}"]) { display: none !important; }
  [data-testid="${rootTestID}"] { width: 100% !important; max-width: none !important; padding: 0 !important; border: none !important; }
  [data-testid="report-depth-profile"], [data-testid="report-site-plan"] { break-inside: avoid; page-break-inside: avoid; }
  [data-testid="report-controls"] { display: none !important; }
  [data-testid="${rootTestID}"] div:has(> [data-testid="profile-view"]), [data-testid="${rootTestID}"] [data-testid="profile-readout"] { display: none !important; }
  [data-testid="${PAGE_BREAK}"] { display: block !important; break-before: page; page-break-before: always; }
  [data-testid="report-entry"], [data-testid="report-row"], svg { break-inside: avoid; page-break-inside: avoid; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}`;
  return <style data-testid="report-print-style">{css}</style>;
}
