import React from 'react';
import { LeadOnly } from '@/client/account/LeadOnly';
import { PeopleView } from '@/client/account/PeopleView';
import { Screen } from '@/client/ui/Screen';

export default function PeopleScreen() {
  return (
    <LeadOnly>
      <Screen title="People" testID="people-screen" maxWidth={760}>
        <PeopleView />
      </Screen>
    </LeadOnly>
  );
}
