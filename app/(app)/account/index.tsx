import React from 'react';
import { ProfileCard } from '@/client/account/ProfileCard';
import { TokensCard } from '@/client/account/TokensCard';
import { Screen } from '@/client/ui/Screen';

export default function AccountScreen() {
  return (
    <Screen title="Account" testID="account-screen" maxWidth={760}>
      <ProfileCard />
      <TokensCard />
    </Screen>
  );
}
