import { useRouter } from 'expo-router';
import { useRef, useState } from 'react';
import { Pressable, ScrollView, StyleSheet, View, type TextInput } from 'react-native';

import { ObservationDetail } from '@/components/observations/observation-detail';
import { GalleryLink } from '@/components/photos/gallery-link';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Icon } from '@/components/ui/icon';
import { Screen, ScreenHeader } from '@/components/ui/screen';
import { Segmented } from '@/components/ui/segmented';
import { EmptyState, ErrorState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useKeyboardShortcuts } from '@/hooks/keyboard';
import { useLayout } from '@/hooks/layout';
import { useDiveLive } from '@/hooks/live';
import { useDiveLog, type DiveLogFilters } from '@/hooks/observations';
import { useSendQueueFlush } from '@/hooks/send-queue';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import { can } from '@/lib/permissions';
import type { Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { DiveLog, READING_OFFSET } from './dive-log';
import { diveStatus } from './dive-list';
import { DivePhases } from './dive-phases';
import { LiveStatusBadge } from './live-status';
import { LogFilters } from './log-filters';
import { matchesSearch } from './log-rows';
import { PhaseControls } from './phase-controls';
import { DivePlanForm } from './dive-plan-form';
import { QuickMarkBar } from './quick-mark-bar';

/** A dive: its phases and its live log, with the selected entry beside the list on wide screens. */
export function DiveScreen({ diveId, entryId }: { diveId: string; entryId?: string }) {
  const router = useRouter();
  const { colors } = useTheme();
  const { splitView, navPlacement, breakpoint } = useLayout();
  // From tablet width up there is room for the table, and likely a keyboard.
  const roomy = breakpoint !== 'phone';
  const dive = useDive(diveId);
  const campaign = useCampaign(dive.data?.campaignId);
  const [filters, setFilters] = useState<DiveLogFilters>({});
  const [showFilters, setShowFilters] = useState(false);
  const [editingPlan, setEditingPlan] = useState(false);
  const [view, setView] = useState<'cards' | 'table'>('cards');
  const [search, setSearch] = useState('');
  const searchBox = useRef<TextInput>(null);
  const scrollOffset = useRef(0);
  const live = useDiveLive(diveId, () => scrollOffset.current > READING_OFFSET);
  const sendWaiting = useSendQueueFlush();
  const items = (useDiveLog(diveId, filters).data?.pages.flatMap((p) => p.items) ?? []).filter((o) => matchesSearch(o, search));
  const role = campaign.data?.myRole;

  const open = (o: Observation) => {
    if (splitView) router.setParams({ entry: o.id });
    else router.push(`/observations/${o.id}`);
  };
  const newEntry = () => router.push(`/dives/${diveId}/new`);
  const step = (by: number) => {
    if (items.length === 0) return;
    const at = items.findIndex((o) => o.id === entryId);
    const next = items[Math.min(items.length - 1, Math.max(0, at < 0 ? 0 : at + by))];
    if (next) router.setParams({ entry: next.id });
  };
  // Stepping through entries needs the detail beside the list (without it the arrow keys scroll,
  // as usual); the others work wherever a keyboard might be.
  useKeyboardShortcuts(
    {
      n: newEntry,
      f: () => setShowFilters((s) => !s),
      '/': () => searchBox.current?.focus(),
      ...(splitView
        ? {
            j: () => step(1),
            ArrowDown: () => step(1),
            k: () => step(-1),
            ArrowUp: () => step(-1),
            e: () => entryId && router.push(`/observations/${entryId}/edit`),
            Escape: () => router.setParams({ entry: undefined }),
          }
        : {}),
    },
    roomy,
  );

  if (dive.isError) {
    return (
      <Screen>
        <ScreenHeader title="Dive" back="/" />
        <ErrorState error={dive.error} onRetry={() => void dive.refetch()} />
      </Screen>
    );
  }

  const header = dive.data ? (
    <View style={styles.listHeader}>
      <DivePhases dive={dive.data} />
      {dive.data.phases.onDeck ? (
        <Text variant="label" testID="dive-ended">
          Dive ended {formatUtcTime(dive.data.phases.onDeck).replace(/:\d\dZ$/, '')} UTC — logging from video
        </Text>
      ) : null}
      {can(role, 'dive.run') ? <PhaseControls dive={dive.data} /> : null}
      {editingPlan ? (
        <DivePlanForm
          campaignId={dive.data.campaignId}
          dive={dive.data}
          onDone={() => setEditingPlan(false)}
          onCancel={() => setEditingPlan(false)}
        />
      ) : (
        <View style={styles.plan}>
          {dive.data.objectives ? (
            <Text variant="caption" muted style={styles.planText}>
              {dive.data.objectives}
            </Text>
          ) : null}
          {can(role, 'dive.plan') ? (
            <Button label="Edit plan" tone="ghost" compact onPress={() => setEditingPlan(true)} testID="edit-dive-plan" />
          ) : null}
        </View>
      )}
      {can(role, 'entry.create') ? <QuickMarkBar diveId={diveId} campaignId={dive.data.campaignId} /> : null}
      <View style={styles.tools}>
        <Button
          label={showFilters ? 'Hide filters' : 'Filter'}
          tone="ghost"
          compact
          onPress={() => setShowFilters((s) => !s)}
          testID="toggle-filters"
        />
        {roomy ? (
          <View style={styles.viewSwitch}>
            <Segmented
              label="View"
              hideLabel
              value={view}
              onChange={setView}
              options={[
                { value: 'cards', label: 'Cards' },
                { value: 'table', label: 'Table' },
              ]}
              testID="log-view"
            />
          </View>
        ) : null}
      </View>
      <Field
        ref={searchBox}
        label="Search this log"
        testID="log-search"
        value={search}
        onChangeText={setSearch}
        placeholder={roomy ? 'Title or note contains…  ( / )' : 'Title or note contains…'}
        autoCapitalize="none"
        autoCorrect={false}
        inputMode="search"
        onKeyPress={(e) => {
          if ((e.nativeEvent as { key?: string }).key === 'Escape') {
            setSearch('');
            searchBox.current?.blur();
          }
        }}
      />
      {showFilters ? (
        <LogFilters campaignId={dive.data.campaignId} filters={filters} onChange={setFilters} isLead={can(role, 'entry.seeRetired')} />
      ) : null}
    </View>
  ) : undefined;

  const log = (
    <DiveLog
      diveId={diveId}
      filters={filters}
      search={search}
      phases={dive.data?.phases}
      recording={dive.data?.recording}
      timing={dive.data}
      onFiltersChange={setFilters}
      view={roomy ? view : 'cards'}
      selectedId={splitView ? entryId : undefined}
      onSelect={open}
      live={live}
      onScrollOffset={(y) => {
        scrollOffset.current = y;
      }}
      onRetryWaiting={() => void sendWaiting()}
      header={header}
    />
  );

  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number}` : 'Dive'}
        subtitle={[campaign.data?.name, dive.data ? diveStatus(dive.data) : null].filter(Boolean).join(' · ')}
        back={dive.data ? `/campaigns/${dive.data.campaignId}` : '/'}
        right={
          <View style={styles.actions}>
            <LiveStatusBadge status={live.status} ended={!!dive.data?.phases.onDeck} />
            <GalleryLink diveId={diveId} />
            <Button
              label="Summary"
              tone="secondary"
              compact
              testID="dive-summary"
              onPress={() => router.push(`/dives/${diveId}/summary`)}
            />
            {navPlacement === 'side' ? <Button label="Log entry" icon="+" testID="new-observation" onPress={newEntry} /> : null}
          </View>
        }
      />
      {splitView ? (
        <View style={styles.split}>
          <View style={[styles.listPane, { borderRightColor: colors.border }]}>{log}</View>
          <ScrollView style={styles.detailPane} testID="detail-pane" contentContainerStyle={styles.detailInner}>
            {entryId ? (
              <ObservationDetail id={entryId} />
            ) : (
              <EmptyState
                title="Select an entry"
                body="Its note, position, identification and history show here. Keys: N new entry · / search · J / K next and previous · E edit · F filters · Esc close."
              />
            )}
          </ScrollView>
        </View>
      ) : (
        log
      )}
      {navPlacement === 'bottom' ? (
        <Pressable
          testID="new-observation"
          accessibilityRole="button"
          accessibilityLabel="Log entry"
          onPress={newEntry}
          style={[styles.fab, { backgroundColor: colors.accent }]}
        >
          <Icon name="plus" color={colors.accentText} size={28} />
        </Pressable>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  plan: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  planText: { flexShrink: 1 },
  listHeader: { gap: space.sm, marginBottom: space.md, padding: 0 },
  tools: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm },
  viewSwitch: { minWidth: 200 },
  actions: { flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap', justifyContent: 'flex-end' },
  split: { flex: 1, flexDirection: 'row' },
  listPane: { width: 520, borderRightWidth: StyleSheet.hairlineWidth },
  detailPane: { flex: 1 },
  detailInner: { padding: space.xl, maxWidth: 880 },
  fab: {
    position: 'absolute',
    right: space.lg,
    bottom: space.lg,
    width: 60,
    height: 60,
    borderRadius: 30,
    alignItems: 'center',
    justifyContent: 'center',
    elevation: 4,
    shadowColor: '#000',
    shadowOpacity: 0.3,
    shadowRadius: 6,
    shadowOffset: { width: 0, height: 2 },
  },
});
