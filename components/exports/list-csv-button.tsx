import { useLocalSearchParams } from 'expo-router';
import { StyleSheet } from 'react-native';

import { Button } from '@/components/ui/button';
import { listCsvPath } from '@/hooks/exports';
import type { DiveLogFilters } from '@/hooks/observations';
import { saveFile } from './save-file';

/** On a dive log's filters: the list as it is filtered and ordered, as CSV. Retired entries are never exported. */
export function ListCsvButton({ campaignId, filters }: { campaignId: string; filters: DiveLogFilters }) {
  const { diveId } = useLocalSearchParams<{ diveId?: string }>();
  if (filters.retired) return null;
  const { kind, tag, author, hasPhotos, verification, sort, order } = filters;
  return (
    <Button
      label="Download this list as CSV"
      tone="secondary"
      compact
      testID="log-download-csv"
      style={styles.button}
      onPress={() => saveFile(listCsvPath(campaignId, { diveId, kind, tag, author, hasPhotos, verification, sort, order }))}
    />
  );
}

const styles = StyleSheet.create({ button: { alignSelf: 'flex-start' } });
