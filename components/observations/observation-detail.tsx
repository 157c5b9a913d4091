import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { ObservationPhotos } from '@/components/photos/observation-photos';
import { TimecodeLabel } from '@/components/telemetry/timecode-label';
import { Button } from '@/components/ui/button';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useFollowDive } from '@/hooks/live';
import { useObservation, useRestoreObservation, useRetireEntry } from '@/hooks/observations';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { can } from '@/lib/permissions';
import { formatDepth, formatInZone, formatLatLon, formatTemperature, formatUtc } from '@/lib/format';
import { formatHeading } from '@/lib/heading';
import type { Observation, ObservationDetail as Detail } from '@/lib/schemas';
import { pressureFromDepth } from '@/lib/seawater';
import { radius, space } from '@/lib/tokens';
import { CustodyPanel, FindPanel } from './find-panel';
import { IdentificationPanel } from './identification-panel';
import { KindBadge } from './kind-badge';
import { NoteView } from './note-view';
import { RecordPanel, SamplePanel } from './record-panel';
import { RevisionHistory } from './revision-history';
import { TagLabel } from './tag-label';

const sourceLabel = (s: Observation['depthSource']) =>
  s === 'telemetry' ? 'from telemetry' : s === 'manual' ? 'typed in' : 'no telemetry';

export function ObservationDetail({ id }: { id: string }) {
  const observation = useObservation(id);
  // Opened from a link rather than over the dive's log, the entry still follows others' changes.
  useFollowDive(observation.data?.diveId);
  if (observation.isPending) return <LoadingState label="Loading the entry…" />;
  if (observation.isError) return <ErrorState error={observation.error} onRetry={() => void observation.refetch()} />;
  return <ObservationBody observation={observation.data} />;
}

