import React, { useState } from 'react';
import { View } from 'react-native';
import { errorMessage } from '../api/http';
import { ROLE_LABELS, ROLES, type Invitation, type Role } from '../api/types';
import { formatDate } from '../format/units';
import { useCreateInvitation, useInvitations } from '../queries/invitations';
import { colors, space } from '../theme';
import { Badge, RoleBadge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Choice } from '../ui/Choice';
import { ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { checkEmail } from '../validation';

const ROLE_OPTIONS = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

function InviteForm() {
  const create = useCreateInvitation();
  const [email, setEmail] = useState('');
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('experimentalist');
  const [errors, setErrors] = useState<{ email?: string; name?: string }>({});
  const [sentTo, setSentTo] = useState<string | null>(null);

  const submit = () => {
    const e: typeof errors = {};
    const emailErr = checkEmail(email);
    if (emailErr) e.email = emailErr;
    if (!name.trim()) e.name = 'Enter the name the invitation is addressed to.';
    setErrors(e);
    if (Object.keys(e).length) return;
    create.mutate(
      { email: email.trim(), name: name.trim(), role },
      {
        onSuccess: (inv) => {
          setSentTo(inv.email);
          setEmail('');
          setName('');
        },
      },
    );
  };

  return (
    <Card title="Invite someone" testID="invite-form">
      <TextField label="E-mail" testID="invite-email" value={email} onChangeText={setEmail} autoCapitalize="none" inputMode="email" error={errors.email} />
      <TextField label="Name" testID="invite-name" value={name} onChangeText={setName} error={errors.name} />
      <Choice<Role> label="Role" testID="invite-role" value={role} options={ROLE_OPTIONS} onChange={setRole} />
      {sentTo ? (
        <Notice tone="ok" testID="invite-sent">
          {`Invitation sent to ${sentTo}. The link in the e-mail works once.`}
        </Notice>
      ) : null}
      {create.isError ? <Notice tone="error" testID="invite-error">{errorMessage(create.error)}</Notice> : null}
      <View style={{ alignSelf: 'flex-start' }}>
        <Button label="Send invitation" testID="invite-submit" onPress={submit} busy={create.isPending} />
      </View>
    </Card>
  );
}

function status(inv: Invitation): { label: string; tone: 'ok' | 'pending' | 'neutral' } {
  if (inv.acceptedAt) return { label: `Accepted ${formatDate(inv.acceptedAt)}`, tone: 'ok' };
  if (Date.parse(inv.expiresAt) <= Date.now()) return { label: 'Expired', tone: 'neutral' };
  return { label: `Pending until ${formatDate(inv.expiresAt)}`, tone: 'pending' };
}

function InvitationList() {
  const q = useInvitations();
  if (q.isPending) return <LoadingState label="Loading invitations…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => void q.refetch()} />;
  return (
    <Card title={`Invitations (${q.data.length})`} testID="invitations-list">
      {q.data.length === 0 ? (
        <Text variant="small">No invitations sent yet.</Text>
      ) : (
        q.data.map((inv) => {
          const s = status(inv);
          return (
            <View key={inv.id} style={{ gap: 4, paddingTop: space.sm, borderTopWidth: 1, borderTopColor: colors.rule }} testID={`invitation-${inv.email}`}>
              <View style={{ flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' }}>
                <Text style={{ flexShrink: 1 }}>{inv.name}</Text>
                <RoleBadge role={inv.role} />
                <Badge label={s.label} tone={s.tone} />
              </View>
              <Text variant="monoSmall">
                {inv.email} · sent {formatDate(inv.createdAt)}
              </Text>
            </View>
          );
        })
      )}
    </Card>
  );
}

export function InvitationsView() {
  return (
    <View style={{ gap: space.lg }}>
      <InviteForm />
      <InvitationList />
    </View>
  );
}
