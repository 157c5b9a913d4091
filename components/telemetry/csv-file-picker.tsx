import { Text } from '@/components/ui/text';
import type { PickedLog } from './picked-log';

export type CsvFilePickerProps = { onPick: (log: PickedLog) => void; disabled?: boolean };

/** This build has no document picker: logs are imported from the web app. */
export function CsvFilePicker(_props: CsvFilePickerProps) {
  return (
    <Text variant="caption" muted>
      Import the vehicle log from the web app on the ship’s network; this app cannot open files yet.
    </Text>
  );
}
