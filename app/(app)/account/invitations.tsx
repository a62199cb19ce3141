import React from 'react';
import { InvitationsView } from '@/client/account/InvitationsView';
import { LeadOnly } from '@/client/account/LeadOnly';
import { Screen } from '@/client/ui/Screen';

export default function InvitationsScreen() {
  return (
    <LeadOnly>
      <Screen title="Invitations" testID="invitations-screen" maxWidth={760}>
        <InvitationsView />
      </Screen>
    </LeadOnly>
  );
}
