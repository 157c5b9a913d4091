import { useRef, type ChangeEvent } from 'react';

import { Button } from '@/components/ui/button';
import type { CsvFilePickerProps } from './csv-file-picker';
import { HEAD_BYTES, headerCells } from './picked-log';

/** The browser's own file chooser behind one button; the header row is read at once for a preview. */
export function CsvFilePicker({ onPick, disabled }: CsvFilePickerProps) {
  const input = useRef<HTMLInputElement>(null);
  const onChange = async (e: ChangeEvent<HTMLInputElement>) => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    const head = await file.slice(0, HEAD_BYTES).text();
    onPick({ file, name: file.name, size: file.size, headers: headerCells(head) });
  };
  return (
    <>
      <input
        ref={input}
        type="file"
        accept=".csv,.tsv,.txt,text/csv,text/plain,text/tab-separated-values"
        data-testid="telemetry-file"
        aria-label="Vehicle log (CSV)"
        style={{ display: 'none' }}
        onChange={(e) => void onChange(e)}
      />
      <Button
        label="Choose the log…"
        tone="secondary"
        testID="telemetry-choose"
        disabled={disabled}
        onPress={() => input.current?.click()}
      />
    </>
  );
}
