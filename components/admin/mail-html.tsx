import { Text } from '@/components/ui/text';

/** Native builds have no sandboxed frame to render a mail in, so they show its plain text. */
export function MailHtml({ text, testID }: { html: string; text: string; testID?: string }) {
  return (
    <Text variant="monoSmall" testID={testID} selectable>
      {text}
    </Text>
  );
}
