/**
 * Natural order for find and sample numbers: the digit runs compare as numbers, so "VS26-2"
 * comes before "VS26-10", and letters compare without regard to case.
 */
const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

export function naturalCompare(a: string, b: string): number {
  // Numbers equal as numbers ("VS26-02" and "VS26-2") or in case still need a fixed order.
  return collator.compare(a, b) || (a < b ? -1 : a > b ? 1 : 0);
}
