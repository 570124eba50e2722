// Fonts ship inside the npm packages and are imported by weight path, so the bundle carries only
// the four faces we use and nothing is fetched from the network (DESIGN.md §4).
import { useFonts } from 'expo-font';
import { AtkinsonHyperlegible_400Regular } from '@expo-google-fonts/atkinson-hyperlegible/400Regular';
import { AtkinsonHyperlegible_700Bold } from '@expo-google-fonts/atkinson-hyperlegible/700Bold';
import { IBMPlexMono_400Regular } from '@expo-google-fonts/ibm-plex-mono/400Regular';
import { IBMPlexMono_500Medium } from '@expo-google-fonts/ibm-plex-mono/500Medium';
import { fonts } from './theme';

const faces = {
  [fonts.text]: AtkinsonHyperlegible_400Regular,
  [fonts.textBold]: AtkinsonHyperlegible_700Bold,
  [fonts.mono]: IBMPlexMono_400Regular,
  [fonts.monoMedium]: IBMPlexMono_500Medium,
};

/** True once every face is ready, or once loading failed (the app then falls back to system faces). */
export function useKeelFonts(): boolean {
  const [loaded, error] = useFonts(faces);
  return loaded || error != null;
}
