import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { KeelMark } from './keel-mark';
import { Heading, Text } from './text';
import { colors, space } from './theme';

export function NotFoundScreen() {
  return (
    <View style={styles.root}>
      <KeelMark size={40} />
      <Heading level={1} style={styles.title}>
        Page not found
      </Heading>
      <Text muted>There is no screen at this address.</Text>
      <Link href="/" style={styles.link} aria-label="Go to Watch">
        <Text bold color={colors.accent}>
          Go to Watch
        </Text>
      </Link>
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, alignItems: 'center', justifyContent: 'center', padding: space.xl, backgroundColor: colors.paper, gap: space.sm },
  title: { marginTop: space.md },
  link: { marginTop: space.lg },
});
