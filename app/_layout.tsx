import { AtkinsonHyperlegible_400Regular } from '@expo-google-fonts/atkinson-hyperlegible/400Regular';
import { AtkinsonHyperlegible_700Bold } from '@expo-google-fonts/atkinson-hyperlegible/700Bold';
import { useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useState } from 'react';
import { View } from 'react-native';
import { KeptQueryProvider } from '../components/kept/KeptQueryProvider';
import { UpdatePrompt } from '../components/pwa/UpdatePrompt';
import { makeQueryClient } from '../components/queries/queryClient';
import { colors } from '../components/theme';

export default function RootLayout() {
  const [queryClient] = useState(makeQueryClient);
  const [fontsLoaded, fontError] = useFonts({ AtkinsonHyperlegible_400Regular, AtkinsonHyperlegible_700Bold });
  if (!fontsLoaded && !fontError) return <View style={{ flex: 1, backgroundColor: colors.paper }} />;
  return (
    <KeptQueryProvider client={queryClient}>
      <StatusBar style="dark" />
      <View style={{ flex: 1, backgroundColor: colors.paper }}>
        <Slot />
        <UpdatePrompt />
      </View>
    </KeptQueryProvider>
  );
}
