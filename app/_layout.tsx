import { WorkSans_400Regular } from '@expo-google-fonts/work-sans/400Regular';
import { WorkSans_500Medium } from '@expo-google-fonts/work-sans/500Medium';
import { WorkSans_600SemiBold } from '@expo-google-fonts/work-sans/600SemiBold';
import { FontDisplay, useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { FontStateProvider } from '@/components/theme/font-state';
import { colors } from '@/components/theme/tokens';
import { makeQueryClient } from '@/hooks/api/query-client';
import { OfflineQueryProvider } from '@/hooks/offline/offline-query-provider';
import { SessionProvider } from '@/hooks/use-session';

// Text paints at once in the system font and swaps to Work Sans when it arrives.
const fonts = {
  WorkSans_400Regular: { uri: WorkSans_400Regular, display: FontDisplay.SWAP },
  WorkSans_500Medium: { uri: WorkSans_500Medium, display: FontDisplay.SWAP },
  WorkSans_600SemiBold: { uri: WorkSans_600SemiBold, display: FontDisplay.SWAP },
};

export default function RootLayout() {
  const [queryClient] = useState(() => makeQueryClient());
  const [fontsLoaded] = useFonts(fonts);

  return (
    <SafeAreaProvider>
      <OfflineQueryProvider client={queryClient}>
        <SessionProvider>
          <FontStateProvider loaded={fontsLoaded}>
            <StatusBar style="dark" />
            <View style={styles.root}>
              <Slot />
            </View>
          </FontStateProvider>
        </SessionProvider>
      </OfflineQueryProvider>
    </SafeAreaProvider>
  );
}

const styles = StyleSheet.create({
  root: {
    flex: 1,
    backgroundColor: colors.bg,
  },
});
