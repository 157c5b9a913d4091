import { useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';

import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useQuickMarks } from '@/hooks/campaigns';
import { useLogEntry } from '@/hooks/send-queue';
import { useTheme } from '@/hooks/theme';
import type { QuickMark } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/**
 * One tap logs an entry now with the mark's kind and tags; the toast offers to complete it.
 * With the entry button, that is the two taps a thumb needs during a dive.
 */
export function QuickMarkBar({ diveId, campaignId }: { diveId: string; campaignId: string }) {
  const { colors } = useTheme();
  const router = useRouter();
  const toast = useToast();
  const marks = useQuickMarks(campaignId).data ?? [];
  const log = useLogEntry(diveId);
  const [busy, setBusy] = useState<string | null>(null);

  if (marks.length === 0) return null;

  const tap = async (mark: QuickMark) => {
    setBusy(mark.id);
    try {
      const result = await log({ kind: mark.kind, title: mark.label, tags: mark.tags, observedAt: new Date().toISOString() });
      if (result.queued) toast('No link: the entry is kept on this device and will be sent.', { tone: 'danger' });
      else {
        const id = result.observation.id;
        toast(`Logged “${mark.label}”`, { action: { label: 'Add details', run: () => router.push(`/observations/${id}/edit`) } });
      }
    } catch (err) {
      toast(err instanceof ApiError ? err.message : 'Could not log that.', { tone: 'danger' });
    } finally {
      setBusy(null);
    }
  };

  return (
    <View style={styles.wrap}>
      <Text variant="caption" muted>
        Quick marks: one tap logs now
      </Text>
      <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.row} testID="quick-marks">
        {marks.map((m) => (
          <Chip
            key={m.id}
            label={busy === m.id ? `${m.label}…` : m.label}
            color={colors.kind[m.kind]}
            onPress={() => void tap(m)}
            testID={`quick-mark-${m.label}`}
          />
        ))}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { gap: space.sm, paddingVertical: 2 },
});
