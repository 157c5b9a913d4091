/** The paper a report is printed on; A4 unless the reader picks US Letter. */
export type PaperSize = 'A4' | 'Letter';

export const paperSizes: { value: PaperSize; label: string }[] = [
  { value: 'A4', label: 'A4' },
  { value: 'Letter', label: 'US Letter' },
];

/**
 * The report's column on screen, in CSS pixels: no wider than the printable width of either paper
 * with 15 mm margins (A4: 180 mm, about 680 px; Letter: 186 mm, about 702 px), so the plots drawn
 * for the screen fit the page as they are.
 */
export const REPORT_WIDTH = 680;

/** An empty mark before a section; the print stylesheet starts a new page there. */
export const PAGE_BREAK = 'report-page-break';
