import { useRouter } from 'expo-router';
import { useId, useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, ClipPath, Defs, G, Line, Path, Rect } from 'react-native-svg';

import { kindLabels } from '@/components/observations/kind-badge';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import type { Dive, DiveSummary, ObservationKind, TelemetrySamples } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { emptiestCorner, labelWidth, placeLabels, type Box } from './label-placement';
import { KindLegend, MARKER_TARGET, PlotLabel, PlotMarker } from './plot-parts';
import { niceStep, pathInFrame, targetSizes, ticksOf } from './plot-scale';

const MARGIN = { left: 44, right: 14, top: 22, bottom: 34 };
/** Space left round the data inside the frame, as a share of the span shown. */
const FRAME_MARGIN = 0.1;
const NORTH_BOX = { width: 24, height: 44 };
/** Smallest stretch of seabed shown, in metres, so a few close entries are not blown up. */
const MIN_SPAN_M = 20;

type Props = { dive: Dive; samples: TelemetrySamples; summary: DiveSummary; height?: number };

/**
 * The site plan: metres east and north of the campaign's datum at one scale on both axes, the
 * vehicle's track, the dive's entries in the colour of their kind (finds labelled by number),
 * a scale bar and a north arrow. It frames the bottom phase and the entries with a margin (and the
 * datum when it is near); the descent and ascent are cut at the frame. Labels are placed where they
 * cover nothing else, and the arrow and the scale bar take the emptiest corners.
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
    const data = [...(onBottom.length > 0 ? onBottom : track), ...placed];
    const bounds = (pts: { east: number; north: number }[]) => ({
      minE: Math.min(...pts.map((p) => p.east)),
      maxE: Math.max(...pts.map((p) => p.east)),
      minN: Math.min(...pts.map((p) => p.north)),
      maxN: Math.max(...pts.map((p) => p.north)),
    });
    // The datum is framed too when it lies near the work; far off, it would shrink the work to a dot.
    const b0 = data.length > 0 ? bounds(data) : { minE: 0, maxE: 0, minN: 0, maxN: 0 };
    const reach = Math.max(b0.maxE - b0.minE, b0.maxN - b0.minN, MIN_SPAN_M) * 0.5;
    const datumNear = data.length === 0 || (b0.minE - reach <= 0 && 0 <= b0.maxE + reach && b0.minN - reach <= 0 && 0 <= b0.maxN + reach);
    const { minE, maxE, minN, maxN } = datumNear ? bounds([...data, { east: 0, north: 0 }]) : b0;
    // One scale for both axes (metres per pixel), so distances and shapes are true.
    const mpp = Math.max((maxE - minE) / plotW, (maxN - minN) / plotH, MIN_SPAN_M / Math.min(plotW, plotH)) / (1 - 2 * FRAME_MARGIN);
    const cE = (minE + maxE) / 2;
    const cN = (minN + maxN) / 2;
    const x = (east: number) => MARGIN.left + plotW / 2 + (east - cE) / mpp;
    const y = (north: number) => MARGIN.top + plotH / 2 - (north - cN) / mpp;
    const eRange: [number, number] = [cE - (plotW / 2) * mpp, cE + (plotW / 2) * mpp];
    const nRange: [number, number] = [cN - (plotH / 2) * mpp, cN + (plotH / 2) * mpp];
    const step = niceStep(plotW * mpp, Math.max(2, Math.floor(plotW / 80)));
    const gaps = samples.gaps.map((gp) => ({ from: Date.parse(gp.from), to: Date.parse(gp.to) }));
    const path = pathInFrame(
      track.map((p) => ({ t: p.t, x: x(p.east), y: y(p.north) })),
      gaps,
      { x: MARGIN.left, y: MARGIN.top, width: plotW, height: plotH },
    );
    const scaleM = niceStep(plotW * mpp * 0.25, 1);
    const targets = targetSizes(
      placed.map((o) => ({ x: x(o.east), y: y(o.north) })),
      MARKER_TARGET,
      10,
    );
    const frame: Box = { x: MARGIN.left, y: MARGIN.top, width: plotW, height: plotH };
    const markerPts = placed.map((o) => ({ x: x(o.east), y: y(o.north) }));
    const trackPts = track.filter((_, i) => i % 4 === 0).map((p) => ({ x: x(p.east), y: y(p.north) }));
    const crowd = [...markerPts, ...trackPts];
    const north = emptiestCorner(frame, NORTH_BOX, crowd, 6);
    const scalePx = scaleM / mpp;
    const scaleBox = emptiestCorner(frame, { width: Math.max(scalePx, labelWidth(`${scaleM} m`)) + 8, height: 32 }, crowd, 6, [north]);
    const datumX = x(0);
    const datumY = y(0);
    const datumShown = datumX >= frame.x && datumX <= frame.x + plotW && datumY >= frame.y && datumY <= frame.y + plotH;
    const labels = placeLabels(
      [
        ...(datumShown ? [{ key: 'datum', text: 'Datum', x: datumX, y: datumY, clearance: 11 }] : []),
        ...placed.flatMap((o, i) =>
          o.findNumber ? [{ key: `f${o.id}`, text: o.findNumber, x: markerPts[i]!.x, y: markerPts[i]!.y }] : [],
        ),
      ],
      [north, scaleBox, ...markerPts.map((p) => ({ x: p.x - 7, y: p.y - 7, width: 14, height: 14 }))],
      frame,
    );
    return {
      north,
      scaleBox,
      datumShown,
      datumOff: datumShown ? null : { east: 0 - cE, north: 0 - cN },
      labels,
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
      scalePx,
    };
  }, [dive.phases, samples, summary, width, height]);

  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const unplaced = summary.observations.filter((o) => !o.outsideDive).length - g.placed.length;
  const kinds = [...new Set(g.placed.map((o) => o.kind))] as ObservationKind[];
  const left = MARGIN.left;
  const right = MARGIN.left + g.plotW;
  const top = MARGIN.top;
  const bottom = MARGIN.top + g.plotH;
  const arrowX = g.north.x + g.north.width / 2;
  const arrowY = g.north.y + 4;
  const barX = g.scaleBox.x + 4;
  const barY = g.scaleBox.y + g.scaleBox.height - 8;
  const clip = `plan-frame-${useId().replace(/[^a-zA-Z0-9]/g, '')}`;
  const datumLabel = g.labels.find((l) => l.key === 'datum');

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
              <Defs>
                <ClipPath id={clip}>
                  <Rect x={left} y={top} width={g.plotW} height={g.plotH} />
                </ClipPath>
              </Defs>
              <Rect x={left} y={top} width={g.plotW} height={g.plotH} fill={colors.surfaceAlt} opacity={0.35} />
              <G clipPath={`url(#${clip})`}>
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
                <Path
                  d={g.path}
                  stroke={colors.textMuted}
                  strokeWidth={1.5}
                  fill="none"
                  opacity={0.8}
                  strokeLinejoin="round"
                  testID="site-plan-track"
                />
                {g.datumShown ? (
                  <>
                    <Line x1={g.x(0) - 6} x2={g.x(0) + 6} y1={g.y(0)} y2={g.y(0)} stroke={colors.text} strokeWidth={2} />
                    <Line x1={g.x(0)} x2={g.x(0)} y1={g.y(0) - 6} y2={g.y(0) + 6} stroke={colors.text} strokeWidth={2} />
                    <Circle cx={g.x(0)} cy={g.y(0)} r={9} stroke={colors.text} strokeWidth={1} fill="none" />
                  </>
                ) : null}
              </G>
              <Rect x={left} y={top} width={g.plotW} height={g.plotH} fill="none" stroke={colors.border} testID="site-plan-frame" />
              <Path d={`M${arrowX} ${arrowY + 22} L${arrowX} ${arrowY}`} stroke={colors.text} strokeWidth={2} />
              <Path d={`M${arrowX - 6} ${arrowY + 9} L${arrowX} ${arrowY - 2} L${arrowX + 6} ${arrowY + 9} Z`} fill={colors.text} />
              <Rect x={barX - 4} y={barY - 24} width={g.scaleBox.width} height={32} fill={colors.surface} opacity={0.8} />
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
            <PlotLabel x={left} y={8} align="left" width={120}>
              North (m) ↑
            </PlotLabel>
            {datumLabel ? (
              <PlotLabel x={datumLabel.box.x} y={datumLabel.box.y + 8} align="left" width={datumLabel.box.width} testID="plan-datum-label">
                Datum
              </PlotLabel>
            ) : null}
            <PlotLabel x={arrowX} y={arrowY + 32} muted={false} width={20} testID="north-arrow">
              N
            </PlotLabel>
            <PlotLabel x={barX + g.scalePx / 2} y={barY - 16} muted={false} width={g.scaleBox.width - 4} testID="scale-bar">
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
            {g.labels
              .filter((l) => l.key !== 'datum')
              .map((l) => (
                <PlotLabel
                  key={l.key}
                  x={l.box.x}
                  y={l.box.y + 8}
                  align="left"
                  muted={false}
                  width={l.box.width}
                  testID={`plan-find-${l.text}`}
                >
                  {l.text}
                </PlotLabel>
              ))}
          </>
        ) : null}
      </View>
      <View style={styles.footer}>
        <KindLegend kinds={kinds} />
        <Text variant="caption" muted>
          The grey line is the vehicle’s track; the cross is the site datum.
          {g.datumOff
            ? ` The datum lies off the plan, ${Math.round(Math.hypot(g.datumOff.east, g.datumOff.north))} m ${compass(g.datumOff.east, g.datumOff.north)} of its centre.`
            : ''}
          {unplaced > 0
            ? ` ${unplaced === 1 ? 'One entry has' : `${unplaced} entries have`} no position, so ${unplaced === 1 ? 'it is' : 'they are'} not on the plan.`
            : ''}
        </Text>
      </View>
    </View>
  );
}

/** "north-east" and the like, for a direction given as east and north components. */
function compass(east: number, north: number): string {
  const names = ['north', 'north-east', 'east', 'south-east', 'south', 'south-west', 'west', 'north-west'];
  const deg = (Math.atan2(east, north) * 180) / Math.PI;
  return names[Math.round(((deg + 360) % 360) / 45) % 8]!;
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  footer: { gap: space.xs },
});
