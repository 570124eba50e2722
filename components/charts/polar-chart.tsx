// Mode shape on a polar plot: one arrow per PMU channel, length = relative magnitude (largest = 1),
// direction = phase angle in degrees (0° to the right, counter-clockwise positive, the usual
// phasor convention). Arrows coloured by group (area) with a key, and labelled at the tip where the
// labels do not collide; the full list belongs in a table beside the plot.
import { useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { Text } from '../text';
import { colors, fonts, space } from '../theme';
import { HaloText } from './axes';

export interface PolarEntry {
  id: string;
  /** Short name drawn at the arrow tip (a site code). */
  label: string;
  /** Relative magnitude, 0..1. */
  magnitude: number;
  angleDeg: number;
  group?: string;
}

export interface PolarChartProps {
  entries: PolarEntry[];
  /** Accessible summary. */
  label: string;
  /** Largest diameter, px (the plot shrinks to fit narrower frames). */
  maxSize?: number;
  /** Colour per group (area). */
  groupColors?: Record<string, string>;
  testID?: string;
}

/** Quiet, distinct hues for up to six areas; none is a band colour, so no arrow reads as a band. */
export const GROUP_PALETTE = ['#0F6E6A', '#14202B', '#8A5A2B', '#5E6F85', '#2E7D4F', '#9A4D75'];

export function groupColorMap(groups: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  [...new Set(groups)].forEach((g, i) => (out[g] = GROUP_PALETTE[i % GROUP_PALETTE.length]));
  return out;
}

interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}
const overlaps = (a: Box, b: Box) => a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;

