import { useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent, type PointerEvent } from 'react-native';
import Svg, { Line, Path, Rect } from 'react-native-svg';

import { kindLabels } from '@/components/observations/kind-badge';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useTelemetryAt } from '@/hooks/telemetry';
import { useTheme } from '@/hooks/theme';
import { formatDepth, formatLatLon, formatTemperature, formatUtcTime } from '@/lib/format';
import { lowerBound } from '@/lib/interpolate';
import type { Dive, DiveSummary, NoTelemetryReason, ObservationKind, TelemetryAt, TelemetrySamples } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { KindLegend, MARKER_TARGET, PlotLabel, PlotMarker } from './plot-parts';
import { formatTickTime, linearScale, niceCeil, niceStep, pathAcrossGaps, targetSizes, ticks, timeTicks } from './plot-scale';
import { timecodeOf } from './timecode-label';

const MARGIN = { left: 60, right: 16, top: 24, bottom: 40 };
/** Height of the strip below the time axis where entries with no depth at all sit, drawn hollow. */
const NO_DEPTH_STRIP = 24;
/** Smallest touch target where entries crowd: the dot itself. */
const MIN_TARGET = 12;

const noTelemetryText: Record<NoTelemetryReason, string> = {
  gap: 'a gap in the log',
  'before-first-sample': 'before the log starts',
  'after-last-sample': 'after the log ends',
  'empty-series': 'no log for this dive',
};

type Props = { dive: Dive; samples: TelemetrySamples; summary: DiveSummary; height?: number };

/**
 * Depth against time (depth downward), with the dive's entries as markers in the colour of their
 * kind: tap one to open it. Touching or hovering the plot reads the log at that time.
 */
