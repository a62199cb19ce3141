import React, { useState } from 'react';
import { Platform, View } from 'react-native';
import { errorMessage } from '../api/http';
import type { ApiTokenInfo } from '../api/types';
import { formatDate } from '../format/units';
import { useApiTokens, useCreateApiToken, useRevokeApiToken } from '../queries/tokens';
import { colors, radius, space } from '../theme';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card, Rule } from '../ui/Card';
import { ErrorState, LoadingState, Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';

async function copyText(text: string): Promise<boolean> {
  try {
    if (Platform.OS === 'web' && typeof navigator !== 'undefined' && navigator.clipboard) {
      await navigator.clipboard.writeText(text);
      return true;
    }
  } catch {
    /* clipboard permission refused: the token is still selectable on screen */
  }
  return false;
}

function NewTokenSecret({ secret, onDismiss }: { secret: string; onDismiss: () => void }) {
  const [copied, setCopied] = useState<'idle' | 'ok' | 'failed'>('idle');
  return (
    <View style={{ gap: space.sm, padding: space.md, borderRadius: radius.sm, backgroundColor: colors.accentWash }} testID="new-token-secret">
      <Text variant="small" style={{ color: colors.ink }}>
        Copy this token now. It is shown only once; Fluxwright stores only a hash of it.
      </Text>
      <Text variant="mono" selectable testID="new-token-value" style={{ backgroundColor: colors.sheet, padding: space.sm, borderRadius: radius.sm }}>
        {secret}
      </Text>
      <View style={{ flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' }}>
        <Button small label={copied === 'ok' ? 'Copied' : 'Copy'} testID="copy-token" onPress={async () => setCopied((await copyText(secret)) ? 'ok' : 'failed')} />
        <Button small kind="ghost" label="Done" testID="dismiss-token" onPress={onDismiss} />
        {copied === 'failed' ? <Text variant="small">Copy by hand: select the text above.</Text> : null}
      </View>
    </View>
  );
}

function TokenRow({ t }: { t: ApiTokenInfo }) {
  const revoke = useRevokeApiToken();
  return (
    <View style={{ gap: 4 }} testID={`token-row-${t.name}`}>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' }}>
        <Text style={{ flexShrink: 1 }}>{t.name}</Text>
        {t.revokedAt ? <Badge label="Revoked" tone="danger" /> : <Badge label="Active" tone="ok" />}
        <View style={{ flex: 1 }} />
        {!t.revokedAt ? (
          <Button small kind="ghost" label="Revoke" testID={`revoke-token-${t.name}`} accessibilityLabel={`Revoke token ${t.name}`} busy={revoke.isPending} onPress={() => revoke.mutate(t.id)} />
        ) : null}
      </View>
      <Text variant="monoSmall">
        created {formatDate(t.createdAt)} · last used {t.lastUsedAt ? formatDate(t.lastUsedAt, true) : 'never'}
        {t.revokedAt ? ` · revoked ${formatDate(t.revokedAt)}` : ''}
        {t.scopes?.length ? ` · ${t.scopes.join(', ')}` : ''}
      </Text>
      {revoke.isError ? <Notice tone="error">{errorMessage(revoke.error)}</Notice> : null}
    </View>
  );
}

export function TokensCard() {
  const tokens = useApiTokens();
  const create = useCreateApiToken();
  const [name, setName] = useState('');
  const [nameError, setNameError] = useState<string | null>(null);
  const [secret, setSecret] = useState<string | null>(null);

  const submit = () => {
    if (!name.trim()) {
      setNameError('Name the token after where it will be used (e.g. "fridge-3 logger").');
      return;
    }
    setNameError(null);
    create.mutate(
      { name: name.trim() },
      {
        onSuccess: (res) => {
          setSecret(res.token);
          setName('');
        },
      },
    );
  };

  return (
    <Card title="API tokens" testID="tokens-card">
      <Text variant="small">For scripts and instruments that talk to the API. A token acts with your role.</Text>
      {secret ? <NewTokenSecret secret={secret} onDismiss={() => setSecret(null)} /> : null}
      <View style={{ gap: space.sm }}>
        <TextField label="New token name" testID="token-name" value={name} onChangeText={setName} error={nameError} onSubmitEditing={submit} />
        <View style={{ alignSelf: 'flex-start' }}>
          <Button small label="Create token" testID="create-token" onPress={submit} busy={create.isPending} />
        </View>
        {create.isError ? <Notice tone="error">{errorMessage(create.error)}</Notice> : null}
      </View>
      <Rule />
      {tokens.isPending ? (
        <LoadingState label="Loading tokens…" />
      ) : tokens.isError ? (
        <ErrorState error={tokens.error} onRetry={() => void tokens.refetch()} />
      ) : tokens.data.length === 0 ? (
        <Text variant="small" testID="tokens-empty">
          No tokens yet.
        </Text>
      ) : (
        <View style={{ gap: space.md }} testID="tokens-list">
          {tokens.data.map((t) => (
            <TokenRow key={t.id} t={t} />
          ))}
        </View>
      )}
    </Card>
  );
}
