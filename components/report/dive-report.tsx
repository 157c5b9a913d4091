import { StyleSheet, View } from 'react-native';

import { kindLabels } from '@/components/observations/kind-badge';
import { DepthProfile } from '@/components/telemetry/depth-profile';
import { DiveStatsGrid } from '@/components/telemetry/dive-stats';
import { SitePlan } from '@/components/telemetry/site-plan';
import { Text } from '@/components/ui/text';
import { useTelemetry } from '@/hooks/telemetry';
import { useTheme } from '@/hooks/theme';
import { phaseLabels } from '@/lib/dive-phases';
import { formatDepth, formatInZone } from '@/lib/format';
import type { DiveReportPart } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { REPORT_WIDTH } from './paper';
import { ReportPhoto } from './report-photo';
import { Fact, ReportSection } from './report-section';

/** The plots' width: the report's column less the card's padding. */
const PLOT_HEIGHT = 260;

function Plots({ part }: { part: DiveReportPart }) {
  const samples = useTelemetry(part.dive.id);
  if (samples.isError) return <Text muted>The telemetry log could not be read for the plots.</Text>;
  if (!samples.data) return <Text muted>Loading the telemetry log…</Text>;
  if (samples.data.sampleCount === 0) {
    return (
      <Text muted testID="report-no-telemetry">
        No telemetry log for this dive, so no depth profile or site plan.
      </Text>
    );
  }
  return (
    <View style={styles.plots}>
      <View testID="report-depth-profile">
        <Text variant="label">Depth profile</Text>
        <DepthProfile dive={part.dive} samples={samples.data} summary={part.summary} height={PLOT_HEIGHT} />
      </View>
      <View testID="report-site-plan">
        <Text variant="label">Site plan</Text>
        <SitePlan dive={part.dive} samples={samples.data} summary={part.summary} height={PLOT_HEIGHT + 40} />
      </View>
    </View>
  );
}