export function PolarChart({ entries, label, maxSize = 360, groupColors, testID }: PolarChartProps) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (Math.abs(w - width) > 1) setWidth(w);
  };
  const size = Math.min(maxSize, width);
  const colorsBy = groupColors ?? groupColorMap(entries.map((e) => e.group ?? ''));
  const c = size / 2;
  const pad = 34;
  const R = Math.max(10, c - pad);
  const rad = (deg: number) => (deg * Math.PI) / 180;
  const at = (r: number, deg: number) => ({ x: c + r * Math.cos(rad(deg)), y: c - r * Math.sin(rad(deg)) });

  // Labels, largest first. Try beyond the tip, then along the arrow inside the circle; an arrow
  // whose label would land on one already placed (same direction, like size) adds "+1" to it.
  const placed: (Box & { deg: number; mag: number; idx: number })[] = [];
  const labels: { id: string; x: number; y: number; text: string; more: number; color: string; anchor: 'start' | 'middle' | 'end' }[] = [];
  const sorted = [...entries].sort((a, b) => b.magnitude - a.magnitude);
  for (const e of sorted) {
    const w = e.label.length * 6.6 + 22;
    const mag = Math.min(1, Math.max(0, e.magnitude));
    const cos = Math.cos(rad(e.angleDeg));
    const sin = Math.sin(rad(e.angleDeg));
    const tip = at(R * mag, e.angleDeg);
    const candidates: { x: number; y: number; anchor: 'start' | 'middle' | 'end' }[] = [];
    for (const extra of [10, 22]) {
      const p = at(R * mag + extra, e.angleDeg);
      candidates.push({ x: p.x, y: p.y + 4, anchor: cos > 0.3 ? 'start' : cos < -0.3 ? 'end' : 'middle' });
    }
    // Inside, just above / below the arrow, ending at the tip.
    const inAnchor: 'start' | 'end' = cos >= 0 ? 'end' : 'start';
    candidates.push({ x: tip.x - (cos >= 0 ? 10 : -10), y: tip.y - (sin >= 0 ? -14 : 8), anchor: inAnchor });
    candidates.push({ x: tip.x - (cos >= 0 ? 10 : -10), y: tip.y + (sin >= 0 ? -8 : 14), anchor: inAnchor });
    let done = false;
    for (const cnd of candidates) {
      const x0 = cnd.anchor === 'start' ? cnd.x : cnd.anchor === 'end' ? cnd.x - w : cnd.x - w / 2;
      const box = { x0, y0: cnd.y - 12, x1: x0 + w, y1: cnd.y + 3 };
      if (box.x0 < 0 || box.x1 > size || box.y0 < 0 || box.y1 > size) continue;
      if (placed.some((b) => overlaps(b, box))) continue;
      placed.push({ ...box, deg: e.angleDeg, mag, idx: labels.length });
      labels.push({ id: e.id, x: cnd.x, y: cnd.y, text: e.label, more: 0, color: colorsBy[e.group ?? ''] ?? colors.ink, anchor: cnd.anchor });
      done = true;
      break;
    }
    if (!done) {
      const twin = placed.find((b) => Math.abs(((b.deg - e.angleDeg + 540) % 360) - 180) < 15 && Math.abs(b.mag - mag) < 0.25);
      if (twin) labels[twin.idx].more += 1;
    }
  }
  const groups = Object.entries(colorsBy).filter(([g]) => g !== '');

  return (
    <View style={styles.wrap} onLayout={onLayout} testID={testID}>
      <View role="img" aria-label={label} style={[styles.plot, { height: size || 1, width: size || '100%' }]}>
        {size > 0 ? (
          <Svg width={size} height={size} aria-hidden>
            {[0.25, 0.5, 0.75, 1].map((f) => (
              <Circle key={f} cx={c} cy={c} r={R * f} fill={f === 1 ? colors.surface : 'none'} stroke={f === 1 ? colors.ruleStrong : colors.rule} strokeWidth={1} />
            ))}
            {[0, 30, 60, 90, 120, 150, 180, 210, 240, 270, 300, 330].map((deg) => {
              const p = at(R, deg);
              return <Line key={deg} x1={c} y1={c} x2={p.x} y2={p.y} stroke={colors.rule} strokeWidth={deg % 90 === 0 ? 1 : 0.6} />;
            })}
            {[0, 90, 180, 270].map((deg) => {
              const p = at(R + 12, deg);
              return (
                <SvgText key={`a${deg}`} x={p.x} y={p.y + 4} fontSize={10} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor={deg === 0 ? 'start' : deg === 180 ? 'end' : 'middle'}>
                  {`${deg}°`}
                </SvgText>
              );
            })}
            <SvgText x={c + 3} y={c - R * 0.5 - 3} fontSize={9} fontFamily={fonts.mono} fill={colors.inkMuted}>
              0.5
            </SvgText>
            {entries.map((e) => {
              const color = colorsBy[e.group ?? ''] ?? colors.ink;
              const len = R * Math.max(0, Math.min(1, e.magnitude));
              const tip = at(len, e.angleDeg);
              const head = Math.min(9, len * 0.45);
              const l = at(len - head, e.angleDeg + (head > 0 ? (Math.atan2(head * 0.5, len - head) * 180) / Math.PI : 0));
              const r = at(len - head, e.angleDeg - (head > 0 ? (Math.atan2(head * 0.5, len - head) * 180) / Math.PI : 0));
              return (
                <G key={e.id}>
                  <Line x1={c} y1={c} x2={tip.x} y2={tip.y} stroke={color} strokeWidth={2} strokeLinecap="round" />
                  {head > 1 ? <Path d={`M${tip.x} ${tip.y} L${l.x} ${l.y} L${r.x} ${r.y} Z`} fill={color} /> : null}
                </G>
              );
            })}
            <Circle cx={c} cy={c} r={2.5} fill={colors.ink} />
            {labels.map((l) => (
              <HaloText key={l.id} x={l.x} y={l.y} color={l.color} anchor={l.anchor} mono size={10.5}>
                {l.more > 0 ? `${l.text} +${l.more}` : l.text}
              </HaloText>
            ))}
          </Svg>
        ) : null}
      </View>
      {groups.length > 0 ? (
        <View style={styles.key} aria-hidden>
          {groups.map(([g, col]) => (
            <View key={g} style={styles.keyItem}>
              <View style={[styles.swatch, { backgroundColor: col }]} />
              <Text variant="caption" muted>
                {g}
              </Text>
            </View>
          ))}
        </View>
      ) : null}
    </View>
  );
}

/** "Mode shape: 9 PMU channels; largest at Moorgate (1.00, 0°); Highmoor swings against Saltreach by about 170°." */
export function describeShape(entries: { label: string; magnitude: number; angleDeg: number; group?: string }[]): string {
  if (entries.length === 0) return 'Mode shape: no channels stored.';
  const sorted = [...entries].sort((a, b) => b.magnitude - a.magnitude);
  const top = sorted.slice(0, 3).map((e) => `${e.label} ${e.magnitude.toFixed(2)} at ${Math.round(e.angleDeg)}°`);
  return `Mode shape on a polar plot, ${entries.length} PMU channels, magnitude relative to the largest and angle in degrees. Largest: ${top.join('; ')}.`;
}

const styles = StyleSheet.create({
  wrap: { width: '100%', alignItems: 'center' },
  plot: { alignSelf: 'center' },
  key: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'center', columnGap: space.md, rowGap: space.xxs, marginTop: space.xs },
  keyItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 12, height: 4, borderRadius: 2 },
});
