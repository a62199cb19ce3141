import React from 'react';
import { Link } from 'expo-router';
import { Screen } from '@/client/ui/Screen';
import { EmptyState } from '@/client/ui/States';
import { Text } from '@/client/ui/Text';
import { colors } from '@/client/theme';

export default function NotFound() {
  return (
    <Screen title="Page not found">
      <EmptyState title="Nothing lives at this address" body="The link may be out of date.">
        <Link href="/devices">
          <Text style={{ color: colors.accent }}>Go to Devices</Text>
        </Link>
      </EmptyState>
    </Screen>
  );
}
