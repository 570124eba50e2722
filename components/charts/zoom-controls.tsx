// Buttons for a chart's zoom and pan: the same actions as drag and the keyboard, for everyone.
import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, radii, space } from '../theme';
import type { ChartZoom } from './zoom';

interface ZoomControlsProps {
  zoom: ChartZoom;
  /** What the chart is, for the buttons' accessible names ("Zoom in on damping"). */
  what?: string;
  /** Words of the reset button (default "Whole span"). */
  resetTitle?: string;
  /** Disable the reset button when the view is already the whole span. */
  testID?: string;
}

function IconButton({ title, label, onPress, disabled }: { title: string; label: string; onPress: () => void; disabled?: boolean }) {
  return (
    <Pressable
      role="button"
      aria-label={label}
      aria-disabled={disabled || undefined}
      disabled={disabled}
      onPress={onPress}
      style={({ pressed }) => [styles.btn, pressed && styles.pressed, disabled && styles.disabled]}
    >
      <Text bold color={colors.accent} style={styles.glyph}>
        {title}
      </Text>
    </Pressable>
  );
}

export function ZoomControls({ zoom, what, resetTitle = 'Whole span', testID }: ZoomControlsProps) {
  const on = what ? ` on ${what}` : '';
  return (
    <View style={styles.row} testID={testID} role="toolbar" aria-label={`Zoom and pan${on}`}>
      <IconButton title="←" label={`Earlier${on}`} onPress={() => zoom.pan(-0.25)} />
      <IconButton title="→" label={`Later${on}`} onPress={() => zoom.pan(0.25)} />
      <IconButton title="−" label={`Zoom out${on}`} onPress={() => zoom.zoomOut()} />
      <IconButton title="+" label={`Zoom in${on}`} onPress={() => zoom.zoomIn()} />
      <Pressable
        role="button"
        aria-label={`${resetTitle}${on}`}
        disabled={!zoom.zoomed}
        aria-disabled={!zoom.zoomed || undefined}
        onPress={() => zoom.reset()}
        style={({ pressed }) => [styles.btn, styles.wide, pressed && styles.pressed, !zoom.zoomed && styles.disabled]}
      >
        <Text variant="small" bold color={colors.accent}>
          {resetTitle}
        </Text>
      </Pressable>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, alignItems: 'center' },
  btn: {
    minWidth: 40,
    height: 36,
    borderRadius: radii.md,
    borderWidth: 1.5,
    borderColor: colors.rule,
    backgroundColor: colors.surface,
    alignItems: 'center',
    justifyContent: 'center',
  },
  wide: { paddingHorizontal: space.md },
  pressed: { backgroundColor: colors.accentSoft },
  disabled: { opacity: 0.45 },
  glyph: { fontSize: 18, lineHeight: 20 },
});
