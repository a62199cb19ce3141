import React, { useState } from 'react';
import { View } from 'react-native';
import { Link, Redirect, useLocalSearchParams, useRouter } from 'expo-router';
import { errorMessage } from '@/client/api/http';
import { useSignIn } from '@/client/queries/auth';
import { useSession } from '@/client/session/SessionProvider';
import { colors, space } from '@/client/theme';
import { AuthFrame } from '@/client/ui/AuthFrame';
import { Button } from '@/client/ui/Button';
import { Notice } from '@/client/ui/States';
import { Text } from '@/client/ui/Text';
import { TextField } from '@/client/ui/TextField';
import { useHydrated } from '@/client/ui/useHydrated';
import { checkEmail } from '@/client/validation';

/** Only same-app paths are followed after sign-in (no open redirects). */
function safeNext(next: string | undefined): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/devices';
}

export default function SignIn() {
  const { next, reset } = useLocalSearchParams<{ next?: string; reset?: string }>();
  const router = useRouter();
  const session = useSession();
  const signIn = useSignIn();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [emailError, setEmailError] = useState<string | null>(null);
  const hydrated = useHydrated();

  if (session.status === 'signedIn' && !signIn.isPending) return <Redirect href={safeNext(next) as '/devices'} />;

  const submit = () => {
    const e = checkEmail(email);
    setEmailError(e);
    if (e || !password) return;
    signIn.mutate(
      { email: email.trim(), password },
      {
        onSuccess: (result) => {
          session.signIn(result);
          router.replace(safeNext(next) as '/devices');
        },
      },
    );
  };

  return (
    <AuthFrame title="Sign in" testID="sign-in-screen">
      {hydrated && reset === 'done' ? <Notice tone="ok">Your password was changed. Sign in with the new one.</Notice> : null}
      <TextField
        label="E-mail"
        testID="sign-in-email"
        value={email}
        onChangeText={setEmail}
        autoCapitalize="none"
        autoComplete="email"
        inputMode="email"
        error={emailError}
        onSubmitEditing={submit}
      />
      <TextField
        label="Password"
        testID="sign-in-password"
        value={password}
        onChangeText={setPassword}
        secureTextEntry
        autoComplete="current-password"
        onSubmitEditing={submit}
      />
      {signIn.isError ? (
        <Notice tone="error" testID="sign-in-error">
          {errorMessage(signIn.error)}
        </Notice>
      ) : null}
      <Button label="Sign in" testID="sign-in-submit" onPress={submit} busy={signIn.isPending} disabled={!email || !password} />
      <View style={{ flexDirection: 'row', justifyContent: 'space-between', flexWrap: 'wrap', gap: space.sm }}>
        <Link href="/reset-password" testID="forgot-password">
          <Text variant="small" style={{ color: colors.accent }}>
            Forgot your password?
          </Text>
        </Link>
      </View>
      <Text variant="caption" testID="demo-hint">
        Demo lab: the demo accounts are listed in the README and printed by the server at start-up. Accounts are made by
        invitation from a lab lead.
      </Text>
    </AuthFrame>
  );
}
