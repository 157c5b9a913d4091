/**
 * Makes the web's fonts: each TrueType font the app uses, cut to the characters Bathynote's
 * languages write and packed as WOFF2, beside its `.ttf` in assets/fonts/. The `.ttf` files stay
 * for the native builds (the expo-font config plugin embeds them); the web loads the `.woff2`.
 * A character outside the cut is drawn by the browser from the next font of the stack.
 * Run it again after changing a font: `node --import tsx scripts/fonts-woff2.ts`.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

import subsetFont from 'subset-font';

const fontsDir = path.resolve(__dirname, '..', 'assets', 'fonts');

/** The weights the design uses (lib/tokens.ts `fonts`). */
export const webFonts = ['PublicSans_400Regular', 'PublicSans_600SemiBold', 'PublicSans_700Bold', 'SpaceMono_400Regular'] as const;

/** Inclusive code point ranges kept: Latin with its accents, typographic punctuation and the units' signs. */
const RANGES: [number, number][] = [
  [0x20, 0x7e], // Basic Latin
  [0xa0, 0x17f], // Latin-1 Supplement and Latin Extended-A
  [0x2010, 0x2027], // dashes, quotes, bullet, ellipsis
  [0x2030, 0x203a], // per mille, primes, angle quotes
  [0x2070, 0x2089], // super- and subscript digits
  [0x20ac, 0x20ac], // euro sign
  [0x2190, 0x2193], // arrows
  [0x2212, 0x2212], // minus sign
  [0x2248, 0x2248], // almost equal
  [0x2264, 0x2265], // less and greater or equal
];

function characters(): string {
  let text = '';
  for (const [from, to] of RANGES) for (let c = from; c <= to; c++) text += String.fromCodePoint(c);
  return text;
}

async function main() {
  const text = characters();
  for (const name of webFonts) {
    const ttf = readFileSync(path.join(fontsDir, `${name}.ttf`));
    const woff2 = await subsetFont(ttf, text, { targetFormat: 'woff2', noHinting: true });
    writeFileSync(path.join(fontsDir, `${name}.woff2`), woff2);
    process.stdout.write(`${name}: ${ttf.length} bytes TrueType, ${woff2.length} bytes WOFF2\n`);
  }
}

if (require.main === module) {
  main().catch((err: unknown) => {
    process.stderr.write(`${(err as Error).message}\n`);
    process.exit(1);
  });
}
