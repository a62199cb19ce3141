import React, { useState } from 'react';
import { Platform, View } from 'react-native';
import type { Fit } from '@/shared/api/calibration';
import { downloadWithToken } from '../api/download';
import { errorMessage } from '../api/http';
import { formatDate } from '../format/units';
import { exportUrl, useReviewFit } from '../queries/fits';
import { useSession } from '../session/SessionProvider';
import { colors, space } from '../theme';
import { Button } from '../ui/Button';
import { Card, Field } from '../ui/Card';
import { Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';

/** Review is for device engineers and lab leads (API: POST /api/fits/:id/review). */
export function canReview(role: string | undefined): boolean {
  return role === 'device_engineer' || role === 'lab_lead';
}

export function ReviewCard({ fit }: { fit: Fit }) {
  const { user } = useSession();
  const review = useReviewFit(fit.id);
  const [comment, setComment] = useState('');
  const reviewer = canReview(user?.role);

  if (fit.status !== 'proposed') {
    return (
      <Card title="Review" testID="review-record">
        <Field label="Decision" value={fit.status === 'superseded' ? 'Accepted, later superseded' : fit.status === 'accepted' ? 'Accepted' : 'Rejected'} />
        <Field label="By" value={fit.reviewedBy?.name ?? '—'} />
        <Field label="When" value={formatDate(fit.reviewedAt, true)} mono />
        {fit.reviewComment ? <Field label="Comment" value={fit.reviewComment} testID="review-comment-shown" /> : null}
        {fit.supersededAt ? <Field label="Superseded" value={`${formatDate(fit.supersededAt, true)}${fit.supersededByFitId ? ` by fit #${fit.supersededByFitId}` : ''}`} mono /> : null}
      </Card>
    );
  }
  if (!reviewer) {
    return (
      <Card title="Review">
        <Text variant="small" testID="review-not-allowed">
          Waiting for review by a device engineer or the lab lead.
        </Text>
      </Card>
    );
  }
  return (
    <Card title="Review" testID="review-card">
      <Text variant="small">
        Accepting makes this the device&apos;s active calibration; the one active now stays in the history as superseded.
      </Text>
      <TextField label="Comment" testID="review-comment" value={comment} onChangeText={setComment} multiline placeholder="What you checked, why you decide so" />
      {review.isError ? <Notice tone="error">{errorMessage(review.error)}</Notice> : null}
      <View style={{ flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' }}>
        <Button
          label="Accept"
          testID="review-accept"
          busy={review.isPending && review.variables?.decision === 'accept'}
          disabled={review.isPending}
          onPress={() => review.mutate({ decision: 'accept', comment: comment.trim() || undefined })}
        />
        <Button
          label="Reject"
          kind="secondary"
          testID="review-reject"
          busy={review.isPending && review.variables?.decision === 'reject'}
          disabled={review.isPending}
          onPress={() => review.mutate({ decision: 'reject', comment: comment.trim() || undefined })}
        />
      </View>
    </Card>
  );
}

/** The fit export, fetched with the session's token (see client/api/download). */
async function download(fit: Fit, format: 'json' | 'csv', token: string | null): Promise<void> {
  await downloadWithToken(exportUrl(fit.id, format), token, `${fit.deviceName}-fit-v${fit.version}.${format}`);
}

export function ExportCard({ fit }: { fit: Fit }) {
  const { token } = useSession();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState<'json' | 'csv' | null>(null);
  if (Platform.OS !== 'web') return null;
  const go = (format: 'json' | 'csv') => {
    setError(null);
    setBusy(format);
    download(fit, format, token)
      .catch((e: unknown) => setError(errorMessage(e)))
      .finally(() => setBusy(null));
  };
  return (
    <Card title="Export" testID="export-card">
      <Text variant="small">The calibration JSON (what the planner and lab scripts read) or the fitted points as CSV.</Text>
      <View style={{ flexDirection: 'row', gap: space.sm }}>
        <Button small kind="secondary" label="Calibration JSON" testID="export-json" busy={busy === 'json'} onPress={() => go('json')} />
        <Button small kind="secondary" label="Points CSV" testID="export-csv" busy={busy === 'csv'} onPress={() => go('csv')} />
      </View>
      {error ? (
        <Text variant="small" style={{ color: colors.danger }}>
          {error}
        </Text>
      ) : null}
    </Card>
  );
}
