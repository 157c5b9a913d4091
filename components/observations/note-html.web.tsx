import DOMPurify from 'dompurify';
import { useMemo } from 'react';

import { useTheme } from '@/hooks/theme';
import { createNoteRenderer } from '@/lib/notes';
import { fonts } from '@/lib/tokens';

let renderer: ReturnType<typeof createNoteRenderer> | undefined;

/** The browser's instance of the one note pipeline (marked, then DOMPurify). */
function noteRenderer() {
  if (!renderer && typeof window !== 'undefined') renderer = createNoteRenderer(DOMPurify(window));
  return renderer;
}

/** A note rendered from Markdown; the HTML is sanitized before it reaches the page. */
export default function NoteHtml({ markdown, testID }: { markdown: string; testID?: string }) {
  const { colors } = useTheme();
  const html = useMemo(() => noteRenderer()?.toHtml(markdown) ?? '', [markdown]);
  const css = `
    .bn-note { font-family: ${fonts.regular}, system-ui, sans-serif; color: ${colors.text}; font-size: 15px; line-height: 1.5; overflow-wrap: anywhere; }
    .bn-note > :first-child { margin-top: 0; } .bn-note > :last-child { margin-bottom: 0; }
    .bn-note a { color: ${colors.accent}; }
    .bn-note code, .bn-note pre { font-family: ${fonts.mono}, monospace; background: ${colors.surfaceAlt}; border-radius: 4px; }
    .bn-note code { padding: 0 3px; } .bn-note pre { padding: 8px; overflow-x: auto; }
    .bn-note blockquote { border-left: 3px solid ${colors.border}; margin-left: 0; padding-left: 12px; color: ${colors.textMuted}; }
    .bn-note table { border-collapse: collapse; } .bn-note th, .bn-note td { border: 1px solid ${colors.border}; padding: 4px 8px; }
    .bn-note img { max-width: 100%; }
  `;
  return (
    <>
      <style>{css}</style>
      <div className="bn-note" data-testid={testID} dangerouslySetInnerHTML={{ __html: html }} />
    </>
  );
}