/** Everything the record holds of one dive, section by section. */
export function DiveReport({ part, zone, first }: { part: DiveReportPart; zone: string; first: boolean }) {
  const { colors } = useTheme();
  const n = part.dive.number;
  const entryCount = part.entries.reduce((sum, g) => sum + g.items.length, 0);
  return (
    <View style={styles.dive} testID={`report-dive-${n}`}>
      <ReportSection id="dive" title={`Dive ${n}`} newPage={!first}>
        {part.dive.objectives ? <Text testID="report-objectives">{part.dive.objectives}</Text> : null}
        <Text variant="label">Dive phases</Text>
        <View testID="report-phases">
          {phaseLabels.map(([key, label]) => {
            const at = part.dive.phases[key];
            return <Fact key={key} label={label} value={at ? formatInZone(at, zone) : 'Not reached'} />;
          })}
        </View>
        <Text variant="label">Statistics</Text>
        <DiveStatsGrid stats={part.summary.stats} maxDepth={part.summary.maxDepth} />
        <Text variant="caption" muted>
          Bathynote is not a navigation or vehicle-control system: never steer the vehicle or judge a dive’s safety from these plots.
        </Text>
        <Plots part={part} />
      </ReportSection>

      <ReportSection id="entries" title={`Entries (${entryCount})`}>
        {part.entries.length === 0 ? <Text muted>No entries were logged on this dive.</Text> : null}
        {part.entries.map((group) => (
          <View key={group.kind} style={styles.group} testID={`report-kind-${group.kind}`}>
            <Text variant="label" color={colors.kind[group.kind]}>
              {`${kindLabels[group.kind]} (${group.items.length})`}
            </Text>
            {group.items.map((e) => (
              <View key={e.id} style={[styles.entry, { borderLeftColor: colors.kind[e.kind] }]} testID="report-entry">
                <Text variant="monoSmall" muted>
                  {`${formatInZone(e.observedAt, zone)} · ${formatDepth(e.depth)} · ${e.authorName}`}
                </Text>
                <Text variant="label">{e.title}</Text>
                {e.scientificName ? <Text style={styles.italic}>{e.scientificName}</Text> : null}
                {e.findNumber ? <Text variant="caption">{`Find ${e.findNumber}`}</Text> : null}
                {e.note ? <Text variant="caption">{e.note}</Text> : null}
                {e.tags.length > 0 ? (
                  <Text variant="caption" muted>
                    {e.tags.map((t) => `#${t}`).join(' ')}
                  </Text>
                ) : null}
                {e.photo ? <ReportPhoto photo={e.photo} label={`Photo of ${e.title}`} /> : null}
              </View>
            ))}
          </View>
        ))}
      </ReportSection>

      <ReportSection id="finds" title="Finds and samples">
        {part.finds.length === 0 ? <Text muted>No finds were registered on this dive.</Text> : null}
        {part.finds.map((f) => (
          <View key={f.observationId} style={styles.row} testID="report-row">
            <Text variant="label">{`Find ${f.findNumber} · ${f.title}`}</Text>
            <Text variant="caption">{[f.objectType, f.material].filter(Boolean).join(', ') || 'Object and material not given'}</Text>
            <Text variant="caption" testID="report-find-custody">
              {f.state === 'in-situ'
                ? 'In situ: left on the seabed'
                : f.heldBy
                  ? `Recovered; held by ${f.heldBy} at ${f.location ?? 'an unstated place'} (${f.custodySteps} custody step${f.custodySteps === 1 ? '' : 's'})`
                  : 'Recovered; no custody step recorded yet'}
            </Text>
          </View>
        ))}
        {part.samples.length === 0 ? <Text muted>No samples were taken on this dive.</Text> : null}
        {part.samples.map((s) => (
          <View key={s.observationId} style={styles.row} testID="report-row">
            <Text variant="label">{`Sample ${s.sampleNumber} · ${s.title}`}</Text>
            <Text variant="caption">{[s.sampleType, s.gear, s.container, s.preservation].filter(Boolean).join(', ')}</Text>
            <Text variant="caption" color={s.noCustodySinceRecovery ? colors.danger : undefined} testID="report-sample-custody">
              {s.heldBy
                ? `Held by ${s.heldBy} (${s.custodySteps} custody step${s.custodySteps === 1 ? '' : 's'})`
                : s.noCustodySinceRecovery
                  ? 'On deck with no custody step recorded'
                  : 'No custody step recorded yet'}
            </Text>
          </View>
        ))}
      </ReportSection>

      <ReportSection id="taxa" title={`Taxa seen (${part.taxa.length})`}>
        {part.taxa.length === 0 ? <Text muted>No identifications on this dive.</Text> : null}
        {part.taxa.map((t) => (
          <View key={t.scientificName} style={styles.row} testID="report-row">
            <Text style={styles.italic}>{t.scientificName}</Text>
            <Text variant="caption">
              {`${t.entries} entr${t.entries === 1 ? 'y' : 'ies'}${t.totalCount !== null ? ` · ${t.totalCount} individuals` : ''} · ${
                t.depthMin !== null && t.depthMax !== null ? `${formatDepth(t.depthMin)} to ${formatDepth(t.depthMax)}` : 'depth unknown'
              } · ${Math.round(t.verifiedShare * 100)} % verified`}
            </Text>
          </View>
        ))}
      </ReportSection>

      <ReportSection id="operations" title="Operations">
        {part.operations.length === 0 ? <Text muted>No operations entries on this dive.</Text> : null}
        {part.operations.map((o) => (
          <View key={o.id} style={styles.row} testID="report-row">
            <Text variant="label" color={o.fault ? colors.danger : undefined}>
              {o.fault ? `Equipment fault: ${o.title}` : o.title}
            </Text>
            <Text variant="monoSmall" muted>
              {formatInZone(o.observedAt, zone)}
            </Text>
            {o.note ? <Text variant="caption">{o.note}</Text> : null}
          </View>
        ))}
      </ReportSection>
    </View>
  );
}

const styles = StyleSheet.create({
  dive: { gap: space.xl, maxWidth: REPORT_WIDTH },
  plots: { gap: space.lg },
  group: { gap: space.sm },
  entry: { gap: 2, borderLeftWidth: 3, paddingLeft: space.sm },
  row: { gap: 2 },
  italic: { fontStyle: 'italic' },
});
