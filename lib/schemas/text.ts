/**
 * Text as people type it, cleaned at the contract's edge so that what is stored, shown, exported
 * and mailed can be trusted: Unicode NFC, no control characters (NUL, BEL, escape sequences), and
 * in one-line fields no line breaks and no bidirectional overrides or isolates, which can make
 * "invoice\u202Egpj.exe" read as a different name than it is (Unicode Technical Report 36, §2.1).
 */
import { z } from 'zod';

/** C0 and C1 controls and DEL, line breaks and tab included. */
// eslint-disable-next-line no-control-regex -- finding control characters is this pattern's job
const CONTROLS = /[\u0000-\u001f\u007f-\u009f]/g;
/** Controls other than tab and line feed (a note's carriage returns become line feeds first). */
// eslint-disable-next-line no-control-regex -- finding control characters is this pattern's job
const CONTROLS_BUT_TAB_AND_LF = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g;
/** Line breaks of any convention, Unicode's line and paragraph separators, and tab. */
const BREAKS = /\r\n|[\r\n\t\u2028\u2029]/g;
/** Embeddings and overrides (U+202A–U+202E) and isolates (U+2066–U+2069). */
const BIDI_CONTROLS = /[\u202a-\u202e\u2066-\u2069]/g;
/** Space and characters that draw nothing (zero-width space, joiners, BOM, soft hyphen…). */
const INVISIBLE_EDGES = /^[\s\p{Default_Ignorable_Code_Point}]+|[\s\p{Default_Ignorable_Code_Point}]+$/gu;

export function cleanOneLine(text: string): string {
  return text.normalize('NFC').replace(BREAKS, ' ').replace(CONTROLS, '').replace(BIDI_CONTROLS, '').replace(INVISIBLE_EDGES, '');
}

export function cleanMultiLine(text: string): string {
  return text.normalize('NFC').replace(/\r\n?/g, '\n').replace(CONTROLS_BUT_TAB_AND_LF, '');
}

/**
 * A one-line field (a title, a name, a label): cleaned as above and trimmed of invisible
 * characters, so a `.min(1)` after it refuses one that holds nothing visible.
 */
export const oneLine = () => z.string().overwrite(cleanOneLine);

/** A field that keeps its line breaks (a note): NFC, CR LF as LF, other controls removed. */
export const multiLine = () => z.string().overwrite(cleanMultiLine);
