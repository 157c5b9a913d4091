import type { PaperSize } from './paper';

/** Printing is the browser's: native builds have no print stylesheet. */
export function PrintStyle(_props: { paper: PaperSize; rootTestID: string }) {
  return null;
}
