import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { FitMethodResult } from '@/shared/api/fits';
import { LineChart, useChartZoom, type Domain } from '../charts';
import { Text } from '../text';
import { colors, space } from '../theme';
import { formatSeconds, formatWithUnit } from '../recordings/units';
import { gridPoints, residualOf, rms, sumOfModes } from './reconstruct';

type Series = FitMethodResult['reconstruction']['series'][number];

export interface RingdownChartsProps {
  series: Series;
  stepSeconds: number;
  enabled: readonly boolean[];
  /** The channel's unit symbol ("°", "Hz", "MW") and axis quantity ("Angle"). */
  unit: string;
  quantity: string;
  methodTitle: string;
}

/** Colour of the reconstruction (tests find its path by it). */
export const RECONSTRUCTION_COLOR = colors.accent;

/**
 * The detrended signal with the reconstruction from the modes switched on drawn over it, and
 * below, the residual (signal − that reconstruction) on the same time axis and zoom.
 */
export function RingdownCharts({ series, stepSeconds, enabled, unit, quantity, methodTitle }: RingdownChartsProps) {
  const recon = useMemo(() => sumOfModes(series, enabled), [series, enabled]);
  const resid = useMemo(() => residualOf(series, recon), [series, recon]);
  const span = (series.input.length - 1) * stepSeconds;
  const full = useMemo<Domain>(() => [0, Math.max(stepSeconds, span)], [span, stepSeconds]);
  const zoom = useChartZoom({ full, minSpan: Math.max(0.5, stepSeconds * 8) });
  const input = useMemo(() => gridPoints(series.input, stepSeconds), [series.input, stepSeconds]);
  const reconPts = useMemo(() => gridPoints(recon, stepSeconds), [recon, stepSeconds]);
  const residPts = useMemo(() => gridPoints(resid, stepSeconds), [resid, stepSeconds]);
  const on = enabled.filter(Boolean).length;
  const inputRms = rms(series.input);
  const residRms = rms(resid);
  const explained = inputRms > 0 ? 1 - (residRms * residRms) / (inputRms * inputRms) : Number.NaN;
  const reconLabel =
    on === enabled.length
      ? `${methodTitle} reconstruction, ${on === 1 ? 'its one mode' : `all ${on} modes`}`
      : `${methodTitle} reconstruction, ${on} of ${enabled.length} modes`;

  return (
    <View style={styles.stack}>
      <LineChart
        label={`${series.channel}: detrended signal over ${formatSeconds(span)} with the ${reconLabel.toLowerCase()} drawn over it. Residual RMS ${formatWithUnit(residRms, unit)}.`}
        height={240}
        x={{ kind: 'linear', title: 'Time after the interval start, s' }}
        y={{ title: `${quantity}, ${unit}` }}
        series={[
          { kind: 'line', id: 'input', label: 'Signal (detrended)', points: input, color: colors.inkMuted, width: 1.25 },
          { kind: 'line', id: 'recon', label: reconLabel, points: reconPts, color: RECONSTRUCTION_COLOR, width: 2.25 },
        ]}
        xExtent={full}
        zoom={zoom}
        what="the fit"
        testID="ringdown-fit-chart"
      />
      <LineChart
        label={`Residual of ${series.channel}: the signal minus the reconstruction drawn, RMS ${formatWithUnit(residRms, unit)}.`}
        height={150}
        x={{ kind: 'linear', title: 'Time after the interval start, s' }}
        y={{ title: `Residual, ${unit}`, include: [0] }}
        series={[{ kind: 'line', id: 'resid', label: 'Residual', points: residPts, color: colors.ink, width: 1.1 }]}
        refLines={[{ y: 0, label: '0', color: colors.ruleStrong, dash: '2 3' }]}
        xExtent={full}
        zoom={zoom}
        controls={false}
        legend={false}
        testID="ringdown-residual-chart"
      />
      <Text variant="caption" muted testID="ringdown-residual-summary">
        {`Residual RMS ${formatWithUnit(residRms, unit)} against a signal RMS of ${formatWithUnit(inputRms, unit)}${
          Number.isFinite(explained) ? ` · the modes drawn explain ${Math.max(0, Math.round(explained * 100))} % of the signal's energy` : ''
        }.`}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
});
