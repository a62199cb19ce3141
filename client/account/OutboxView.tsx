import React from 'react';
import { View } from 'react-native';
import { Link } from 'expo-router';
import { ApiError } from '../api/http';
import { formatDate } from '../format/units';
import { useOutbox } from '../queries/outbox';
import { colors, space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Text } from '../ui/Text';

/** The demo server keeps outgoing mail here instead of delivering it, so a demo can follow invitation links. */
export function OutboxView() {
  const q = useOutbox();
  if (q.isPending) return <LoadingState label="Loading outbox…" />;
  if (q.isError) {
    if (q.error instanceof ApiError && q.error.status === 404) {
      return <EmptyState title="Outbox is off" body="The outbox exists only when the server runs in demo mode; real mail goes to the mail server." />;
    }
    return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  }
  return (
    <View style={{ gap: space.md }} testID="outbox-list">
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm }}>
        <Text variant="small" style={{ flex: 1 }}>
          Demo mode: e-mails the server would send, newest first.
        </Text>
        <Button small kind="secondary" label="Refresh" testID="outbox-refresh" onPress={() => void q.refetch()} busy={q.isFetching} />
      </View>
      {q.data.length === 0 ? (
        <EmptyState title="No mail yet" body="Invitations and password resets appear here." />
      ) : (
        [...q.data]
          .sort((a, b) => Date.parse(b.receivedAt) - Date.parse(a.receivedAt))
          .map((m) => (
            <Card key={m.id} title={m.subject} testID="outbox-message">
              <Text variant="monoSmall">
                to {m.to} · {formatDate(m.receivedAt, true)}
              </Text>
              <Text variant="small" numberOfLines={6}>
                {m.text}
              </Text>
              {m.links.map((href) => (
                <Link key={href} href={href as '/'} testID="outbox-link">
                  <Text variant="monoSmall" style={{ color: colors.accent }} numberOfLines={1}>
                    {href}
                  </Text>
                </Link>
              ))}
            </Card>
          ))
      )}
    </View>
  );
}
