// Sweep upload: pick file(s), choose options, upload with byte progress, then follow the fit job
// until it has finished. Parse errors come back row- and column-precise and are shown beside the file.
import React, { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import * as DocumentPicker from 'expo-document-picker';
import type { Fit, SweepIssue } from '@/shared/api/calibration';
import { errorMessage } from '../api/http';
import { useJob } from '../queries/jobs';
import { sweepIssues, useUploadSweep, type PickedFile, type UploadFields } from '../queries/sweeps';
import { colors, radius, space } from '../theme';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Choice } from '../ui/Choice';
import { PressableLink } from '../ui/PressableLink';
import { Notice } from '../ui/States';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';

type Kind = '' | 'tuning_points' | 'raw_complex' | 'touchstone' | 'phase_flux';
const KIND_OPTIONS: { value: Kind; label: string }[] = [
  { value: '', label: 'Detect' },
  { value: 'tuning_points', label: 'Tuning points' },
  { value: 'raw_complex', label: 'Raw S21/S11' },
  { value: 'touchstone', label: 'Touchstone set' },
  { value: 'phase_flux', label: 'Phase vs flux' },
];
const MODEL_OPTIONS = [
  { value: 'exact' as const, label: 'Exact' },
  { value: 'approx' as const, label: 'Approximate' },
];

