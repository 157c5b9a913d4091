import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, Line, Path, Rect } from 'react-native-svg';

import { kindLabels } from '@/components/observations/kind-badge';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import type { Dive, DiveSummary, ObservationKind, TelemetrySamples } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { KindLegend, MARKER_TARGET, PlotLabel, PlotMarker } from './plot-parts';
import { niceStep, pathAcrossGaps, targetSizes, ticksOf } from './plot-scale';

const MARGIN = { left: 44, right: 14, top: 14, bottom: 34 };
/** Smallest stretch of seabed shown, in metres, so a few close entries are not blown up. */
const MIN_SPAN_M = 20;

type Props = { dive: Dive; samples: TelemetrySamples; summary: DiveSummary; height?: number };

/**
 * The site plan: metres east and north of the campaign's datum at one scale on both axes, the
 * vehicle's track, the dive's entries in the colour of their kind (finds labelled by number),
 * a scale bar and a north arrow. It frames the bottom phase; the descent and ascent run off it.
 */
export function SitePlan({ dive, samples, summary, height = 300 }: Props) {
  const { colors } = useTheme();
  const router = useRouter();
  const [width, setWidth] = useState(0);

  const g = useMemo(() => {
    const plotW = Math.max(10, width - MARGIN.left - MARGIN.right);
    const plotH = Math.max(10, height - MARGIN.top - MARGIN.bottom);
    const from = dive.phases.onBottom ? Date.parse(dive.phases.onBottom) : Number.NEGATIVE_INFINITY;
    const to = dive.phases.offBottom ? Date.parse(dive.phases.offBottom) : Number.POSITIVE_INFINITY;
    const track = samples.track.map((p) => ({ t: Date.parse(p.t), east: p.east, north: p.north }));
    const onBottom = track.filter((p) => p.t >= from && p.t <= to);
    const placed = summary.observations.flatMap((o) =>
      o.east !== null && o.north !== null && !o.outsideDive ? [{ ...o, east: o.east, north: o.north }] : [],
    );
    const framed = [...(onBottom.length > 0 ? onBottom : track), ...placed, { east: 0, north: 0 }];
    const minE = Math.min(...framed.map((p) => p.east));
    const maxE = Math.max(...framed.map((p) => p.east));
    const minN = Math.min(...framed.map((p) => p.north));
    const maxN = Math.max(...framed.map((p) => p.north));
    // One scale for both axes (metres per pixel), so distances and shapes are true.
    const mpp = Math.max((maxE - minE) / plotW, (maxN - minN) / plotH, MIN_SPAN_M / Math.min(plotW, plotH)) * 1.12;
    const cE = (minE + maxE) / 2;
    const cN = (minN + maxN) / 2;
    const x = (east: number) => MARGIN.left + plotW / 2 + (east - cE) / mpp;
    const y = (north: number) => MARGIN.top + plotH / 2 - (north - cN) / mpp;
    const eRange: [number, number] = [cE - (plotW / 2) * mpp, cE + (plotW / 2) * mpp];
    const nRange: [number, number] = [cN - (plotH / 2) * mpp, cN + (plotH / 2) * mpp];
    const step = niceStep(plotW * mpp, Math.max(2, Math.floor(plotW / 80)));
    const gaps = samples.gaps.map((gp) => ({ from: Date.parse(gp.from), to: Date.parse(gp.to) }));
    const path = pathAcrossGaps(
      track.map((p) => ({ t: p.t, x: x(p.east), y: y(p.north) })),
      gaps,
    );
    const scaleM = niceStep(plotW * mpp * 0.25, 1);
    const targets = targetSizes(
      placed.map((o) => ({ x: x(o.east), y: y(o.north) })),
      MARKER_TARGET,
      10,
    );
    return {
      targets,
      plotW,
      plotH,
      x,
      y,
      path,
      placed,
      eTicks: ticksOf(eRange[0], eRange[1], step),
      nTicks: ticksOf(nRange[0], nRange[1], step),
      scaleM,
      scalePx: scaleM / mpp,
    };
  }, [dive.phases, samples, summary, width, height]);

  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const unplaced = summary.observations.filter((o) => !o.outsideDive).length - g.placed.length;
  const kinds = [...new Set(g.placed.map((o) => o.kind))] as ObservationKind[];
  const left = MARGIN.left;
  const right = MARGIN.left + g.plotW;
  const top = MARGIN.top;
  const bottom = MARGIN.top + g.plotH;
  const arrowX = right - 22;
  const arrowY = top + 12;
  const barX = left + 12;
  const barY = bottom - 16;

  return (
    <View style={styles.wrap}>
      <View onLayout={onLayout} style={{ height }} testID="site-plan">
        {width > 0 ? (
          <>
            <Svg
              width={width}
              height={height}
              testID="site-plan-svg"
              accessibilityLabel={`Site plan of dive ${dive.number}: the track and ${g.placed.length} entries, in metres from the site datum`}
            >
              <Rect x={left} y={top} width={g.plotW} height={g.plotH} fill={colors.surfaceAlt} opacity={0.35} />
              {g.eTicks.map((v) => (
                <Line
                  key={`e${v}`}
                  x1={g.x(v)}
                  x2={g.x(v)}
                  y1={top}
                  y2={bottom}
                  stroke={colors.border}
                  strokeWidth={v === 0 ? 1.5 : 1}
                  strokeDasharray={v === 0 ? undefined : '2 4'}
                />
              ))}
              {g.nTicks.map((v) => (
                <Line
                  key={`n${v}`}
                  x1={left}
                  x2={right}
                  y1={g.y(v)}
                  y2={g.y(v)}
                  stroke={colors.border}
                  strokeWidth={v === 0 ? 1.5 : 1}
                  strokeDasharray={v === 0 ? undefined : '2 4'}
                />
              ))}
              <Path d={g.path} stroke={colors.textMuted} strokeWidth={1.5} fill="none" opacity={0.8} strokeLinejoin="round" />
              <Line x1={g.x(0) - 6} x2={g.x(0) + 6} y1={g.y(0)} y2={g.y(0)} stroke={colors.text} strokeWidth={2} />
              <Line x1={g.x(0)} x2={g.x(0)} y1={g.y(0) - 6} y2={g.y(0) + 6} stroke={colors.text} strokeWidth={2} />
              <Circle cx={g.x(0)} cy={g.y(0)} r={9} stroke={colors.text} strokeWidth={1} fill="none" />
              <Path d={`M${arrowX} ${arrowY + 22} L${arrowX} ${arrowY}`} stroke={colors.text} strokeWidth={2} />
              <Path d={`M${arrowX - 6} ${arrowY + 9} L${arrowX} ${arrowY - 2} L${arrowX + 6} ${arrowY + 9} Z`} fill={colors.text} />
              <Rect x={barX - 4} y={barY - 10} width={g.scalePx + 8} height={22} fill={colors.surface} opacity={0.8} />
              <Line x1={barX} x2={barX + g.scalePx} y1={barY} y2={barY} stroke={colors.text} strokeWidth={3} />
              <Line x1={barX} x2={barX} y1={barY - 5} y2={barY + 5} stroke={colors.text} strokeWidth={2} />
              <Line x1={barX + g.scalePx} x2={barX + g.scalePx} y1={barY - 5} y2={barY + 5} stroke={colors.text} strokeWidth={2} />
            </Svg>
            {g.eTicks.map((v) => (
              <PlotLabel key={`el${v}`} x={g.x(v)} y={bottom + 10}>
                {v}
              </PlotLabel>
            ))}
            {g.nTicks.map((v) => (
              <PlotLabel key={`nl${v}`} x={left - 6} y={g.y(v)} align="right" width={40}>
                {v}
              </PlotLabel>
            ))}
            <PlotLabel x={right} y={height - 6} align="right" width={140}>
              East of datum (m) →
            </PlotLabel>
            <PlotLabel x={left + 6} y={top + 10} align="left" width={120}>
              North (m) ↑
            </PlotLabel>
            <PlotLabel x={g.x(0) + 12} y={g.y(0) + 12} align="left" width={60}>
              Datum
            </PlotLabel>
            <PlotLabel x={arrowX} y={arrowY + 32} muted={false} width={20} testID="north-arrow">
              N
            </PlotLabel>
            <PlotLabel x={barX + g.scalePx / 2} y={barY - 12} muted={false} width={80} testID="scale-bar">
              {`${g.scaleM} m`}
            </PlotLabel>
            {g.placed.map((o, i) => (
              <PlotMarker
                key={o.id}
                target={g.targets[i]}
                testID={`plan-marker-${o.id}`}
                x={g.x(o.east)}
                y={g.y(o.north)}
                kind={o.kind}
                size={10}
                label={`${kindLabels[o.kind]}: ${o.title}${o.findNumber ? `, find ${o.findNumber}` : ''}, ${o.east.toFixed(1)} m east and ${o.north.toFixed(1)} m north of the datum`}
                onPress={() => router.push(`/observations/${o.id}`)}
              />
            ))}
            {g.placed
              .filter((o) => o.findNumber)
              .map((o) => (
                <PlotLabel
                  key={`f${o.id}`}
                  x={g.x(o.east) + 9}
                  y={g.y(o.north) - 10}
                  align="left"
                  muted={false}
                  width={90}
                  testID={`plan-find-${o.findNumber}`}
                >
                  {o.findNumber}
                </PlotLabel>
              ))}
          </>
        ) : null}
      </View>
      <View style={styles.footer}>
        <KindLegend kinds={kinds} />
        <Text variant="caption" muted>
          The grey line is the vehicle’s track; the cross is the site datum.
          {unplaced > 0
            ? ` ${unplaced === 1 ? 'One entry has' : `${unplaced} entries have`} no position, so ${unplaced === 1 ? 'it is' : 'they are'} not on the plan.`
            : ''}
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  footer: { gap: space.xs },
});
