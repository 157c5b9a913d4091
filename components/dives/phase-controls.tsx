import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useSetPhase } from '@/hooks/dives';
import type { Dive } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { phaseSteps } from '@/lib/dive-phases';

/** For the pilot and the lead: mark the next dive phase now, with undo. */
export function PhaseControls({ dive }: { dive: Dive }) {
  const setPhase = useSetPhase(dive.id);
  const toast = useToast();
  const next = phaseSteps.find((s) => !dive.phases[s.key]);
  if (!next) return null;
  const mark = () =>
    setPhase.mutate(
      { phase: next.phase },
      {
        onSuccess: () =>
          toast(`${next.label} marked`, { action: { label: 'Undo', run: () => setPhase.mutate({ phase: next.phase, at: null }) } }),
        onError: (err) => toast(err instanceof ApiError ? err.message : 'Could not mark the phase.', { tone: 'danger' }),
      },
    );
  return (
    <View style={styles.row}>
      <Button
        label={`Mark “${next.label}” now`}
        tone="secondary"
        compact
        busy={setPhase.isPending}
        onPress={mark}
        testID={`phase-${next.phase}`}
      />
    </View>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', gap: space.sm } });
