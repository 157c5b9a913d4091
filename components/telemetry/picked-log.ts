/** A log the reader picked, with its header row read ahead so the columns show before the upload. */
export type PickedLog = { file: Blob; name: string; size: number; headers: string[] };

/** How many bytes of a picked file are read to find its header row. */
export const HEAD_BYTES = 64 * 1024;

/**
 * The header cells of a log from its first bytes: the first line that is neither empty nor a
 * "#" comment, split on whichever of comma, semicolon and tab it holds most of.
 */
export function headerCells(head: string): string[] {
  const line = head
    .replace(/^\uFEFF/, '')
    .split(/\r\n|\n|\r/)
    .find((l) => l.trim() !== '' && !l.startsWith('#'));
  if (!line) return [];
  const delimiter = [',', ';', '\t'].reduce((best, d) => (line.split(d).length > line.split(best).length ? d : best), ',');
  const cells: string[] = [];
  let cell = '';
  let quoted = false;
  for (const c of line) {
    if (c === '"') quoted = !quoted;
    else if (c === delimiter && !quoted) {
      cells.push(cell.trim());
      cell = '';
    } else cell += c;
  }
  cells.push(cell.trim());
  return cells;
}