function bytes(n: number | null): string {
  if (n === null) return '';
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} kB`;
  return `${(n / 1024 / 1024).toFixed(1)} MB`;
}

function ProgressBar({ fraction, testID }: { fraction: number; testID?: string }) {
  const pct = Math.round(Math.max(0, Math.min(1, fraction)) * 100);
  return (
    <View style={s.bar} role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100} testID={testID}>
      <View style={[s.barFill, { width: `${pct}%` }]} />
    </View>
  );
}

function issueWhere(i: SweepIssue): string {
  // The core's messages usually name the row and column themselves; do not say it twice.
  if (i.row !== null && i.message.includes(`row ${i.row}`)) return '';
  return [i.row !== null ? `row ${i.row}` : null, i.column ? `column ${i.column}` : null].filter(Boolean).join(', ');
}

function FileList({ files, issues }: { files: PickedFile[]; issues: SweepIssue[] }) {
  // Issues that name no picked file (e.g. the set as a whole) go under the last file.
  const names = new Set(files.map((f) => f.name));
  return (
    <View style={{ gap: space.sm }} testID="upload-files">
      {files.map((f, k) => {
        const mine = issues.filter((i) => i.file === f.name || (k === files.length - 1 && !names.has(i.file)));
        return (
          <View key={`${f.name}-${k}`} style={[s.file, mine.some((i) => i.severity === 'error') && s.fileBad]} testID={`upload-file-${f.name}`}>
            <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: space.sm }}>
              <Text variant="mono" style={{ flexShrink: 1 }} numberOfLines={1}>
                {f.name}
              </Text>
              <Text variant="monoSmall">{bytes(f.size)}</Text>
            </View>
            {mine.map((i, j) => (
              <Text key={j} variant="small" style={{ color: i.severity === 'error' ? colors.danger : colors.pending }} testID="upload-issue">
                {issueWhere(i) ? (
                  <Text variant="monoSmall" style={{ color: i.severity === 'error' ? colors.danger : colors.pending }}>
                    {issueWhere(i)}:{' '}
                  </Text>
                ) : null}
                {i.message}
              </Text>
            ))}
          </View>
        );
      })}
    </View>
  );
}

function JobStatus({ jobId, deviceId }: { jobId: number; deviceId: number }) {
  const q = useJob(jobId, deviceId);
  if (q.isPending) return <Notice testID="job-status">Queued for fitting…</Notice>;
  if (q.isError) return <Notice tone="error">{`Could not follow the fit job: ${errorMessage(q.error)}`}</Notice>;
  const { job, fit } = q.data;
  if (job.status === 'failed') {
    return (
      <Notice tone="error" testID="job-failed">
        {`The fit failed: ${job.message ?? 'no message'}. The sweep is stored; you can refit it with other options.`}
      </Notice>
    );
  }
  if (job.status === 'succeeded') {
    const fitId = fit?.id ?? job.fitId;
    return (
      <View style={{ gap: space.sm }} testID="job-done">
        <Notice tone="ok">{fit ? `Fitted: version ${fit.version}, proposed for review.` : 'Fitted, proposed for review.'}</Notice>
        {fitId ? <FitLink fitId={fitId} /> : null}
      </View>
    );
  }
  return (
    <View style={{ gap: space.xs }} testID="job-status">
      <Text variant="small">
        {job.status === 'queued' ? 'Waiting for a fitting slot…' : `Fitting… ${job.message ?? ''}`}
      </Text>
      <ProgressBar fraction={job.progress} testID="job-progress" />
    </View>
  );
}

function FitLink({ fitId }: { fitId: number }) {
  return (
    <PressableLink href={`/fits/${fitId}`} testID="open-new-fit" style={({ hovered }) => [s.link, hovered && { borderColor: colors.accent }]}>
      <Text style={{ color: colors.accent }}>Open the fit ›</Text>
    </PressableLink>
  );
}

export function UploadPanel({ deviceId }: { deviceId: number }) {
  const upload = useUploadSweep(deviceId);
  const [files, setFiles] = useState<PickedFile[]>([]);
  const [kind, setKind] = useState<Kind>('');
  const [model, setModel] = useState<'exact' | 'approx'>('exact');
  const [z0, setZ0] = useState('');
  const [probeGHz, setProbeGHz] = useState('');
  const [biasPattern, setBiasPattern] = useState('');
  const [note, setNote] = useState('');
  const [progress, setProgress] = useState(0);
  const [jobId, setJobId] = useState<number | null>(null);
  const [doneFit, setDoneFit] = useState<Fit | null>(null);
  const [formError, setFormError] = useState<string | null>(null);

  const pick = async () => {
    const r = await DocumentPicker.getDocumentAsync({ multiple: true, copyToCacheDirectory: false, base64: false });
    if (r.canceled || !r.assets?.length) return;
    upload.reset();
    setJobId(null);
    setDoneFit(null);
    setProgress(0);
    setFiles(r.assets.map((a) => ({ name: a.name, size: a.size ?? null, mimeType: a.mimeType ?? null, file: a.file, uri: a.uri })));
  };

  const submit = () => {
    setFormError(null);
    const fields: UploadFields = { kind: kind || undefined, model, note };
    if (z0.trim()) {
      const v = Number(z0);
      if (!(v > 0)) return setFormError('Z0 must be a positive number of ohms (e.g. 50).');
      fields.z0Ohm = String(v);
    }
    if (probeGHz.trim()) {
      const v = Number(probeGHz);
      if (!(v > 0)) return setFormError('The probe frequency must be a positive number of GHz (e.g. 6.2).');
      fields.probeFrequencyHz = String(v * 1e9);
    }
    if (biasPattern.trim()) fields.biasPattern = biasPattern;
    setProgress(0);
    setJobId(null);
    setDoneFit(null);
    upload.mutate(
      { files, fields, onProgress: setProgress },
      {
        onSuccess: (res) => {
          // 201: the job finished within the server's wait; 202: follow it.
          if ('fit' in res && res.fit) setDoneFit(res.fit);
          else setJobId(res.job.id);
        },
      },
    );
  };

  const issues = sweepIssues(upload.error);
  const busy = upload.isPending;
  const showProbe = kind === 'phase_flux' || kind === '';
  const showPattern = kind === 'touchstone' || files.length > 1;

  return (
    <Card title="Upload a sweep" testID="upload-panel">
      <Text variant="small">
        A CSV of tuning points (bias, resonance frequency), a raw complex sweep, a phase-versus-flux sweep, or a set of Touchstone files (one per bias point).
      </Text>
      <View style={{ flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' }}>
        <Button label={files.length ? 'Choose other files' : 'Choose files'} kind="secondary" testID="upload-pick" onPress={() => void pick()} disabled={busy} />
      </View>
      {files.length ? <FileList files={files} issues={issues} /> : null}
      {files.length ? (
        <View style={{ gap: space.md }}>
          <Choice label="Kind" testID="upload-kind" value={kind} options={KIND_OPTIONS} onChange={setKind} />
          <Choice label="Model" testID="upload-model" value={model} options={MODEL_OPTIONS} onChange={setModel} />
          <TextField label="Line impedance Z0" hint="in Ω; optional" testID="upload-z0" mono value={z0} onChangeText={setZ0} placeholder="e.g. 50" keyboardType="decimal-pad" />
          {showProbe ? (
            <TextField
              label="Probe frequency"
              hint="in GHz; for phase sweeps whose file does not state it"
              testID="upload-probe"
              mono
              value={probeGHz}
              onChangeText={setProbeGHz}
              placeholder="e.g. 6.2"
              keyboardType="decimal-pad"
            />
          ) : null}
          {showPattern ? (
            <TextField
              label="Bias in file names"
              hint="regular expression with one group; optional"
              testID="upload-bias-pattern"
              mono
              value={biasPattern}
              onChangeText={setBiasPattern}
              placeholder="e.g. bias_([-0-9.]+)mA"
              autoCapitalize="none"
            />
          ) : null}
          <TextField label="Note" testID="upload-note" value={note} onChangeText={setNote} placeholder="optional" />
          {formError ? <Notice tone="error">{formError}</Notice> : null}
          <View style={{ flexDirection: 'row', gap: space.sm }}>
            <Button label="Upload and fit" testID="upload-submit" onPress={submit} busy={busy} />
          </View>
        </View>
      ) : null}
      {busy ? (
        <View style={{ gap: space.xs }} testID="upload-progress">
          <Text variant="small">{progress < 1 ? `Uploading… ${Math.round(progress * 100)} %` : 'Uploaded; reading the file…'}</Text>
          <ProgressBar fraction={progress} />
        </View>
      ) : null}
      {upload.isError ? (
        <Notice tone="error" testID="upload-error">
          {issues.length
            ? `The file was refused (${issues.length === 1 ? 'one problem' : `${issues.length} problems`}, shown beside the file). Nothing was stored; fix the file and upload it again.`
            : errorMessage(upload.error)}
        </Notice>
      ) : null}
      {jobId !== null ? <JobStatus jobId={jobId} deviceId={deviceId} /> : null}
      {doneFit ? (
        <View style={{ gap: space.sm }} testID="job-done">
          <Notice tone="ok">{`Fitted: version ${doneFit.version}, proposed for review.`}</Notice>
          <FitLink fitId={doneFit.id} />
        </View>
      ) : null}
    </Card>
  );
}

const s = StyleSheet.create({
  bar: { height: 6, borderRadius: 3, backgroundColor: colors.rule, overflow: 'hidden' },
  barFill: { height: 6, backgroundColor: colors.accent },
  file: { borderWidth: 1, borderColor: colors.rule, borderRadius: radius.sm, padding: space.sm, gap: 4, backgroundColor: colors.paper },
  fileBad: { borderColor: colors.danger },
  link: { alignSelf: 'flex-start', borderWidth: 1, borderColor: colors.ruleStrong, borderRadius: radius.sm, paddingHorizontal: space.md, paddingVertical: space.xs },
});
