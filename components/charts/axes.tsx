// Axes drawn inside a chart's SVG: value ticks with light grid lines on the left, time (UTC) or
// linear ticks along the bottom, each axis titled with its quantity and unit. Sized for a 390 px
// phone: at most ~5 ticks a side, 11 px Plex Mono labels.
import { G, Line, Text as SvgText } from 'react-native-svg';
import { colors, fonts } from '../theme';
import type { Plot } from './chart-surface';
import { tickNumber, timeAxisTitle, timeTickLabel, timeTicks, valueTicks } from './ticks';
import type { Domain } from './zoom';

export const AXIS_FONT = 11;
export const chartInk = { axis: colors.ruleStrong, grid: '#E6E1D7', label: colors.inkMuted, title: colors.ink } as const;

export type Scale = (v: number) => number;

export function linear(domain: Domain, range: readonly [number, number]): Scale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  const k = d1 === d0 ? 0 : (r1 - r0) / (d1 - d0);
  return (v: number) => r0 + (v - d0) * k;
}

export interface XAxisProps {
  plot: Plot;
  domain: Domain;
  kind: 'time' | 'linear';
  /** Linear axes: the title with its unit, e.g. "Time after the event, s" or "Transfer, MW". */
  title?: string;
  /** Time axes: the title is the UTC date (or date range) of the view unless given. */
  maxTicks?: number;
}

export function XAxis({ plot, domain, kind, title, maxTicks }: XAxisProps) {
  const scale = linear(domain, [plot.x, plot.x + plot.w]);
  const count = maxTicks ?? Math.max(2, Math.min(7, Math.floor(plot.w / 78)));
  const base = plot.y + plot.h;
  let ticks: { x: number; main: string; sub: string | null }[];
  let axisTitle = title ?? '';
  if (kind === 'time') {
    const { ticks: ts, step } = timeTicks(domain[0], domain[1], count);
    ticks = ts.map((t) => ({ x: scale(t), ...timeTickLabel(t, step) }));
    if (!title) axisTitle = timeAxisTitle(domain[0], domain[1]);
  } else {
    const { ticks: vs, decimals } = valueTicks(domain[0], domain[1], count);
    ticks = vs.map((v) => ({ x: scale(v), main: tickNumber(v, decimals), sub: null }));
  }
  return (
    <G>
      <Line x1={plot.x} x2={plot.x + plot.w} y1={base} y2={base} stroke={chartInk.axis} strokeWidth={1} />
      {ticks.map((t, i) =>
        t.x < plot.x - 0.5 || t.x > plot.x + plot.w + 0.5 ? null : (
          <G key={i}>
            <Line x1={t.x} x2={t.x} y1={base} y2={base + 4} stroke={chartInk.axis} strokeWidth={1} />
            <SvgText x={t.x} y={base + 16} fontSize={AXIS_FONT} fontFamily={fonts.mono} fill={chartInk.label} textAnchor="middle">
              {t.main}
            </SvgText>
            {t.sub ? (
              <SvgText x={t.x} y={base + 29} fontSize={AXIS_FONT - 1} fontFamily={fonts.mono} fill={chartInk.label} textAnchor="middle">
                {t.sub}
              </SvgText>
            ) : null}
          </G>
        ),
      )}
      {axisTitle ? (
        <SvgText x={plot.x + plot.w} y={base + (ticks.some((t) => t.sub) ? 42 : 31)} fontSize={AXIS_FONT} fontFamily={fonts.text} fill={chartInk.label} textAnchor="end">
          {axisTitle}
        </SvgText>
      ) : null}
    </G>
  );
}

export interface YAxisProps {
  plot: Plot;
  domain: Domain;
  /** Quantity and unit, written above the axis, e.g. "Damping ratio, %". */
  title: string;
  maxTicks?: number;
  /** Ticks to add whatever the step (the thresholds). */
  grid?: boolean;
}

export function YAxis({ plot, domain, title, maxTicks, grid = true }: YAxisProps) {
  const scale = linear(domain, [plot.y + plot.h, plot.y]);
  const count = maxTicks ?? Math.max(2, Math.min(6, Math.floor(plot.h / 36)));
  const { ticks, decimals } = valueTicks(domain[0], domain[1], count);
  return (
    <G>
      {ticks.map((v, i) => {
        const y = scale(v);
        if (y < plot.y - 0.5 || y > plot.y + plot.h + 0.5) return null;
        return (
          <G key={i}>
            {grid ? <Line x1={plot.x} x2={plot.x + plot.w} y1={y} y2={y} stroke={chartInk.grid} strokeWidth={1} /> : null}
            <SvgText x={plot.x - 6} y={y + 4} fontSize={AXIS_FONT} fontFamily={fonts.mono} fill={chartInk.label} textAnchor="end">
              {tickNumber(v, decimals)}
            </SvgText>
          </G>
        );
      })}
      <Line x1={plot.x} x2={plot.x} y1={plot.y} y2={plot.y + plot.h} stroke={chartInk.axis} strokeWidth={1} />
      <SvgText x={Math.max(2, plot.x - 30)} y={plot.y - 9} fontSize={AXIS_FONT + 1} fontFamily={fonts.textBold} fill={chartInk.title} textAnchor="start">
        {title}
      </SvgText>
    </G>
  );
}

export interface RefLineSpec {
  /** Value on the y axis. */
  y: number;
  /** Written at the line's right end, e.g. "5 % low". */
  label: string;
  color: string;
  dash?: string;
  /** Where the label sits along the line (default 'end', the right). */
  align?: 'start' | 'end';
}

/** A labelled horizontal reference line (thresholds). The label sits just above the line, right-aligned. */
export function RefLine({ plot, scale, spec, labelBelow }: { plot: Plot; scale: Scale; spec: RefLineSpec; labelBelow?: boolean }) {
  const y = scale(spec.y);
  if (y < plot.y - 0.5 || y > plot.y + plot.h + 0.5) return null;
  const ty = labelBelow ? y + 13 : y - 4;
  return (
    <G>
      <Line x1={plot.x} x2={plot.x + plot.w} y1={y} y2={y} stroke={spec.color} strokeWidth={1.5} strokeDasharray={spec.dash ?? '6 4'} />
      <HaloText x={spec.align === 'start' ? plot.x + 6 : plot.x + plot.w - 4} y={ty} color={spec.color} anchor={spec.align === 'start' ? 'start' : 'end'} bold>
        {spec.label}
      </HaloText>
    </G>
  );
}

/** Text with a paper-coloured halo so it stays readable over lines and bands. */
export function HaloText({ x, y, color, anchor = 'start', bold, size = AXIS_FONT, mono, children }: { x: number; y: number; color: string; anchor?: 'start' | 'middle' | 'end'; bold?: boolean; size?: number; mono?: boolean; children: string }) {
  const family = mono ? fonts.mono : bold ? fonts.textBold : fonts.text;
  return (
    <G>
      <SvgText x={x} y={y} fontSize={size} fontFamily={family} fill={colors.surface} stroke={colors.surface} strokeWidth={3.5} strokeLinejoin="round" textAnchor={anchor}>
        {children}
      </SvgText>
      <SvgText x={x} y={y} fontSize={size} fontFamily={family} fill={color} textAnchor={anchor}>
        {children}
      </SvgText>
    </G>
  );
}
