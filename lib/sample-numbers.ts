/**
 * Sample numbers in natural order: runs of digits compare as numbers, so S-2 comes before S-10
 * and a subsample S-10.2 after S-10; letters compare without regard to case.
 */
const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

export function compareSampleNumbers(a: string, b: string): number {
  return collator.compare(a, b);
}
