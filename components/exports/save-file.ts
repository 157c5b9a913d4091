import { Linking } from 'react-native';

import { apiUrl } from '@/hooks/api';

/** A native app hands the download to the system browser, which keeps the file. */
export function saveFile(path: string): void {
  void Linking.openURL(apiUrl(path));
}
