import { lazy, Suspense } from 'react';

/**
 * The Markdown pipeline (marked and DOMPurify) comes in its own file the first time a note is
 * shown, so the screens that show none (sign-in, the dive log) do not carry it over a slow link.
 */
const NoteHtml = lazy(() => import('./note-html.web'));

/** A note rendered from Markdown; the HTML is sanitized before it reaches the page. */
export function NoteView({ markdown, testID }: { markdown: string; testID?: string }) {
  return (
    <Suspense fallback={null}>
      <NoteHtml markdown={markdown} testID={testID} />
    </Suspense>
  );
}
