import { StyleSheet, View } from 'react-native';
import type { FitMethodResult } from '@/shared/api/fits';
import { BandChip } from '../band-chip';
import { Button } from '../button';
import { formatHz, formatPercent } from '../format';
import { Toggle } from '../fits/toggle';
import { formatDegrees, formatShare, formatWithUnit } from '../recordings/units';
import { Text } from '../text';
import { space } from '../theme';

export interface ModeSwitchesProps {
  method: FitMethodResult;
  methodTitle: string;
  channel: string;
  unit: string;
  enabled: readonly boolean[];
  onChange: (enabled: boolean[]) => void;
  trackName: (code: string | null) => string | null;
}

/** Each mode of the method as a switch: the reconstruction drawn is the sum of those on. */
export function ModeSwitches({ method, methodTitle, channel, unit, enabled, onChange, trackName }: ModeSwitchesProps) {
  const strongest = method.modes.reduce((best, m, i) => (best < 0 || m.energyShare > method.modes[best].energyShare ? i : best), -1);
  return (
    <View role="group" aria-label={`${methodTitle} modes in the reconstruction`} testID="mode-switches">
      {method.modes.map((m, k) => {
        const part = m.channels.find((c) => c.channel === channel);
        const name = trackName(m.trackCode);
        return (
          <Toggle
            key={m.id}
            value={!!enabled[k]}
            onChange={(on) => onChange(method.modes.map((_, j) => (j === k ? on : !!enabled[j])))}
            label={`${formatHz(m.frequencyHz)} · ${formatPercent(m.dampingPercent)}`}
            accessibleLabel={`Mode ${formatHz(m.frequencyHz)}, damping ${formatPercent(m.dampingPercent)}${name ? `, ${name}` : ''}, in the reconstruction`}
            hint={`${name ?? 'outside the tracks'} · ${formatShare(m.energyShare)} of the energy${part ? ` · ${formatWithUnit(part.amplitude, unit)} at ${formatDegrees(part.phaseDeg)} on ${channel}` : ''}`}
            testID={`mode-switch-${k}`}
          >
            <BandChip band={m.band} size="small" detail={formatPercent(m.dampingPercent)} />
          </Toggle>
        );
      })}
      <View style={styles.buttons}>
        <Button title="All on" label="Switch every mode on" kind="secondary" compact onPress={() => onChange(method.modes.map(() => true))} />
        {strongest >= 0 ? (
          <Button
            title="Strongest only"
            label="Switch on only the strongest mode"
            kind="quiet"
            compact
            onPress={() => onChange(method.modes.map((_, j) => j === strongest))}
          />
        ) : null}
      </View>
      {method.modes.length === 0 ? (
        <Text variant="small" muted>
          {`${methodTitle} found no mode in the band.`}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, marginTop: space.xs },
});
