// Zoom and pan of a chart's x domain, by buttons, keys and drag (no hover-only actions). Pure
// domain arithmetic plus one hook holding the state; a screen that fetches data for the visible
// span (Trends) controls the domain itself and passes `domain` + `onDomainChange`.
import { useCallback, useEffect, useRef, useState } from 'react';

export type Domain = readonly [number, number];

/** Zoom by `factor` (< 1 zooms in) about `center` (default: the middle). */
export function zoomDomain(d: Domain, factor: number, center = (d[0] + d[1]) / 2): Domain {
  const lo = center - (center - d[0]) * factor;
  const hi = center + (d[1] - center) * factor;
  return [lo, hi];
}

/** Pan by a fraction of the span (negative: earlier / left). */
export function panDomain(d: Domain, fraction: number): Domain {
  const dx = (d[1] - d[0]) * fraction;
  return [d[0] + dx, d[1] + dx];
}

/**
 * Keeps a domain inside `bounds` (when given) and at least `minSpan` wide; a domain wider than
 * the bounds becomes the bounds.
 */
export function clampDomain(d: Domain, bounds: Domain | null, minSpan: number): Domain {
  let [lo, hi] = d[0] <= d[1] ? d : ([d[1], d[0]] as Domain);
  if (hi - lo < minSpan) {
    const c = (lo + hi) / 2;
    lo = c - minSpan / 2;
    hi = c + minSpan / 2;
  }
  if (!bounds) return [lo, hi];
  const span = hi - lo;
  if (span >= bounds[1] - bounds[0]) return [bounds[0], bounds[1]];
  if (lo < bounds[0]) return [bounds[0], bounds[0] + span];
  if (hi > bounds[1]) return [bounds[1] - span, bounds[1]];
  return [lo, hi];
}

export interface ChartZoom {
  domain: Domain;
  /** True when the view differs from the full extent. */
  zoomed: boolean;
  zoomIn(center?: number): void;
  zoomOut(center?: number): void;
  /** Pan by a fraction of the visible span (−0.25 = a quarter to the left / earlier). */
  pan(fraction: number): void;
  reset(): void;
  set(d: Domain): void;
}

export interface ChartZoomOptions {
  /** The data's full extent: what "Reset" returns to. */
  full: Domain;
  /** Keep the view inside these bounds (default: `full`; null: unbounded, for screens that fetch more). */
  bounds?: Domain | null;
  /** Narrowest span allowed (x units); default 1/1000 of the full extent. */
  minSpan?: number;
  /** Controlled domain (the screen owns it); with `onChange`. */
  domain?: Domain;
  onChange?: (d: Domain) => void;
  /** Where the buttons and keys zoom about (default: the middle of the view), e.g. the data's middle. */
  center?: number;
}

/** The zoom focus when it lies in the view, else the view's middle. */
function focusIn(d: Domain, focus: number | undefined): number {
  return focus != null && focus >= d[0] && focus <= d[1] ? focus : (d[0] + d[1]) / 2;
}

const same = (a: Domain, b: Domain) => a[0] === b[0] && a[1] === b[1];

export function useChartZoom({ full, bounds, minSpan, domain, onChange, center: focus }: ChartZoomOptions): ChartZoom {
  const [inner, setInner] = useState<Domain>(full);
  const fullRef = useRef(full);
  // A new data extent (another track, another period) starts a fresh view.
  useEffect(() => {
    if (!same(fullRef.current, full)) {
      fullRef.current = full;
      setInner(full);
    }
  }, [full]);
  const current = domain ?? inner;
  const lim = bounds === undefined ? full : bounds;
  const min = minSpan ?? Math.max(1e-9, (full[1] - full[0]) / 1000);
  const set = useCallback(
    (d: Domain) => {
      const c = clampDomain(d, lim, min);
      if (onChange) onChange(c);
      if (domain === undefined) setInner(c);
    },
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [lim?.[0], lim?.[1], min, onChange, domain === undefined],
  );
  return {
    domain: current,
    zoomed: !same(current, full),
    zoomIn: (center) => set(zoomDomain(current, 0.5, center ?? focusIn(current, focus))),
    zoomOut: (center) => set(zoomDomain(current, 2, center ?? focusIn(current, focus))),
    pan: (fraction) => set(panDomain(current, fraction)),
    reset: () => set(full),
    set,
  };
}
