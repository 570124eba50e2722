import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { StyleSheet, View } from 'react-native';
import { useKeelFonts } from '@/components/fonts';
import { installGlobalStyles } from '@/components/global-styles';
import { Providers } from '@/components/providers';
import { LoadingState } from '@/components/state-views';
import { colors } from '@/components/theme';

installGlobalStyles();

export default function RootLayout() {
  const fontsReady = useKeelFonts();
  // The router needs <Slot /> from the first render (otherwise it loses the URL it started at),
  // so the font wait is a cover over it rather than a replacement for it.
  return (
    <Providers>
      <StatusBar style="dark" />
      <Slot />
      {fontsReady ? null : (
        <View style={styles.cover}>
          <LoadingState label="Starting Keel…" />
        </View>
      )}
    </Providers>
  );
}

const styles = StyleSheet.create({
  cover: { position: 'absolute', top: 0, left: 0, right: 0, bottom: 0, backgroundColor: colors.paper, justifyContent: 'center', alignItems: 'center' },
});
