import { useRef, useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';

import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useQuickMarks } from '@/hooks/campaigns';
import { useRetireEntry } from '@/hooks/observations';
import { discardWaiting, onceLeftQueue, useLogEntry } from '@/hooks/send-queue';
import { useTheme } from '@/hooks/theme';
import type { QuickMark } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** A second tap of the same mark this soon after the first is the same tap (a double tap), not a second entry. */
export const DOUBLE_TAP_MS = 600;
/** Taps of the same mark while its notice is still up count together ("Coral ×2"). */
const RUN_MS = 8000;

type LastTap = { markId: string; at: number; count: number } | null;

const clock = () => Date.now();

/** Which tap in a row of the same mark this one is, or null when it only repeats a tap just made (a double tap). */
export function tapCount(last: LastTap, markId: string, now: number): number | null {
  const prev = last?.markId === markId ? last : null;
  if (prev && now - prev.at < DOUBLE_TAP_MS) return null;
  return prev && now - prev.at < RUN_MS ? prev.count + 1 : 1;
}

/**
 * One tap logs an entry now with the mark's kind and tags; the toast offers to undo it or complete
 * it. With the entry button, that is the two taps a thumb needs during a dive. Each logged tap
 * sends its own `clientRef`, so a send retried over a dropping link is still stored once.
 */
export function QuickMarkBar({ diveId, campaignId, maxHeight }: { diveId: string; campaignId: string; maxHeight?: number }) {
  const { colors } = useTheme();
  const router = useRouter();
  const toast = useToast();
  const marks = useQuickMarks(campaignId).data ?? [];
  const log = useLogEntry(diveId);
  const retire = useRetireEntry();
  const [busy, setBusy] = useState<string | null>(null);
  // The last tap that logged, and how many in a row of the same mark.
  const last = useRef<LastTap>(null);
  const [boxHeight, setBoxHeight] = useState(0);
  const [contentHeight, setContentHeight] = useState(0);

  if (marks.length === 0) return null;

  const tap = async (mark: QuickMark) => {
    const now = clock();
    const count = tapCount(last.current, mark.id, now);
    if (count === null) return;
    last.current = { markId: mark.id, at: now, count };
    const name = count > 1 ? `${mark.label} ×${count}` : `${mark.label} logged`;
    setBusy(mark.id);
    try {
      const result = await log({ kind: mark.kind, title: mark.label, tags: mark.tags, observedAt: new Date(now).toISOString() });
      const undone = () => {
        if (last.current?.markId === mark.id) last.current = { ...last.current, count: last.current.count - 1 };
      };
      if (result.queued) {
        toast(`${name}: no link, kept on this device and sent later.`, {
          tone: 'danger',
          until: (close) => onceLeftQueue(result.clientRef, close),
          actions: [
            {
              label: 'Undo',
              testID: 'toast-undo',
              run: () => {
                discardWaiting(result.clientRef);
                undone();
              },
            },
          ],
        });
      } else {
        const id = result.observation.id;
        toast(name, {
          actions: [
            {
              label: 'Undo',
              testID: 'toast-undo',
              run: () => {
                retire.mutate(id, { onError: (err) => toast(err.message, { tone: 'danger' }) });
                undone();
              },
            },
            { label: 'Add details', testID: 'toast-action', run: () => router.push(`/observations/${id}/edit`) },
          ],
        });
      }
    } catch (err) {
      last.current = null;
      toast(err instanceof ApiError ? err.message : 'Could not log that.', { tone: 'danger' });
    } finally {
      setBusy(null);
    }
  };

  const scrolls = contentHeight > boxHeight + 1;
  return (
    <View style={styles.wrap}>
      <Text variant="caption" muted>
        Quick marks: one tap logs now
      </Text>
      {/* The marks wrap, so every one is in sight; past a few rows they scroll, and say so. */}
      <ScrollView
        style={maxHeight ? { maxHeight } : undefined}
        onLayout={(e) => setBoxHeight(e.nativeEvent.layout.height)}
        onContentSizeChange={(_w, h) => setContentHeight(h)}
        contentContainerStyle={styles.row}
        testID="quick-marks"
      >
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
      {scrolls ? (
        <Text variant="caption" muted testID="quick-marks-more">
          More marks below: scroll them ↓
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, paddingVertical: 2 },
});
