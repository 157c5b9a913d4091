import { useMemo, useState } from 'react';
import { ScrollView, StyleSheet, Switch, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useImportTelemetry } from '@/hooks/telemetry';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import { telemetryChannels, type TelemetryChannelName, type TelemetryImportMode, type TelemetryImportReport } from '@/lib/schemas';
import { recogniseHeaders } from '@/lib/telemetry-columns';
import { radius, space } from '@/lib/tokens';
import { CsvFilePicker } from './csv-file-picker';
import type { PickedLog } from './picked-log';

const channelLabels: Record<TelemetryChannelName, string> = {
  time: 'time',
  pressure: 'pressure (dbar)',
  depth: 'depth (m)',
  lat: 'latitude',
  lon: 'longitude',
  heading: 'heading',
  altitude: 'altitude (m)',
  temperature: 'temperature (°C)',
  salinity: 'salinity',
};

/** Problems listed under a failed import; the rest are counted. */
const SHOWN_ISSUES = 6;

const megabytes = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(bytes < 1024 * 1024 ? 2 : 1)} MB`;
const count = (n: number) => n.toLocaleString('en');

/**
 * Importing the vehicle's log for a dive: pick, check the columns, choose the options, upload, read
 * the report. A dive that has a log already adds to it unless the person chooses to replace it,
 * and is asked once more before it is replaced.
 */
export function TelemetryImport({ diveId, hasLog, sampleCount = 0 }: { diveId: string; hasLog: boolean; sampleCount?: number }) {
  const { colors } = useTheme();
  const upload = useImportTelemetry(diveId);
  const [picked, setPicked] = useState<PickedLog | null>(null);
  const [chosenMode, setMode] = useState<TelemetryImportMode | null>(null);
  const mode: TelemetryImportMode = chosenMode ?? (hasLog ? 'append' : 'replace');
  const [confirming, setConfirming] = useState(false);
  const [gpsTime, setGpsTime] = useState(false);
  const [absolute, setAbsolute] = useState(false);
  const [mapping, setMapping] = useState<Record<string, TelemetryChannelName | 'ignore'>>({});

  const recognition = useMemo(() => (picked ? recogniseHeaders(picked.headers, mapping) : null), [picked, mapping]);
  const plain = useMemo(() => (picked ? recogniseHeaders(picked.headers) : null), [picked]);
  const unknown = plain?.unknown ?? [];
  // A recognised column can be read as something else, or not at all (a housing temperature
  // called "temp", a failed depth sensor): tapping its chip opens the same choice.
  const [changing, setChanging] = useState<string[]>([]);
  const choosing = [...unknown, ...changing.filter((h) => !unknown.includes(h))];
  const readAs = (header: string): TelemetryChannelName | 'ignore' => {
    if (mapping[header]) return mapping[header];
    const index = picked?.headers.indexOf(header) ?? -1;
    const recognised = plain
      ? (Object.entries(plain.mapping) as [TelemetryChannelName, number][]).find(([, at]) => at === index)
      : undefined;
    return recognised?.[0] ?? 'ignore';
  };

  const pick = (log: PickedLog) => {
    upload.reset();
    setPicked(log);
    setMapping({});
    setChanging([]);
    setGpsTime(recogniseHeaders(log.headers).timeScale === 'gps');
  };

  const send = () => {
    if (!picked) return;
    if (mode === 'replace' && hasLog && !confirming) return setConfirming(true);
    setConfirming(false);
    upload.mutate({
      file: picked.file,
      fileName: picked.name,
      fields: {
        mode,
        gpsTime: gpsTime ? 'true' : 'false',
        pressure: absolute ? 'absolute' : 'sea',
        ...(Object.keys(mapping).length > 0 ? { mapping: JSON.stringify(mapping) } : {}),
      },
    });
  };

  const progress = upload.progress;
  const percent = progress && progress.total > 0 ? Math.round((progress.sent / progress.total) * 100) : 0;

  return (
    <View style={styles.wrap} testID="telemetry-import">
      <View style={styles.head}>
        <Text variant="title">Import the vehicle log</Text>
        <Text variant="caption" muted>
          A CSV file (comma, semicolon or tab) with a time column in UTC (ISO 8601 or epoch seconds or milliseconds) and any of depth,
          pressure, latitude, longitude, heading, altitude, temperature and salinity. Entries take their depth, position and temperature
          from it unless they were typed in.
        </Text>
      </View>

      <View style={styles.row}>
        <CsvFilePicker onPick={pick} disabled={upload.isPending} />
        {picked ? (
          <Text variant="mono" testID="telemetry-file-name" numberOfLines={1} style={styles.grow}>
            {picked.name} · {megabytes(picked.size)}
          </Text>
        ) : null}
      </View>

      {recognition && picked ? (
        <View style={styles.section} testID="telemetry-columns">
          <Text variant="label">Columns</Text>
          <Text variant="caption" muted>
            Tap a column to read it as something else, or not at all.
          </Text>
          <View style={styles.chips}>
            {picked.headers.map((h, i) => {
              const channel = (Object.entries(recognition.mapping) as [TelemetryChannelName, number][]).find(([, at]) => at === i)?.[0];
              return (
                <Chip
                  key={`${h}-${i}`}
                  label={channel ? `${h} → ${channelLabels[channel]}` : `${h}: not read`}
                  selected={!!channel}
                  action={{ accessibilityLabel: `Choose what the column ${h} holds` }}
                  onPress={unknown.includes(h) ? undefined : () => setChanging((c) => (c.includes(h) ? c : [...c, h]))}
                  testID={`telemetry-column-${h}`}
                />
              );
            })}
          </View>
          {recognition.missingTime ? (
            <Text variant="caption" color={colors.danger} role="alert">
              No column holds the time. Say which one does below.
            </Text>
          ) : null}
          {choosing.map((header) => (
            <View key={header} style={styles.mapping}>
              <Text variant="caption">“{header}” holds</Text>
              <View style={styles.chips}>
                {(['ignore', ...telemetryChannels] as const).map((c) => (
                  <Chip
                    key={c}
                    testID={`telemetry-map-${header}-${c}`}
                    label={c === 'ignore' ? 'nothing to read' : channelLabels[c]}
                    selected={readAs(header) === c}
                    onPress={() => setMapping((m) => ({ ...m, [header]: c }))}
                  />
                ))}
              </View>
            </View>
          ))}
        </View>
      ) : null}

      {hasLog ? (
        <Segmented
          label="The dive already has a log"
          testID="telemetry-mode"
          value={mode}
          onChange={(m) => {
            setMode(m);
            setConfirming(false);
          }}
          options={[
            { value: 'append', label: 'Add to it' },
            { value: 'replace', label: 'Replace it' },
          ]}
        />
      ) : null}
      <View style={styles.switches}>
        <Toggle
          testID="telemetry-gps"
          label="Clock on GPS time"
          hint="The log’s clock runs 18 s ahead of UTC; they are taken off."
          value={gpsTime}
          onChange={setGpsTime}
        />
        <Toggle
          testID="telemetry-absolute"
          label="Absolute pressure"
          hint="The sensor reads the atmosphere too; one standard atmosphere (10.1325 dbar) is taken off."
          value={absolute}
          onChange={setAbsolute}
        />
      </View>

      {confirming ? (
        <View
          style={[styles.box, { borderColor: colors.warning, backgroundColor: colors.surface }]}
          role="alert"
          testID="telemetry-replace-confirm"
        >
          <Text variant="label">
            Replace the dive’s log of {count(sampleCount)} samples with {picked?.name ?? 'this file'}?
          </Text>
          <Text variant="caption" muted>
            Every sample the dive has now is dropped, and the entries are stamped again from the new log alone.
          </Text>
          <View style={styles.row}>
            <Button label="Replace the log" tone="danger" testID="telemetry-replace-yes" onPress={send} />
            <Button label="Keep it" tone="ghost" testID="telemetry-replace-no" onPress={() => setConfirming(false)} />
          </View>
        </View>
      ) : null}

      <View style={styles.row}>
        <Button
          label={
            upload.isPending
              ? 'Importing…'
              : mode === 'replace' && hasLog
                ? 'Replace the log and stamp entries'
                : 'Import and stamp entries'
          }
          testID="telemetry-upload"
          busy={upload.isPending}
          disabled={!picked || (recognition?.missingTime ?? true) || confirming}
          onPress={send}
        />
        {upload.isPending ? <Button label="Stop" tone="ghost" compact onPress={upload.cancel} testID="telemetry-cancel" /> : null}
      </View>

      {progress ? (
        <View style={styles.section}>
          <View
            testID="telemetry-progress"
            role="progressbar"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={percent}
            style={[styles.bar, { backgroundColor: colors.surfaceAlt, borderColor: colors.border }]}
          >
            <View style={[styles.fill, { width: `${percent}%`, backgroundColor: colors.accent }]} />
          </View>
          <Text variant="caption" muted>
            {progress.phase === 'sending'
              ? `Sending ${megabytes(progress.sent)} of ${megabytes(progress.total)} (${percent} %)`
              : 'Sent. Reading the log and stamping the entries…'}
          </Text>
        </View>
      ) : null}

      {upload.isError ? <ImportError error={upload.error} /> : null}
      {upload.isSuccess ? <ImportReport report={upload.data} /> : null}
    </View>
  );
}

/** An option that is on or off, drawn as a switch with its label beside it. */
function Toggle({
  label,
  hint,
  value,
  onChange,
  testID,
}: {
  label: string;
  hint: string;
  value: boolean;
  onChange: (v: boolean) => void;
  testID: string;
}) {
  const { colors } = useTheme();
  return (
    <View style={styles.toggle}>
      <Switch
        value={value}
        onValueChange={onChange}
        testID={testID}
        accessibilityLabel={label}
        trackColor={{ false: colors.border, true: colors.accent }}
        thumbColor={colors.surface}
      />
      <View style={styles.grow}>
        <Text variant="label">{label}</Text>
        <Text variant="caption" muted>
          {hint}
        </Text>
      </View>
    </View>
  );
}

function ImportError({ error }: { error: unknown }) {
  const { colors } = useTheme();
  const issues = error instanceof ApiError ? error.issues : [];
  return (
    <View
      style={[styles.box, { borderColor: colors.danger, backgroundColor: colors.dangerBg }]}
      role="alert"
      testID="telemetry-import-error"
    >
      <Text variant="label" color={colors.danger}>
        {error instanceof Error ? error.message : 'The import failed.'}
      </Text>
      {issues.slice(0, SHOWN_ISSUES).map((i) => (
        <Text key={`${i.path}:${i.message}`} variant="caption">
          {i.path.startsWith('file.line.') ? `Line ${i.path.slice('file.line.'.length)}: ` : ''}
          {i.message}
        </Text>
      ))}
      {issues.length > SHOWN_ISSUES ? (
        <Text variant="caption" muted>
          and {issues.length - SHOWN_ISSUES} more like these.
        </Text>
      ) : null}
      <Text variant="caption" muted>
        Nothing was imported; the dive’s log is as it was.
      </Text>
    </View>
  );
}

/** What an import took and what it refused, line by line. */
export function ImportReport({ report }: { report: TelemetryImportReport }) {
  const { colors } = useTheme();
  const more = report.rowsRejected - report.rejected.length;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="telemetry-report" role="status">
      <Text variant="label" color={colors.success}>
        Imported {report.fileName ?? 'the log'} ({report.mode === 'replace' ? 'replacing the dive’s log' : 'added to the dive’s log'})
      </Text>
      <View style={styles.figures}>
        <Figure label="Rows taken" value={count(report.rowsTaken)} testID="report-taken" />
        <Figure label="Rows rejected" value={count(report.rowsRejected)} testID="report-rejected" />
        <Figure label="Entries re-stamped" value={count(report.stamped.updated)} testID="report-stamped" />
        <Figure label="Entries with no telemetry" value={count(report.stamped.noTelemetry)} testID="report-no-telemetry" />
      </View>
      {report.span ? (
        <Text variant="caption" testID="report-span">
          Covers {formatUtc(report.span.firstAt)} to {formatUtc(report.span.lastAt)}
          {report.timeScale === 'gps' ? ' (read as GPS time, 18 s taken off)' : ''}
        </Text>
      ) : null}
      <Text variant="caption" muted>
        Columns read: {report.columns.recognised.map((c) => `${c.header} (${channelLabels[c.channel]})`).join(', ')}
        {report.depthFrom === 'pressure' ? '. Depth computed from pressure (UNESCO 1983) at the site datum’s latitude.' : ''}
      </Text>
      {report.warnings.map((w) => (
        <Text key={`${w.code}:${w.message}`} variant="caption" color={colors.warning} testID={`import-warning-${w.code}`}>
          {w.message}
        </Text>
      ))}
      {report.rejected.length > 0 ? (
        <View style={styles.section}>
          <Text variant="label">Rejected rows</Text>
          <ScrollView style={styles.rejections} nestedScrollEnabled testID="report-rejections">
            {report.rejected.map((r) => (
              <Text key={r.line} variant="monoSmall">
                Line {r.line}: {r.reason}
              </Text>
            ))}
          </ScrollView>
          {more > 0 ? (
            <Text variant="caption" muted>
              and {count(more)} more rows, not listed.
            </Text>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

function Figure({ label, value, testID }: { label: string; value: string; testID: string }) {
  return (
    <View style={styles.figure}>
      <Text variant="caption" muted>
        {label}
      </Text>
      <Text variant="title" testID={testID}>
        {value}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  head: { gap: space.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
  grow: { flexShrink: 1 },
  section: { gap: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  mapping: { gap: space.xs },
  switches: { gap: space.md },
  toggle: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  bar: { height: 12, borderRadius: radius.pill, borderWidth: 1, overflow: 'hidden' },
  fill: { height: '100%' },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xl },
  figure: { minWidth: 110, gap: 2 },
  rejections: { maxHeight: 180 },
});
