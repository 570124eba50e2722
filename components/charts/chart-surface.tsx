// The interactive frame every chart draws in: measures its width, holds the plot rectangle, and
// turns drag and keys into zoom / pan (or a brushed x interval) — never hover. The SVG itself is
// hidden from assistive technology; the frame carries the chart's one-sentence summary as its
// accessible name (role img), and the controls are ordinary buttons beside it.
import { useMemo, useRef, useState, type ReactNode } from 'react';
import { PanResponder, Platform, StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg from 'react-native-svg';
import { colors, radii } from '../theme';
import type { ChartZoom, Domain } from './zoom';

export interface Margins {
  top: number;
  right: number;
  bottom: number;
  left: number;
}

export interface Plot {
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface SurfaceContext {
  width: number;
  height: number;
  plot: Plot;
  /** The x domain to draw: the zoom's, or the one being dragged to. */
  domain: Domain;
}

export interface BrushOptions {
  /** Called with the selected x interval (data units, from < to) when a drag ends. */
  onBrush: (from: number, to: number) => void;
  /** The current selection, drawn as a band (data units). */
  value?: Domain | null;
}

export interface ChartSurfaceProps {
  /** What the chart shows, in one or two sentences: the accessible name of the chart. */
  label: string;
  height: number;
  margins: Margins;
  /** The x domain when there is no zoom. */
  domain: Domain;
  zoom?: ChartZoom;
  brush?: BrushOptions;
  /** SVG content for the measured size. */
  children: (ctx: SurfaceContext) => ReactNode;
  testID?: string;
}

// DOM-only props react-native-web forwards (tabIndex, onKeyDown); React Native's types lack them.
type WebKeyEvent = { key: string; preventDefault(): void; shiftKey?: boolean };

export function ChartSurface({ label, height, margins, domain, zoom, brush, children, testID }: ChartSurfaceProps) {
  const [width, setWidth] = useState(0);
  const [drag, setDrag] = useState<Domain | null>(null);
  const [sel, setSel] = useState<[number, number] | null>(null);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (Math.abs(w - width) > 1) setWidth(w);
  };
  const plot: Plot = {
    x: margins.left,
    y: margins.top,
    w: Math.max(10, width - margins.left - margins.right),
    h: Math.max(10, height - margins.top - margins.bottom),
  };
  const shown = drag ?? zoom?.domain ?? domain;

  // Latest values for the responder callbacks, which are created once.
  const live = useRef({ plot, shown, zoom, brush });
  live.current = { plot, shown, zoom, brush };
  const start = useRef<{ x: number; domain: Domain } | null>(null);

  const responder = useMemo(
    () =>
      PanResponder.create({
        onStartShouldSetPanResponder: () => !!(live.current.zoom || live.current.brush),
        // Let vertical swipes scroll the page; claim the gesture once it is clearly sideways.
        onMoveShouldSetPanResponder: (_, g) => !!(live.current.zoom || live.current.brush) && Math.abs(g.dx) > 4 && Math.abs(g.dx) > Math.abs(g.dy),
        onPanResponderTerminationRequest: () => false,
        onPanResponderGrant: (e) => {
          start.current = { x: e.nativeEvent.locationX, domain: live.current.shown };
        },
        onPanResponderMove: (_, g) => {
          const s = start.current;
          if (!s) return;
          const { plot: p, brush: b } = live.current;
          if (b) {
            const a = Math.min(Math.max(s.x - p.x, 0), p.w);
            const z = Math.min(Math.max(s.x + g.dx - p.x, 0), p.w);
            setSel([Math.min(a, z), Math.max(a, z)]);
          } else {
            const span = s.domain[1] - s.domain[0];
            const shift = (-g.dx / p.w) * span;
            setDrag([s.domain[0] + shift, s.domain[1] + shift]);
          }
        },
        onPanResponderRelease: (_, g) => {
          const s = start.current;
          start.current = null;
          const { plot: p, brush: b, zoom: z } = live.current;
          if (s && b) {
            const a = Math.min(Math.max(s.x - p.x, 0), p.w);
            const e = Math.min(Math.max(s.x + g.dx - p.x, 0), p.w);
            setSel(null);
            if (Math.abs(e - a) > 3) {
              const toX = (px: number) => s.domain[0] + (px / p.w) * (s.domain[1] - s.domain[0]);
              b.onBrush(toX(Math.min(a, e)), toX(Math.max(a, e)));
            }
          } else if (s && z && Math.abs(g.dx) > 2) {
            const span = s.domain[1] - s.domain[0];
            const shift = (-g.dx / p.w) * span;
            z.set([s.domain[0] + shift, s.domain[1] + shift]);
          }
          setDrag(null);
        },
        onPanResponderTerminate: () => {
          start.current = null;
          setDrag(null);
          setSel(null);
        },
      }),
    [],
  );

  const onKeyDown = (e: WebKeyEvent) => {
    if (!zoom) return;
    const k = e.key;
    const step = e.shiftKey ? 0.5 : 0.2;
    if (k === 'ArrowLeft') zoom.pan(-step);
    else if (k === 'ArrowRight') zoom.pan(step);
    else if (k === '+' || k === '=') zoom.zoomIn();
    else if (k === '-' || k === '_') zoom.zoomOut();
    else if (k === '0' || k === 'Home') zoom.reset();
    else return;
    e.preventDefault();
  };

  const interactive = !!(zoom || brush);
  const keyProps = zoom && Platform.OS === 'web' ? ({ tabIndex: 0, onKeyDown } as object) : {};
  const brushValue = brush?.value;

  return (
    <View
      onLayout={onLayout}
      style={[styles.wrap, { height }]}
      role="img"
      aria-label={zoom ? `${label} Arrow keys move earlier or later; plus and minus zoom; 0 resets.` : label}
      testID={testID}
      {...keyProps}
    >
      {width > 0 ? (
        <Svg width={width} height={height} aria-hidden>
          {children({ width, height, plot, domain: shown })}
        </Svg>
      ) : null}
      {interactive && width > 0 ? (
        <View
          {...responder.panHandlers}
          aria-hidden
          // The drag layer covers the whole frame (so the grab point needs no offset maths) and
          // has no children, so locationX is measured from its left edge. pan-y keeps page scroll.
          style={[StyleSheet.absoluteFill, styles.dragLayer, Platform.OS === 'web' ? ({ touchAction: 'pan-y', cursor: brush ? 'crosshair' : 'grab' } as object) : null]}
        />
      ) : null}
      {sel ? <View pointerEvents="none" style={[styles.sel, { left: plot.x + sel[0], width: Math.max(1, sel[1] - sel[0]), top: plot.y, height: plot.h }]} /> : null}
      {brushValue && !sel && width > 0 ? (
        <BrushBand plot={plot} domain={shown} value={brushValue} />
      ) : null}
    </View>
  );
}

function BrushBand({ plot, domain, value }: { plot: Plot; domain: Domain; value: Domain }) {
  const toPx = (v: number) => ((v - domain[0]) / (domain[1] - domain[0])) * plot.w;
  const a = Math.max(0, Math.min(plot.w, toPx(value[0])));
  const b = Math.max(0, Math.min(plot.w, toPx(value[1])));
  if (b - a < 1) return null;
  return <View pointerEvents="none" style={[styles.sel, styles.selKept, { left: plot.x + a, width: b - a, top: plot.y, height: plot.h }]} />;
}

const styles = StyleSheet.create({
  wrap: { width: '100%', position: 'relative', borderRadius: radii.sm },
  dragLayer: { backgroundColor: 'transparent' },
  sel: { position: 'absolute', backgroundColor: 'rgba(15,110,106,0.16)', borderLeftWidth: 1, borderRightWidth: 1, borderColor: colors.accent },
  selKept: { backgroundColor: 'rgba(15,110,106,0.10)' },
});
