import { useRouter } from 'expo-router';
import { useCallback, useRef, useState } from 'react';
import { Pressable, ScrollView, StyleSheet, View, type TextInput } from 'react-native';

import { ObservationDetail } from '@/components/observations/observation-detail';
import { SplitPane } from '@/components/layout/split-pane';
import { GalleryLink } from '@/components/photos/gallery-link';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Icon } from '@/components/ui/icon';
import { Screen, ScreenHeader } from '@/components/ui/screen';
import { Segmented } from '@/components/ui/segmented';
import { EmptyState, ErrorState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToastClearance } from '@/components/ui/toast';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useKeyboardShortcuts } from '@/hooks/keyboard';
import { useLayout } from '@/hooks/layout';
import { useDiveLive } from '@/hooks/live';
import { useDiveLog, type DiveLogFilters } from '@/hooks/observations';
import { useSendQueueFlush } from '@/hooks/send-queue';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import { can } from '@/lib/permissions';
import type { Observation } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { ColumnMenu } from './column-menu';
import { DiveLog, READING_OFFSET } from './dive-log';
import { diveStatus } from './dive-list';
import { DivePhases } from './dive-phases';
import { LiveStatusBadge } from './live-status';
import { fitColumns, tableWidth, useLogColumns } from './log-columns';
import { LogFilters } from './log-filters';
import { matchesSearch } from './log-rows';
import { PhaseControls } from './phase-controls';
import { DivePlanForm } from './dive-plan-form';
import { QuickMarkBar } from './quick-mark-bar';
import { DiveWatch } from '@/components/watches/dive-watch';

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
  const [showColumns, setShowColumns] = useState(false);
  const [detailHidden, setDetailHidden] = useState(false);
  // Whether the detail pane has room beside the list (a table with many columns may leave none).
  const [detailFits, setDetailFits] = useState(true);
  const [barHeight, setBarHeight] = useState(0);
  const [listWidth, setListWidth] = useState(0);
  const columns = useLogColumns(useMe().data?.user.id);
  const [search, setSearch] = useState('');
  const searchBox = useRef<TextInput>(null);
  const scrollOffset = useRef(0);
  const live = useDiveLive(diveId, () => scrollOffset.current > READING_OFFSET);
  const sendWaiting = useSendQueueFlush();
  const items = (useDiveLog(diveId, filters).data?.pages.flatMap((p) => p.items) ?? []).filter((o) => matchesSearch(o, search));
  const role = campaign.data?.myRole;
  const phoneBar = navPlacement === 'bottom' && can(role, 'entry.create');
  useToastClearance('dive-actions', phoneBar ? barHeight : 0);
  const detailShown = splitView && !detailHidden && detailFits;
  const onFits = useCallback((fits: boolean) => setDetailFits(fits), []);
  // Quick marks log "now": once the vehicle is on deck, entries come from the video instead.
  const showMarks = !!dive.data && !dive.data.phases.onDeck && can(role, 'entry.create');
  // Beside the detail the list widens to the table; on its own (a tablet) the table keeps to the
  // columns that fit, and gives way to cards where even the usual ones do not.
  const shownColumns = splitView || listWidth === 0 ? columns.columns : fitColumns(columns.columns, listWidth);
  const tableFits = shownColumns !== null;
  const tableView = roomy && tableFits && view === 'table';

  const open = (o: Observation) => {
    if (detailShown) router.setParams({ entry: o.id });
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
      ...(detailShown
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
      {campaign.data ? <DiveWatch campaignId={dive.data.campaignId} timeZone={campaign.data.timeZone} /> : null}
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
      {/* The log's tools in one bar: filters, search, and on wider screens the table's columns and the view. */}
      <View style={styles.tools} testID="log-tools">
        <Button
          label={showFilters ? 'Hide filters' : 'Filter'}
          tone="ghost"
          compact
          onPress={() => setShowFilters((s) => !s)}
          testID="toggle-filters"
        />
        <View style={styles.search}>
          <Field
            ref={searchBox}
            label="Search this log"
            hideLabel
            testID="log-search"
            value={search}
            onChangeText={setSearch}
            placeholder={roomy ? 'Search titles and notes  ( / )' : 'Search titles and notes'}
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
        </View>
        {tableView ? (
          <Button
            label={showColumns ? 'Done with columns' : 'Columns'}
            tone="ghost"
            compact
            onPress={() => setShowColumns((s) => !s)}
            testID="toggle-columns"
          />
        ) : null}
        {/* With many table columns there is no room for the detail: an entry then opens on its own screen. */}
        {splitView && detailFits ? (
          <Button
            label={detailHidden ? 'Show detail' : 'Hide detail'}
            tone="ghost"
            compact
            onPress={() => setDetailHidden((h) => !h)}
            testID="toggle-detail"
          />
        ) : null}
        {roomy && tableFits ? (
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
        ) : null}
      </View>
      {tableView && showColumns ? <ColumnMenu chosen={columns.chosen} onToggle={columns.toggle} /> : null}
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
      view={tableView ? 'table' : 'cards'}
      columns={shownColumns ?? columns.columns}
      selectedId={detailShown ? entryId : undefined}
      onSelect={open}
      live={live}
      onScrollOffset={(y) => {
        scrollOffset.current = y;
      }}
      onRetryWaiting={() => void sendWaiting()}
      header={header}
    />
  );

  // Quick marks stay in reach above the list on wider screens (on phones, in the bar under it).
  const list = (
    <View style={styles.fill} onLayout={(e) => setListWidth(Math.round(e.nativeEvent.layout.width))}>
      {showMarks && !phoneBar && dive.data ? (
        <View style={[styles.marksAbove, { borderBottomColor: colors.border }]}>
          <QuickMarkBar diveId={diveId} campaignId={dive.data.campaignId} />
        </View>
      ) : null}
      {log}
    </View>
  );

  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number}` : 'Dive'}
        subtitle={[campaign.data?.name, dive.data ? diveStatus(dive.data) : null].filter(Boolean).join(' · ')}
        back={dive.data ? `/campaigns/${dive.data.campaignId}` : '/'}
        backLabel="Campaign"
        status={<LiveStatusBadge status={live.status} ended={!!dive.data?.phases.onDeck} />}
        right={
          <>
            <GalleryLink diveId={diveId} />
            <Button
              label="Summary"
              tone="secondary"
              compact
              testID="dive-summary"
              onPress={() => router.push(`/dives/${diveId}/summary`)}
            />
            <Button label="Taxa" tone="secondary" compact testID="dive-taxa" onPress={() => router.push(`/dives/${diveId}/taxa`)} />
            {can(role, 'dive.run') ? (
              <Button
                label="Dive settings"
                tone="secondary"
                compact
                accessibilityRole="link"
                testID="dive-settings"
                onPress={() => router.push(`/dives/${diveId}/settings`)}
              />
            ) : null}
            {navPlacement === 'side' ? <Button label="Log entry" icon="+" testID="new-observation" onPress={newEntry} /> : null}
          </>
        }
      />
      {splitView ? (
        <SplitPane
          storageKey="bathynote.dive-split"
          minList={tableView ? tableWidth(columns.columns) : 560}
          collapsed={detailHidden}
          onFits={onFits}
          list={list}
          detail={
            <ScrollView style={styles.fill} testID="detail-pane" contentContainerStyle={styles.detailInner}>
              {entryId ? (
                <ObservationDetail id={entryId} />
              ) : (
                <EmptyState
                  title="Select an entry"
                  body="Its note, position, identification and history show here. Keys: N new entry · / search · J / K next and previous · E edit · F filters · Esc close."
                />
              )}
            </ScrollView>
          }
        />
      ) : (
        list
      )}
      {phoneBar ? (
        // Under the list, not over it: the entry button and the quick marks never cover an entry.
        <View
          style={[styles.actionBar, { backgroundColor: colors.surface, borderTopColor: colors.border }]}
          onLayout={(e) => setBarHeight(Math.round(e.nativeEvent.layout.height))}
          testID="dive-action-bar"
        >
          {showMarks && dive.data ? (
            <>
              <View style={styles.fill}>
                <QuickMarkBar diveId={diveId} campaignId={dive.data.campaignId} maxHeight={104} />
              </View>
              <Pressable
                testID="new-observation"
                accessibilityRole="button"
                accessibilityLabel="Log entry"
                onPress={newEntry}
                style={[styles.fab, { backgroundColor: colors.accent }]}
              >
                <Icon name="plus" color={colors.accentText} size={28} />
              </Pressable>
            </>
          ) : (
            // No quick marks (the dive is on deck): the bar is the entry button, with its words.
            <Button label="Log entry" icon="+" testID="new-observation" onPress={newEntry} style={styles.fill} />
          )}
        </View>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1, minWidth: 0 },
  plan: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  planText: { flexShrink: 1 },
  listHeader: { gap: space.sm, marginBottom: space.md, padding: 0 },
  tools: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  search: { flexGrow: 1, flexShrink: 1, flexBasis: 200, minWidth: 0 },
  marksAbove: { paddingHorizontal: space.lg, paddingVertical: space.sm, borderBottomWidth: StyleSheet.hairlineWidth },
  detailInner: { padding: space.xl, maxWidth: 880 },
  actionBar: {
    flexDirection: 'row',
    alignItems: 'flex-end',
    gap: space.md,
    paddingHorizontal: space.lg,
    paddingVertical: space.sm,
    borderTopWidth: StyleSheet.hairlineWidth,
  },
  fab: {
    width: 56,
    height: 56,
    borderRadius: radius.pill,
    alignItems: 'center',
    justifyContent: 'center',
  },
});
