import React from 'react';
import { View } from 'react-native';
import { errorMessage } from '../api/http';
import { ROLE_LABELS, ROLES, type Role, type User } from '../api/types';
import { useUpdateUser, useUsers } from '../queries/users';
import { useSession } from '../session/SessionProvider';
import { colors, space } from '../theme';
import { Badge, RoleBadge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Choice } from '../ui/Choice';
import { EmptyState, ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';

const ROLE_OPTIONS = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

function PersonRow({ person, isSelf }: { person: User; isSelf: boolean }) {
  const update = useUpdateUser();
  return (
    <View style={{ gap: space.sm, paddingVertical: space.md, borderTopWidth: 1, borderTopColor: colors.rule }} testID={`person-${person.email}`}>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' }}>
        <View style={{ flexShrink: 1, flexGrow: 1 }}>
          <Text style={{ fontWeight: '600' }}>
            {person.name}
            {isSelf ? ' (you)' : ''}
          </Text>
          <Text variant="monoSmall">{person.email}</Text>
        </View>
        {person.active ? null : <Badge label="Deactivated" tone="danger" testID={`person-inactive-${person.email}`} />}
        {isSelf ? <RoleBadge role={person.role} /> : null}
      </View>
      {!isSelf ? (
        <View style={{ flexDirection: 'row', alignItems: 'flex-end', gap: space.md, flexWrap: 'wrap' }}>
          <Choice<Role>
            testID={`person-role-${person.email}`}
            value={person.role}
            options={ROLE_OPTIONS}
            onChange={(role) => role !== person.role && update.mutate({ id: person.id, role })}
          />
          <Button
            small
            kind={person.active ? 'ghost' : 'secondary'}
            label={person.active ? 'Deactivate' : 'Reactivate'}
            accessibilityLabel={`${person.active ? 'Deactivate' : 'Reactivate'} ${person.name}`}
            testID={`person-toggle-${person.email}`}
            busy={update.isPending}
            onPress={() => update.mutate({ id: person.id, active: !person.active })}
          />
        </View>
      ) : null}
      {update.isError ? <Notice tone="error">{errorMessage(update.error)}</Notice> : null}
    </View>
  );
}

export function PeopleView() {
  const users = useUsers();
  const { user } = useSession();
  if (users.isPending) return <LoadingState label="Loading people…" />;
  if (users.isError) return <ErrorState error={users.error} onRetry={() => void users.refetch()} />;
  if (users.data.length === 0) return <EmptyState title="Nobody here yet" />;
  return (
    <Card title={`People in ${user?.labName ?? 'the lab'} (${users.data.length})`} testID="people-list">
      <Text variant="small">A role change takes effect on the person's next request. Deactivated people cannot sign in.</Text>
      <View>
        {users.data.map((p) => (
          <PersonRow key={p.id} person={p} isSelf={p.id === user?.id} />
        ))}
      </View>
    </Card>
  );
}
