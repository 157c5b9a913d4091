import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { FixedScheme, useTheme } from '@/hooks/theme';
import { formatInZone } from '@/lib/format';
import type { Report } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { DiveReport } from './dive-report';
import { paperSizes, REPORT_WIDTH, type PaperSize } from './paper';
import { PrintButton } from './print-button';
import { PrintStyle } from './print-style';
import { Fact, ReportSection } from './report-section';

const ROOT = 'report';

const orNone = (v: string | null) => v ?? 'Not recorded';

/**
 * A report laid out as the paper it prints on: always in the light scheme, one column no wider
 * than the printable width, sections that each start a new page when printed.
 */
export function ReportView({ report }: { report: Report }) {
  return (
    <FixedScheme scheme="light">
      <ReportPaper report={report} />
    </FixedScheme>
  );
}

function ReportPaper({ report }: { report: Report }) {
  const { colors } = useTheme();
  const [paper, setPaper] = useState<PaperSize>('A4');
  const { header: h, timeZone } = { header: report.header, timeZone: report.header.timeZone };
  const diveNumbers = report.dives.map((d) => d.dive.number).join(', ');
  const title = report.scope === 'dive' ? `Dive report · ${diveNumbers}` : `Daily report · ${report.date}`;

  return (
    <View style={[styles.paper, { backgroundColor: colors.surface, borderColor: colors.border }]} testID={ROOT}>
      <PrintStyle paper={paper} rootTestID={ROOT} />
      <View style={styles.controls} testID="report-controls">
        <Segmented label="Paper size" options={paperSizes} value={paper} onChange={setPaper} testID="report-paper" />
        <PrintButton />
      </View>

      <View style={styles.header} testID="report-header">
        <Text variant="heading" role="heading" aria-level={1} testID="report-title">
          {title}
        </Text>
        <Fact label="Campaign" value={h.campaign} />
        <Fact label="Site" value={h.site} />
        <Fact label="Vessel" value={orNone(h.vessel)} />
        <Fact label="Vehicle" value={orNone(h.vehicle)} />
        <Fact label={report.dives.length === 1 ? 'Dive' : 'Dives'} value={diveNumbers || 'No dives on this day'} testID="report-dives" />
        <Fact label="Date" value={`${report.date} (${timeZone})`} testID="report-date" />
        <Fact label="Permit" value={orNone(h.permit)} testID="report-permit" />
        <Text variant="caption" muted>
          {`Made from the record at ${formatInZone(report.generatedAt, timeZone)}. Times are in the campaign’s display zone.`}
        </Text>
      </View>

      {report.dives.length === 0 ? (
        <Text muted testID="report-empty">
          No dive was launched on this day.
        </Text>
      ) : null}
      {report.dives.map((part, i) => (
        <DiveReport key={part.dive.id} part={part} zone={timeZone} first={i === 0} />
      ))}

      {report.watches.length > 0 ? (
        <ReportSection id="watches" title="On watch">
          {report.watches.map((w) => (
            <View key={`${w.watch}-${w.start}`} testID="report-row">
              <Text variant="label">{w.watch}</Text>
              <Text variant="monoSmall" muted>
                {`${formatInZone(w.start, timeZone)} to ${formatInZone(w.end, timeZone)}`}
              </Text>
              <Text variant="caption">{w.members.length > 0 ? w.members.map((m) => m.name).join(', ') : 'Nobody assigned'}</Text>
            </View>
          ))}
        </ReportSection>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  paper: {
    gap: space.xl,
    width: '100%',
    maxWidth: REPORT_WIDTH + 2 * space.xl,
    padding: space.xl,
    borderWidth: 1,
    borderRadius: radius.md,
    alignSelf: 'center',
  },
  controls: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'flex-end', justifyContent: 'space-between' },
  header: { gap: space.xs },
});
