import { Text } from '@/components/ui/text';

/** Native builds show the note's Markdown source as written; the web build renders it. */
export function NoteView({ markdown, testID }: { markdown: string; testID?: string }) {
  return <Text testID={testID}>{markdown}</Text>;
}
