import React from 'react';
import { View } from 'react-native';
import { Slot } from 'expo-router';
import { AppProviders } from '@/client/AppProviders';
import { colors } from '@/client/theme';

export default function RootLayout() {
  return (
    <AppProviders>
      <View style={{ flex: 1, backgroundColor: colors.paper }}>
        <Slot />
      </View>
    </AppProviders>
  );
}
