import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { Platform } from 'react-native';
import type { SweepInvalidDetails, SweepIssue, SweepListResponse, UploadResponse } from '@/shared/api/calibration';
import { ApiError, apiBaseUrl, http } from '../api/http';
import { useSession } from '../session/SessionProvider';
import { devicesKeys } from './devices';
import { fitsKeys } from './fits';

export const sweepsKeys = {
  all: ['sweeps'] as const,
  byDevice: (deviceId: number) => [...sweepsKeys.all, 'device', deviceId] as const,
};

export function useDeviceSweeps(deviceId: number | undefined) {
  return useQuery({
    queryKey: sweepsKeys.byDevice(deviceId ?? -1),
    queryFn: ({ signal }) => http.get<SweepListResponse>(`/api/devices/${deviceId}/sweeps`, undefined, { signal }).then((r) => r.sweeps),
    enabled: typeof deviceId === 'number' && deviceId > 0,
  });
}

/** A picked file: the browser File on web, a local uri on native. */
export interface PickedFile {
  name: string;
  size: number | null;
  mimeType: string | null;
  file?: Blob;
  uri?: string;
}

/** Text fields of the upload; blank ones are left out so the server applies its defaults. */
export interface UploadFields {
  kind?: string;
  model?: string;
  z0Ohm?: string;
  geometry?: string;
  probeFrequencyHz?: string;
  symmetric?: string;
  cooldownId?: string;
  biasPattern?: string;
  biasUnit?: string;
  note?: string;
}

export interface UploadVars {
  files: PickedFile[];
  fields: UploadFields;
  /** 0..1 fraction of the bytes sent. */
  onProgress?: (fraction: number) => void;
}

/** The parser's row/column issues of a 422 SWEEP_INVALID answer, if that is what this error is. */
export function sweepIssues(e: unknown): SweepIssue[] {
  if (!(e instanceof ApiError) || e.code !== 'SWEEP_INVALID') return [];
  const d = e.details as Partial<SweepInvalidDetails> | undefined;
  return Array.isArray(d?.issues) ? d.issues : [];
}

/**
 * multipart POST with XMLHttpRequest: fetch() has no upload progress in browsers. Errors come back
 * as the same ApiError the JSON client throws.
 */
function postMultipart(url: string, form: FormData, token: string | null, onProgress?: (f: number) => void): Promise<UploadResponse> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('Accept', 'application/json');
    if (token) xhr.setRequestHeader('Authorization', `Bearer ${token}`);
    xhr.upload.onprogress = (ev) => {
      if (ev.lengthComputable && ev.total > 0) onProgress?.(ev.loaded / ev.total);
    };
    xhr.onerror = () => reject(new ApiError(0, 'NETWORK_ERROR', 'The upload did not reach the Fluxwright server. Check your connection and try again.'));
    xhr.onload = () => {
      let json: unknown;
      try {
        json = xhr.responseText ? JSON.parse(xhr.responseText) : undefined;
      } catch {
        json = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300 && json) {
        onProgress?.(1);
        resolve(json as UploadResponse);
        return;
      }
      const err = (json as { error?: { code?: string; message?: string; details?: unknown } } | undefined)?.error;
      if (xhr.status === 413 && !err) {
        reject(new ApiError(413, 'PAYLOAD_TOO_LARGE', 'The files are larger than the server accepts.'));
        return;
      }
      reject(new ApiError(xhr.status, err?.code ?? `HTTP_${xhr.status}`, err?.message ?? `The server answered ${xhr.status}`, err?.details));
    };
    xhr.send(form);
  });
}

export function useUploadSweep(deviceId: number) {
  const qc = useQueryClient();
  const { token } = useSession();
  return useMutation({
    mutationFn: ({ files, fields, onProgress }: UploadVars) => {
      const form = new FormData();
      for (const [k, v] of Object.entries(fields)) {
        if (typeof v === 'string' && v.trim() !== '') form.append(k, v.trim());
      }
      for (const f of files) {
        if (Platform.OS === 'web' && f.file) form.append('files', f.file, f.name);
        // React Native's FormData takes { uri, name, type } for a local file.
        else form.append('files', { uri: f.uri, name: f.name, type: f.mimeType ?? 'application/octet-stream' } as unknown as Blob);
      }
      return postMultipart(`${apiBaseUrl()}/api/devices/${deviceId}/sweeps`, form, token, onProgress);
    },
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: sweepsKeys.byDevice(deviceId) });
      void qc.invalidateQueries({ queryKey: fitsKeys.byDevice(deviceId) });
      void qc.invalidateQueries({ queryKey: devicesKeys.all });
    },
  });
}