function ObservationBody({ observation: o }: { observation: Detail }) {
  const { colors } = useTheme();
  const campaign = useCampaign(o.campaignId).data;
  const dive = useDive(o.diveId).data;
  const me = useMe().data;
  const role = campaign?.myRole;
  const mayEdit = can(role, 'entry.edit', { isAuthor: !!me && o.authorId === me.user.id });
  // The sea pressure at the entry's depth, for comparing with instruments that log pressure.
  const latitude = o.lat ?? campaign?.datumLat;
  const atDepth = o.depth !== null && latitude !== undefined ? pressureFromDepth(o.depth, latitude) : Number.NaN;
  const pressure = Number.isFinite(atDepth) ? atDepth : null;
  const facts: [string, string, string?][] = [
    ['Time (UTC)', formatUtc(o.observedAt, true)],
    ...(campaign && campaign.timeZone !== 'UTC'
      ? ([[`Local (${campaign.timeZone})`, formatInZone(o.observedAt, campaign.timeZone)]] as [string, string][])
      : []),
    ['Depth', formatDepth(o.depth), sourceLabel(o.depthSource)],
    ...(pressure !== null
      ? ([['Pressure', `≈ ${pressure.toFixed(1)} dbar`, 'from the depth (Saunders 1981)']] as [string, string, string][])
      : []),
    ['Position', formatLatLon(o.lat, o.lon), sourceLabel(o.positionSource)],
    ['Water temperature', formatTemperature(o.temperature), sourceLabel(o.temperatureSource)],
    ['Heading', formatHeading(o.heading), sourceLabel(o.headingSource)],
    ['Altitude', o.altitude === null ? '—' : `${o.altitude.toFixed(1)} m above the seabed`, sourceLabel(o.altitudeSource)],
    ...(o.sample
      ? ([
          [
            'Sample',
            [o.sample.sampleNumber, o.sample.sampleType, o.sample.gear, o.sample.preservation].filter(Boolean).join(' · '),
            [
              o.sample.parentSampleNumber ? `subsample of ${o.sample.parentSampleNumber}` : null,
              o.sample.container ? `stowed in ${o.sample.container}` : null,
              o.sample.lab ? `for ${o.sample.lab}` : null,
            ]
              .filter(Boolean)
              .join(', ') || undefined,
          ],
        ] as [string, string, string?][])
      : []),
  ];
  return (
    <View style={styles.wrap} testID="observation-detail">
      {o.retired ? (
        <View style={[styles.banner, { backgroundColor: colors.dangerBg }]} testID="retired-banner">
          <Text color={colors.danger}>This entry is retired: it is kept, but hidden from the dive log.</Text>
        </View>
      ) : null}
      <View style={styles.head}>
        <KindBadge kind={o.kind} />
        <Text variant="heading" testID="detail-title">
          {o.title}
        </Text>
        <Text variant="caption" muted>
          Logged by {o.authorName} · version {o.version}
          {o.findNumber ? ` · find ${o.findNumber}` : ''}
        </Text>
        {dive ? <TimecodeLabel dive={dive} observedAt={o.observedAt} /> : null}
      </View>
      {role && me ? <EntryActions observation={o} mayEdit={mayEdit} isLead={role === 'lead'} /> : null}
      <View style={[styles.facts, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        {facts.map(([label, value, source]) => (
          <View key={label} style={styles.fact}>
            <Text variant="caption" muted>
              {label}
            </Text>
            <Text variant="mono" testID={`fact-${label.split(' ')[0]!.toLowerCase()}`}>
              {value}
            </Text>
            {source && label !== 'Time (UTC)' ? (
              <Text variant="caption" muted testID={`source-${label.split(' ')[0]!.toLowerCase()}`}>
                {source}
              </Text>
            ) : null}
          </View>
        ))}
      </View>
      {o.tags.length > 0 ? (
        <View style={styles.tags} testID="detail-tags">
          {o.tags.map((t) => (
            <TagLabel key={t} name={t} />
          ))}
        </View>
      ) : null}
      <View style={[styles.note, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        {o.note.trim() ? <NoteView markdown={o.note} testID="detail-note" /> : <Text muted>No note yet.</Text>}
      </View>
      {o.kind === 'biology' ? <IdentificationPanel observation={o} myRole={role} myId={me?.user.id} /> : null}
      {o.kind === 'archaeology' ? <FindPanel observation={o} myRole={role} myId={me?.user.id} /> : null}
      <RecordPanel observation={o} myRole={role} myId={me?.user.id} />
      <SamplePanel observation={o} myRole={role} myId={me?.user.id} />
      <CustodyPanel observation={o} myRole={role} myId={me?.user.id} />
      <ObservationPhotos observation={o} />
      <RevisionHistory id={o.id} version={o.version} />
    </View>
  );
}

/** Edit and retire for the author and leads, retiring asked once more of everyone; restore for leads, who can also undo at once. */
function EntryActions({ observation: o, mayEdit, isLead }: { observation: Detail; mayEdit: boolean; isLead: boolean }) {
  const router = useRouter();
  const toast = useToast();
  const retire = useRetireEntry();
  const restore = useRestoreObservation(o.id);
  const [confirming, setConfirming] = useState(false);
  const fail = (err: unknown) => toast(err instanceof ApiError ? err.message : 'That did not work.', { tone: 'danger' });
  const doRetire = () =>
    retire.mutate(o.id, {
      onSuccess: () => {
        setConfirming(false);
        if (isLead) toast('Entry retired', { action: { label: 'Undo', run: () => restore.mutate(undefined, { onError: fail }) } });
        else toast('Entry retired. A lead can restore it.');
      },
      onError: fail,
    });
  if (o.retired) {
    return isLead ? (
      <View style={styles.actions}>
        <Button label="Restore" busy={restore.isPending} onPress={() => restore.mutate(undefined, { onError: fail })} testID="restore" />
      </View>
    ) : (
      <Reason text="Only a lead can restore a retired entry." />
    );
  }
  if (!mayEdit) return <Reason text="Only the author or a lead can edit or retire this entry." />;
  return (
    <View style={styles.actions}>
      <Button label="Edit" tone="secondary" compact onPress={() => router.push(`/observations/${o.id}/edit`)} testID="edit" />
      {confirming ? (
        <>
          <Text variant="caption">Retire it? It stays in the record, hidden from the dive log; a lead can bring it back.</Text>
          <Button label="Retire" tone="danger" compact busy={retire.isPending} onPress={doRetire} testID="confirm-retire" />
          <Button label="Keep" tone="ghost" compact onPress={() => setConfirming(false)} />
        </>
      ) : (
        <Button label="Retire" tone="ghost" compact onPress={() => setConfirming(true)} testID="retire" />
      )}
    </View>
  );
}

/** Why an action someone might look for is not offered to them. */
function Reason({ text }: { text: string }) {
  return (
    <Text variant="caption" muted testID="action-reason">
      {text}
    </Text>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  head: { gap: space.sm, alignItems: 'flex-start' },
  actions: { flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' },
  banner: { borderRadius: radius.md, padding: space.md },
  facts: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  fact: { minWidth: 160, gap: 2 },
  tags: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  note: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg },
});
