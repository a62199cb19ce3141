import React from 'react';
import { LeadOnly } from '@/client/account/LeadOnly';
import { OutboxView } from '@/client/account/OutboxView';
import { Screen } from '@/client/ui/Screen';

export default function OutboxScreen() {
  return (
    <LeadOnly>
      <Screen title="Outbox" testID="outbox-screen" maxWidth={760}>
        <OutboxView />
      </Screen>
    </LeadOnly>
  );
}