export function DepthProfile({ dive, samples, summary, height = 260 }: Props) {
  const { colors } = useTheme();
  const router = useRouter();
  const [width, setWidth] = useState(0);
  const [scrubMs, setScrubMs] = useState<number | null>(null);
  const [settledMs, setSettledMs] = useState<number | null>(null);
  const [view, setView] = useState<'dive' | 'bottom'>('dive');
  const exact = useTelemetryAt(dive.id, settledMs !== null ? new Date(settledMs).toISOString() : null);

  useEffect(() => {
    if (scrubMs === null) return;
    // Ask the server for the exact values once the finger or pointer rests.
    const timer = setTimeout(() => setSettledMs(scrubMs), 250);
    return () => clearTimeout(timer);
  }, [scrubMs]);

  const bottomFrom = dive.phases.onBottom ? Date.parse(dive.phases.onBottom) : null;
  const bottomTo = dive.phases.offBottom ? Date.parse(dive.phases.offBottom) : null;
  const canZoom = bottomFrom !== null && bottomTo !== null && bottomTo > bottomFrom;
  const zoom = useMemo<[number, number] | null>(
    () => (view === 'bottom' && bottomFrom !== null && bottomTo !== null && bottomTo > bottomFrom ? [bottomFrom, bottomTo] : null),
    [view, bottomFrom, bottomTo],
  );

  const g = useMemo(() => {
    const inView = (t: number) => !zoom || (t >= zoom[0] && t <= zoom[1]);
    const points = samples.points.map((p) => ({ t: Date.parse(p.t), depth: p.depth })).filter((p) => inView(p.t));
    // An entry logged outside the dive's window is listed apart, so it never stretches the axis.
    const entries = summary.observations
      .filter((o) => !o.outsideDive)
      .map((o) => ({ ...o, t: Date.parse(o.observedAt) }))
      .filter((e) => inView(e.t));
    const phaseMs = Object.values(dive.phases)
      .filter((v): v is string => v !== null)
      .map((v) => Date.parse(v));
    const times = zoom ? zoom : [...points.map((p) => p.t), ...entries.map((e) => e.t), ...phaseMs];
    const tMin = times.length > 0 ? Math.min(...times) : 0;
    const tMax = times.length > 0 ? Math.max(...times) : 1;
    const depths = [...points.map((p) => p.depth), ...entries.map((e) => e.depth)].filter((d): d is number => d !== null);
    // The whole dive is drawn from the surface; the bottom phase only across the depths it spans.
    const deepest = depths.length > 0 ? Math.max(...depths) : 10;
    const shallowest = depths.length > 0 ? Math.min(...depths) : 0;
    const step = zoom ? niceStep(Math.max(4, deepest - shallowest), 4) : 1;
    const dMin = zoom ? Math.floor(shallowest / step - 0.25) * step : 0;
    const dMax = zoom ? Math.ceil(deepest / step + 0.25) * step : niceCeil(deepest);
    // An entry with neither a typed depth nor one from the log (say, in a gap of the log) is not
    // drawn at the surface, where it would read as 0 m, but in a strip of its own under the axis.
    const strip = entries.some((e) => e.depth === null) ? NO_DEPTH_STRIP : 0;
    const plotW = Math.max(10, width - MARGIN.left - MARGIN.right);
    const plotH = Math.max(10, height - MARGIN.top - MARGIN.bottom - strip);
    const stripY = MARGIN.top + plotH + 24 + strip / 2;
    const x = linearScale(tMin, tMax, MARGIN.left, MARGIN.left + plotW);
    const y = linearScale(dMin, dMax, MARGIN.top, MARGIN.top + plotH);

    const gaps = samples.gaps
      .map((gp) => ({ from: Date.parse(gp.from), to: Date.parse(gp.to) }))
      .filter((gp) => gp.to >= tMin && gp.from <= tMax);
    const d = pathAcrossGaps(
      points.flatMap((p) => (p.depth !== null ? [{ t: p.t, x: x(p.t), y: y(p.depth) }] : [])),
      gaps,
    );

    const timeAxis = timeTicks(tMin, tMax, Math.max(2, Math.floor(plotW / 50)));
    const placed = entries.map((e) => ({ ...e, px: x(e.t), py: e.depth !== null ? y(e.depth) : stripY }));
    const targets = targetSizes(
      placed.map((e) => ({ x: e.px, y: e.py })),
      MARKER_TARGET,
      MIN_TARGET,
    );
    return {
      points,
      entries: placed,
      targets,
      tMin,
      tMax,
      plotW,
      plotH,
      x,
      y,
      d,
      gaps,
      strip,
      stripY,
      depthTicks: ticks(dMin, dMax, 5),
      timeAxis,
    };
  }, [samples, summary, dive.phases, width, height, zoom]);

  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const scrubAt = (e: PointerEvent) => {
    const f = Math.min(1, Math.max(0, e.nativeEvent.offsetX / g.plotW));
    setScrubMs(g.tMin + f * (g.tMax - g.tMin));
  };

  const nearest = useMemo(() => {
    if (scrubMs === null || g.points.length === 0) return null;
    const ts = g.points.map((p) => p.t);
    const i = Math.min(g.points.length - 1, lowerBound(ts, scrubMs));
    const j = i > 0 && Math.abs(ts[i - 1]! - scrubMs) < Math.abs(ts[i]! - scrubMs) ? i - 1 : i;
    return g.points[j]!;
  }, [scrubMs, g.points]);

  const kinds = [...new Set(g.entries.map((e) => e.kind))] as ObservationKind[];
  const maxDepth = summary.maxDepth;

  return (
    <View style={styles.wrap}>
      <View onLayout={onLayout} style={{ height }} testID="depth-profile">
        {width > 0 ? (
          <>
            <Svg
              width={width}
              height={height}
              testID="depth-profile-svg"
              accessibilityLabel={`Depth profile of dive ${dive.number}${maxDepth !== null ? `, deepest ${formatDepth(maxDepth)}` : ''}, ${g.entries.length} entries`}
            >
              {bottomFrom !== null && bottomTo !== null && !zoom ? (
                <Rect
                  x={g.x(bottomFrom)}
                  y={MARGIN.top}
                  width={Math.max(0, g.x(bottomTo) - g.x(bottomFrom))}
                  height={g.plotH}
                  fill={colors.accent}
                  opacity={0.07}
                />
              ) : null}
              {g.gaps.map((gp) => (
                <Rect
                  key={gp.from}
                  x={g.x(gp.from)}
                  y={MARGIN.top}
                  width={Math.max(4, g.x(gp.to) - g.x(gp.from))}
                  height={g.plotH}
                  fill={colors.warning}
                  opacity={0.3}
                />
              ))}
              {g.depthTicks.map((v) => (
                <Line
                  key={`d${v}`}
                  x1={MARGIN.left}
                  x2={MARGIN.left + g.plotW}
                  y1={g.y(v)}
                  y2={g.y(v)}
                  stroke={colors.border}
                  strokeWidth={1}
                />
              ))}
              {g.timeAxis.ticks.map((v) => (
                <Line
                  key={`t${v}`}
                  x1={g.x(v)}
                  x2={g.x(v)}
                  y1={MARGIN.top}
                  y2={MARGIN.top + g.plotH}
                  stroke={colors.border}
                  strokeWidth={1}
                  strokeDasharray="2 4"
                />
              ))}
              {g.strip > 0 ? (
                <Rect
                  x={MARGIN.left}
                  y={g.stripY - g.strip / 2 + 2}
                  width={g.plotW}
                  height={g.strip - 4}
                  fill={colors.surfaceAlt}
                  stroke={colors.border}
                  strokeDasharray="2 3"
                  testID="profile-no-depth-strip"
                />
              ) : null}
              <Path d={g.d} stroke={colors.accent} strokeWidth={2} fill="none" strokeLinejoin="round" />
              {scrubMs !== null ? (
                <Line x1={g.x(scrubMs)} x2={g.x(scrubMs)} y1={MARGIN.top} y2={MARGIN.top + g.plotH} stroke={colors.text} strokeWidth={1} />
              ) : null}
            </Svg>
            {g.depthTicks.map((v) => (
              <PlotLabel key={`dl${v}`} x={MARGIN.left - 6} y={g.y(v)} align="right" width={MARGIN.left - 8}>
                {v}
              </PlotLabel>
            ))}
            {g.timeAxis.ticks.map((v) => (
              <PlotLabel key={`tl${v}`} x={g.x(v)} y={MARGIN.top + g.plotH + 12} testID="profile-time-tick">
                {formatTickTime(v, g.timeAxis.step)}
              </PlotLabel>
            ))}
            <PlotLabel x={MARGIN.left - 52} y={8} align="left" width={120}>
              Depth (m) ↓
            </PlotLabel>
            {g.strip > 0 ? (
              <PlotLabel x={MARGIN.left - 6} y={g.stripY} align="right" width={MARGIN.left - 6} testID="profile-no-depth-label">
                no depth
              </PlotLabel>
            ) : null}
            <PlotLabel x={MARGIN.left + g.plotW} y={height - 8} align="right" width={120}>
              Time (UTC) →
            </PlotLabel>
            <View
              testID="depth-profile-scrub"
              style={[styles.scrub, { left: MARGIN.left, top: MARGIN.top, width: g.plotW, height: g.plotH }]}
              onPointerDown={scrubAt}
              onPointerMove={scrubAt}
            />
            {g.entries.map((e, i) => (
              <PlotMarker
                key={e.id}
                testID={`profile-marker-${e.id}`}
                x={e.px}
                y={e.py}
                target={g.targets[i]}
                hollow={e.depth === null}
                kind={e.kind}
                label={`${kindLabels[e.kind]}: ${e.title}, ${e.depth !== null ? formatDepth(e.depth) : 'no depth'} at ${formatUtcTime(e.observedAt)}`}
                onPress={() => router.push(`/observations/${e.id}`)}
              />
            ))}
          </>
        ) : null}
      </View>
      <View style={styles.footer}>
        {canZoom ? (
          <Segmented
            label="Show"
            testID="profile-view"
            value={view}
            onChange={(v) => {
              setView(v);
              setScrubMs(null);
            }}
            options={[
              { value: 'dive', label: 'Whole dive' },
              { value: 'bottom', label: 'Bottom phase' },
            ]}
          />
        ) : null}
        <KindLegend kinds={kinds} />
        <Text variant="caption" muted testID="profile-readout" aria-live="polite">
          {readout(scrubMs, nearest, exact.data, dive)}
        </Text>
        <View style={styles.shades}>
          {bottomFrom !== null && bottomTo !== null && !zoom ? (
            <View style={styles.shade} testID="legend-bottom-phase">
              <View style={[styles.swatch, { backgroundColor: colors.accent, opacity: 0.2, borderColor: colors.accent }]} />
              <Text variant="caption" muted>
                Bottom phase (on bottom to off bottom)
              </Text>
            </View>
          ) : null}
          {g.gaps.length > 0 ? (
            <View style={styles.shade} testID="legend-gap">
              <View style={[styles.swatch, { backgroundColor: colors.warning, opacity: 0.45, borderColor: colors.warning }]} />
              <Text variant="caption" color={colors.warning}>
                No telemetry: {g.gaps.length === 1 ? 'one gap' : `${g.gaps.length} gaps`} in the log longer than {samples.gapS} s
              </Text>
            </View>
          ) : null}
          {g.strip > 0 ? (
            <View style={styles.shade} testID="legend-no-depth">
              <View style={[styles.ring, { borderColor: colors.textMuted }]} />
              <Text variant="caption" muted>
                Entry with no depth, neither typed nor from the log
              </Text>
            </View>
          ) : null}
        </View>
      </View>
    </View>
  );
}

