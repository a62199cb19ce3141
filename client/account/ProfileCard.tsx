import React from 'react';
import { View } from 'react-native';
import { useSession } from '../session/SessionProvider';
import { space } from '../theme';
import { RoleBadge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card, Field } from '../ui/Card';

export function ProfileCard() {
  const { user, signOut } = useSession();
  const [busy, setBusy] = React.useState(false);
  if (!user) return null;
  return (
    <Card title="You" testID="profile-card">
      <Field label="Name" value={user.name} testID="profile-name" />
      <Field label="E-mail" value={user.email} testID="profile-email" />
      <Field label="Role" value={<RoleBadge role={user.role} testID="profile-role" />} />
      <Field label="Lab" value={user.labName} />
      <View style={{ flexDirection: 'row', gap: space.sm, marginTop: space.sm }}>
        <Button
          label="Sign out"
          kind="secondary"
          testID="sign-out"
          busy={busy}
          onPress={async () => {
            setBusy(true);
            // The signed-in layout sends the person to sign-in once the session is gone.
            await signOut();
          }}
        />
      </View>
    </Card>
  );
}
