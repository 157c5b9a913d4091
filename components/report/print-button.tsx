import { Platform } from 'react-native';

import { Button } from '@/components/ui/button';

/** The browser's own print dialog, which also saves as PDF. Absent where there is no browser. */
export function PrintButton() {
  if (Platform.OS !== 'web') return null;
  return (
    <Button
      label="Print or save as PDF"
      testID="report-print"
      onPress={() => {
        // The static render has no window; the button only acts in a browser.
        if (typeof window !== 'undefined') window.print();
      }}
    />
  );
}