function readout(
  scrubMs: number | null,
  nearest: { t: number; depth: number | null } | null,
  exact: TelemetryAt | undefined,
  dive: Dive,
): string {
  if (scrubMs === null) return 'Touch or point at the profile to read the log; tap a marker to open its entry.';
  const at = new Date(scrubMs).toISOString();
  const tc = timecodeOf(dive, at)?.label;
  const when = tc ? `${formatUtcTime(at)} (TC ${tc})` : formatUtcTime(at);
  if (exact && Math.abs(Date.parse(exact.t) - scrubMs) < 1000) {
    if (exact.noTelemetry) return `${when}: no telemetry (${noTelemetryText[exact.noTelemetry]})`;
    return [when, formatDepth(exact.depth), formatTemperature(exact.temperature), formatLatLon(exact.lat, exact.lon)]
      .filter((s) => s !== '—')
      .join(' · ');
  }
  return nearest ? `${when} · about ${formatDepth(nearest.depth)}` : when;
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  scrub: { position: 'absolute' },
  footer: { gap: space.xs },
  shades: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.lg, rowGap: space.xs },
  shade: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 14, height: 10, borderWidth: 1, borderRadius: 2 },
  ring: { width: 10, height: 10, borderRadius: 5, borderWidth: 2 },
});
