import React, { useEffect, useState } from 'react';
import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { ApiError, errorMessage } from '@/client/api/http';
import { ROLE_LABELS } from '@/client/api/types';
import { useAcceptInvitation, useInvitationPreview } from '@/client/queries/invitations';
import { useSession } from '@/client/session/SessionProvider';
import { colors } from '@/client/theme';
import { AuthFrame } from '@/client/ui/AuthFrame';
import { Button } from '@/client/ui/Button';
import { Field } from '@/client/ui/Card';
import { ErrorState, LoadingState, Notice } from '@/client/ui/States';
import { Text } from '@/client/ui/Text';
import { NewPasswordFields } from '@/client/ui/NewPasswordFields';
import { TextField } from '@/client/ui/TextField';
import { useHydrated } from '@/client/ui/useHydrated';
import { checkNewPassword } from '@/client/validation';

export default function AcceptInvitation() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  const preview = useInvitationPreview(token);
  const accept = useAcceptInvitation();
  const session = useSession();
  const router = useRouter();
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [confirm, setConfirm] = useState('');
  const [errors, setErrors] = useState<{ name?: string; password?: string; confirm?: string }>({});
  const hydrated = useHydrated();

  useEffect(() => {
    if (preview.data && !name) setName(preview.data.name);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [preview.data]);

  if (!hydrated) {
    return (
      <AuthFrame title="Invitation" testID="accept-invitation-screen">
        <LoadingState label="Checking your invitation…" />
      </AuthFrame>
    );
  }
  if (!token) {
    return (
      <AuthFrame title="Invitation" testID="accept-invitation-screen">
        <Notice tone="error">This page needs the link from your invitation e-mail (it carries a token).</Notice>
        <Link href="/sign-in">
          <Text style={{ color: colors.accent }}>Go to sign in</Text>
        </Link>
      </AuthFrame>
    );
  }
  if (preview.isPending) {
    return (
      <AuthFrame title="Invitation" testID="accept-invitation-screen">
        <LoadingState label="Checking your invitation…" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = preview.error instanceof ApiError && preview.error.status === 404;
    return (
      <AuthFrame title="Invitation" testID="accept-invitation-screen">
        {gone ? (
          <Notice tone="error" testID="invitation-invalid">
            This invitation is unknown, has expired or was already used. Ask your lab lead for a new one.
          </Notice>
        ) : (
          <ErrorState error={preview.error} onRetry={() => void preview.refetch()} />
        )}
        <Link href="/sign-in">
          <Text style={{ color: colors.accent }}>Go to sign in</Text>
        </Link>
      </AuthFrame>
    );
  }

  const inv = preview.data;
  const submit = () => {
    const e = { ...checkNewPassword(password, confirm), ...(name.trim() ? {} : { name: 'Enter your name as colleagues know it.' }) };
    setErrors(e);
    if (Object.keys(e).length) return;
    accept.mutate(
      { token, name: name.trim(), password },
      {
        onSuccess: (result) => {
          session.signIn(result);
          router.replace('/devices');
        },
      },
    );
  };

  return (
    <AuthFrame title={`Join ${inv.labName}`} lead="Set your name and a password to finish your account." testID="accept-invitation-screen">
      <Field label="E-mail" value={inv.email} testID="invitation-email" />
      <Field label="Role" value={ROLE_LABELS[inv.role] ?? inv.role} testID="invitation-role" />
      <TextField label="Name" testID="accept-name" value={name} onChangeText={setName} error={errors.name} autoComplete="name" />
      <NewPasswordFields
        label="Password"
        testIDPrefix="accept"
        password={password}
        confirm={confirm}
        onChangePassword={setPassword}
        onChangeConfirm={setConfirm}
        errors={errors}
        onSubmit={submit}
      />
      {accept.isError ? <Notice tone="error">{errorMessage(accept.error)}</Notice> : null}
      <Button label="Create account and sign in" testID="accept-submit" onPress={submit} busy={accept.isPending} />
    </AuthFrame>
  );
}
