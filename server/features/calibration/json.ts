// Row → API JSON for sweeps, fits and jobs (no database access here).
import type { CalibrationJson, ValueWithError } from '@/calibration/contract';
import type { ActiveCalibrationSummary, Fit, Job, ParamSummary, Sweep } from '@/shared/api/calibration';
import type { FitRow, JobRow, SweepFileRow, SweepRow, UserRow } from '../../db/entities';
import type { ActiveFitRow } from './repository';

const iso = (d: Date | null): string | null => (d ? new Date(d).toISOString() : null);
const who = (users: Map<number, UserRow>, id: number | null) => {
  const u = id !== null ? users.get(id) : undefined;
  return u ? { id: u.id, name: u.name } : null;
};

export function paramOf(cal: CalibrationJson, name: string): ParamSummary | null {
  const p = cal.params[name] as ValueWithError | undefined;
  return p && typeof p.value === 'number' ? { value: p.value, stderr: p.stderr ?? null } : null;
}

export function toSweepJson(s: SweepRow, files: SweepFileRow[], users: Map<number, UserRow>): Sweep {
  return {
    id: s.id,
    deviceId: s.deviceId,
    cooldownId: s.cooldownId,
    uploadedBy: who(users, s.uploadedById),
    kind: s.kind,
    fileNames: s.fileNames,
    files: files.map((f) => ({ name: f.name, byteSize: f.byteSize, sha256: f.sha256 })),
    byteSize: s.byteSize,
    sha256: s.sha256,
    biasUnit: s.biasUnit,
    parseSummary: s.parseSummary,
    note: s.note,
    createdAt: s.createdAt.toISOString(),
  };
}

export function toJobJson(j: JobRow): Job {
  return {
    id: j.id,
    type: j.type,
    status: j.status,
    progress: j.progress,
    message: j.message,
    sweepId: j.sweepId,
    fitId: j.fitId,
    attempts: j.attempts,
    createdAt: j.createdAt.toISOString(),
    startedAt: iso(j.startedAt),
    finishedAt: iso(j.finishedAt),
    updatedAt: j.updatedAt.toISOString(),
  };
}

export function toFitJson(f: FitRow, deviceName: string, users: Map<number, UserRow>): Fit {
  const cal = f.calibration;
  return {
    id: f.id,
    deviceId: f.deviceId,
    deviceName,
    sweepId: f.sweepId,
    version: f.version,
    kind: f.kind,
    model: f.model,
    options: f.options,
    status: f.status,
    f0Hz: paramOf(cal, 'f0_hz'),
    gamma0: paramOf(cal, 'gamma0'),
    asymmetry: paramOf(cal, 'asymmetry'),
    fluxPeriod: paramOf(cal, 'flux_period'),
    fluxOffset: paramOf(cal, 'flux_offset'),
    biasUnit: cal.bias_unit,
    redchi: cal.redchi,
    ndata: f.ndata,
    outlierCount: f.outlierCount,
    success: !!f.success,
    warnings: cal.warnings ?? [],
    coreVersion: f.coreVersion,
    createdBy: who(users, f.createdById),
    createdAt: f.createdAt.toISOString(),
    reviewedBy: who(users, f.reviewedById),
    reviewedAt: iso(f.reviewedAt),
    reviewComment: f.reviewComment,
    supersededByFitId: f.supersededByFitId,
    supersededAt: iso(f.supersededAt),
  };
}

export function toActiveSummary(r: ActiveFitRow, users: Map<number, UserRow>): ActiveCalibrationSummary {
  const ps = (value: number | null, stderr: number | null): ParamSummary | null => (value === null ? null : { value, stderr });
  return {
    fitId: r.id,
    version: r.version,
    model: r.model,
    kind: r.kind,
    f0Hz: ps(r.f0Hz, r.f0Err),
    gamma0: ps(r.gamma0, r.gamma0Err),
    asymmetry: ps(r.asymmetry, r.asymmetryErr),
    acceptedAt: iso(r.reviewedAt),
    acceptedBy: who(users, r.reviewedById),
  };
}

function sig(x: number, digits: number): string {
  return Number(x.toPrecision(digits)).toString();
}

/** One line with the headline parameters, for e-mails and audit details. */
export function headline(cal: CalibrationJson): string {
  const parts: string[] = [];
  const add = (label: string, name: string, scale = 1, unit = '', digits = 6) => {
    const p = paramOf(cal, name);
    if (!p) return;
    const err = p.stderr !== null ? ` ± ${sig(p.stderr / scale, 2)}` : '';
    parts.push(`${label} = ${sig(p.value / scale, digits)}${err}${unit ? ' ' + unit : ''}`);
  };
  add('f0', 'f0_hz', 1e9, 'GHz', 8);
  add('γ0', 'gamma0', 1, '', 4);
  add('d', 'asymmetry', 1, '', 3);
  add('τ_eff0', 'tau_eff0_s', 1e-9, 'ns', 5);
  add('flux period', 'flux_period', 1, cal.bias_unit, 5);
  parts.push(`reduced χ² = ${sig(cal.redchi, 3)} on ${cal.ndata} points`);
  return parts.join(', ');
}
