import React from 'react';
import { View } from 'react-native';
import { Slot } from 'expo-router';
import { AccountNav } from '@/client/account/AccountNav';
import { useIsWide } from '@/client/ui/useLayout';

export default function AccountLayout() {
  const wide = useIsWide();
  return (
    <View style={{ flex: 1, flexDirection: wide ? 'row' : 'column', minHeight: 0 }}>
      <AccountNav />
      <View style={{ flex: 1, minWidth: 0, minHeight: 0 }}>
        <Slot />
      </View>
    </View>
  );
}
