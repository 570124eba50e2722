import { Linking, Pressable, StyleSheet } from 'react-native';
import { Text } from '../text';
import { colors, radii, space } from '../theme';

/** Native: a button that opens the file's address with the system (the session cookie goes along). */
export function DownloadLink({ href, title, label }: { href: string; title: string; label?: string; fileName?: string }) {
  return (
    <Pressable role="link" aria-label={label ?? title} onPress={() => void Linking.openURL(href)} style={styles.button}>
      <Text bold variant="small" color={colors.accent}>
        {title}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  button: { minHeight: 36, paddingHorizontal: space.md, borderWidth: 1.5, borderColor: colors.accent, borderRadius: radii.md, justifyContent: 'center' },
});
