import React, { useState } from 'react';
import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { errorMessage } from '@/client/api/http';
import { useConfirmPasswordReset, useRequestPasswordReset } from '@/client/queries/auth';
import { colors } from '@/client/theme';
import { AuthFrame } from '@/client/ui/AuthFrame';
import { Button } from '@/client/ui/Button';
import { Notice } from '@/client/ui/States';
import { Text } from '@/client/ui/Text';
import { NewPasswordFields } from '@/client/ui/NewPasswordFields';
import { TextField } from '@/client/ui/TextField';
import { LoadingState } from '@/client/ui/States';
import { useHydrated } from '@/client/ui/useHydrated';
import { checkEmail, checkNewPassword } from '@/client/validation';

function RequestForm() {
  const request = useRequestPasswordReset();
  const [email, setEmail] = useState('');
  const [error, setError] = useState<string | null>(null);
  const submit = () => {
    const e = checkEmail(email);
    setError(e);
    if (!e) request.mutate({ email: email.trim() });
  };
  return (
    <AuthFrame title="Reset password" lead="We e-mail a link that lets you choose a new password." testID="reset-request-screen">
      {request.isSuccess ? (
        <Notice tone="ok" testID="reset-requested">
          If an account exists for that address, a reset link is on its way. It works once.
        </Notice>
      ) : (
        <>
          <TextField
            label="E-mail"
            testID="reset-email"
            value={email}
            onChangeText={setEmail}
            autoCapitalize="none"
            inputMode="email"
            autoComplete="email"
            error={error}
            onSubmitEditing={submit}
          />
          {request.isError ? <Notice tone="error">{errorMessage(request.error)}</Notice> : null}
          <Button label="Send reset link" testID="reset-submit" onPress={submit} busy={request.isPending} />
        </>
      )}
      <Link href="/sign-in">
        <Text variant="small" style={{ color: colors.accent }}>
          Back to sign in
        </Text>
      </Link>
    </AuthFrame>
  );
}

function ConfirmForm({ token }: { token: string }) {
  const confirmReset = useConfirmPasswordReset();
  const router = useRouter();
  const [password, setPassword] = useState('');
  const [confirm, setConfirm] = useState('');
  const [errors, setErrors] = useState<{ password?: string; confirm?: string }>({});
  const submit = () => {
    const e = checkNewPassword(password, confirm);
    setErrors(e);
    if (Object.keys(e).length) return;
    confirmReset.mutate({ token, password }, { onSuccess: () => router.replace('/sign-in?reset=done') });
  };
  return (
    <AuthFrame title="Choose a new password" testID="reset-confirm-screen">
      <NewPasswordFields
        label="New password"
        testIDPrefix="reset"
        password={password}
        confirm={confirm}
        onChangePassword={setPassword}
        onChangeConfirm={setConfirm}
        errors={errors}
        onSubmit={submit}
      />
      {confirmReset.isError ? <Notice tone="error">{errorMessage(confirmReset.error)}</Notice> : null}
      <Button label="Save new password" testID="reset-confirm-submit" onPress={submit} busy={confirmReset.isPending} />
    </AuthFrame>
  );
}

export default function ResetPassword() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  const hydrated = useHydrated();
  if (!hydrated) {
    return (
      <AuthFrame title="Reset password">
        <LoadingState />
      </AuthFrame>
    );
  }
  return token ? <ConfirmForm token={token} /> : <RequestForm />;
}
