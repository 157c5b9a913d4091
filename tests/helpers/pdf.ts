/** Reading a printed PDF back with poppler's command-line tools. */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

const bin = (name: string) => `/usr/bin/${name}`;

export const POPPLER_HINT = 'pdftotext and pdfinfo are needed: install them with `sudo apt-get install -y poppler-utils`.';

export function assertPoppler(): void {
  for (const tool of ['pdftotext', 'pdfinfo', 'pdfimages']) {
    if (!existsSync(bin(tool))) throw new Error(`${POPPLER_HINT} (looked for ${bin(tool)})`);
  }
}

/** The PDF's text in reading order, with runs of white space made one space. */
export function pdfText(file: string): string {
  return execFileSync(bin('pdftotext'), ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

/** The text of each page, split where pdftotext puts a form feed. */
export function pdfPageTexts(file: string): string[] {
  return execFileSync(bin('pdftotext'), [file, '-'], { encoding: 'utf8' })
    .split('\f')
    .map((p) => p.replace(/\s+/g, ' ').trim());
}

/** Page count and the first page's size in points, as pdfinfo reports them. */
export function pdfInfo(file: string): { pages: number; widthPt: number; heightPt: number } {
  const out = execFileSync(bin('pdfinfo'), [file], { encoding: 'utf8' });
  const pages = /^Pages:\s+(\d+)/m.exec(out);
  const size = /^Page size:\s+([\d.]+) x ([\d.]+) pts/m.exec(out);
  if (!pages || !size) throw new Error(`pdfinfo gave no page count or size:\n${out}`);
  return { pages: Number(pages[1]), widthPt: Number(size[1]), heightPt: Number(size[2]) };
}

/** How many images the PDF holds (pdfimages -list prints two header lines, then one line each). */
export function pdfImageCount(file: string): number {
  const out = execFileSync(bin('pdfimages'), ['-list', file], { encoding: 'utf8' });
  return Math.max(0, out.trim().split('\n').length - 2);
}
