// Keel's chart library (react-native-svg; d3-scale / d3-shape for scales and paths). See each file.
export { ChartSurface, type BrushOptions, type Margins, type Plot, type SurfaceContext } from './chart-surface';
export { XAxis, YAxis, RefLine, HaloText, linear, type RefLineSpec, type Scale } from './axes';
export { LineChart, Legend, withGaps, dataExtentX, type ChartSeries, type BandPoint, type MarkerPoint, type ShadedSpan, type XMarker, type LineChartProps } from './line-chart';
export { DampingChart, describeDamping, thresholdLines, medianSpacing, type DampingPoint, type DampingBucket, type DampingChartProps } from './damping-chart';
export { Sparkline, type SparkPoint, type SparklineProps } from './sparkline';
export { ScatterChart, type ScatterPoint, type FitLinePoint, type Projection, type ScatterChartProps } from './scatter-chart';
export { PolarChart, describeShape, groupColorMap, GROUP_PALETTE, type PolarEntry, type PolarChartProps } from './polar-chart';
export { MarkerShape, bandMarker, BAND_MARKER, type MarkerKind } from './markers';
export { ZoomControls } from './zoom-controls';
export { useChartZoom, zoomDomain, panDomain, clampDomain, type ChartZoom, type ChartZoomOptions, type Domain } from './zoom';
export { decimateMinMax, clipToDomain, type XY } from './decimate';
export { timeTicks, timeTickLabel, valueTicks, tickNumber, paddedExtent } from './ticks';
