// Batch comparison: one parameter at a time across the devices of each batch (their accepted
// calibrations), with robust outlier scores and the lab's spec windows; spec windows themselves.
import Papa from 'papaparse';
import type { DataSource, EntityManager } from 'typeorm';
import type { CalibrationJson, TraceJson, ValueWithError } from '@/calibration/contract';
import {
  DEFAULT_COMPARE_PARAMS, DERIVED_PARAMS, type BatchCompareQuery, type BatchCompareResponse, type CompareBatch, type CompareDeviceValue,
  type SpecBounds, type SpecWindow, type SpecWindowRequest,
} from '@/shared/api/planning';
import { FabBatchEntity, SpecWindowEntity, type SpecWindowRow, type UserRow } from '../../db/entities';
import { AppError } from '../../http/errors';
import { recordAudit } from '../audit/service';
import { usersById } from '../calibration/repository';
import { findDevices } from '../devices/repository';
import { acceptedFitRefs, calibrationOfFit } from '../planning/repository';
import { isOutlier, mad, mean, median, robustZ, sampleStd } from './stats';

const DERIVED = new Set<string>(DERIVED_PARAMS);

/** Median over the good traces (flag null) of ql/qc/qi; null without traces. */
function traceMedian(traces: readonly TraceJson[] | undefined, key: 'qi' | 'ql' | 'qc'): number | null {
  const xs = (traces ?? []).filter((t) => t.flag === null).map((t) => t[key]).filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
  return median(xs);
}

function valueOf(cal: CalibrationJson, param: string): { value: number; stderr: number | null } | null {
  if (DERIVED.has(param)) {
    const v = traceMedian(cal.traces, param as 'qi' | 'ql' | 'qc');
    return v === null ? null : { value: v, stderr: null };
  }
  const p = cal.params[param] as ValueWithError | undefined;
  return p && typeof p.value === 'number' && Number.isFinite(p.value) ? { value: p.value, stderr: p.stderr ?? null } : null;
}

function unitOf(param: string, biasUnits: Set<string>): string {
  if (param === 'flux_period' || param === 'flux_offset') return [...biasUnits].sort().join(', ') || 'bias unit';
  if (param.endsWith('_hz')) return 'Hz';
  if (param.endsWith('_s')) return 's';
  if (param.endsWith('_m_s')) return 'm/s';
  if (param.endsWith('_rad')) return 'rad';
  return '1';
}

async function specMap(em: EntityManager, labId: number): Promise<Map<string, SpecWindowRow>> {
  const rows = await em.getRepository(SpecWindowEntity).find({ where: { labId }, order: { param: 'ASC' } });
  return new Map(rows.map((w) => [w.param, w]));
}

export async function compareBatches(ds: DataSource, labId: number, q: BatchCompareQuery): Promise<BatchCompareResponse> {
  const em = ds.manager;
  const params = [...new Set(q.params ?? DEFAULT_COMPARE_PARAMS)];
  const allBatches = await em.getRepository(FabBatchEntity).find({ where: { labId }, order: { code: 'ASC' } });
  let batches = allBatches;
  if (q.batches) {
    const byId = new Map(allBatches.map((b) => [b.id, b]));
    const missing = q.batches.filter((id) => !byId.has(id));
    if (missing.length) throw AppError.notFound(`no batch ${missing.join(', ')} in your lab`);
    batches = q.batches.map((id) => byId.get(id)!);
  }
  const devices = (await findDevices(em, labId, {})).filter((d) => batches.some((b) => b.id === d.batchId));
  const active = await acceptedFitRefs(em, devices.map((d) => d.id));
  const cals = new Map<number, CalibrationJson>();
  for (const d of devices) {
    const f = active.get(d.id);
    if (f) cals.set(d.id, await calibrationOfFit(em, f.id));
  }
  // A name that no compared calibration has is most likely a typo: say which names exist.
  const known = new Set<string>(DERIVED_PARAMS);
  for (const c of cals.values()) for (const k of Object.keys(c.params)) known.add(k);
  const unknown = params.filter((p) => !known.has(p));
  if (unknown.length) {
    throw AppError.validation([
      { path: 'query.params', message: `unknown parameter${unknown.length > 1 ? 's' : ''} ${unknown.join(', ')}: the compared calibrations have ${[...known].sort().join(', ')}` },
    ]);
  }
  const biasUnits = new Set([...cals.values()].map((c) => c.bias_unit));
  const specs = await specMap(em, labId);
  const specWindows: Record<string, SpecBounds> = {};
  for (const p of params) {
    const w = specs.get(p);
    specWindows[p] = { min: w?.min ?? null, max: w?.max ?? null };
  }
  const out: CompareBatch[] = batches.map((b) => {
    const members = devices.filter((d) => d.batchId === b.id);
    const calibrated = members.filter((d) => cals.has(d.id));
    const stats: CompareBatch['stats'] = {};
    for (const p of params) {
      const rows = calibrated
        .map((d) => ({ d, v: valueOf(cals.get(d.id)!, p) }))
        .filter((x): x is { d: (typeof calibrated)[number]; v: { value: number; stderr: number | null } } => x.v !== null);
      const xs = rows.map((x) => x.v.value);
      const med = median(xs);
      const m = mad(xs);
      const w = specs.get(p);
      const values: CompareDeviceValue[] = rows.map(({ d, v }) => {
        const z = med !== null && m !== null ? robustZ(v.value, med, m) : null;
        const fit = active.get(d.id)!;
        return {
          deviceId: d.id,
          deviceName: d.name,
          fitId: fit.id,
          fitVersion: fit.version,
          value: v.value,
          stderr: v.stderr,
          robustZ: z,
          outlier: isOutlier(z),
          inSpec: w ? (w.min === null || v.value >= w.min) && (w.max === null || v.value <= w.max) : null,
        };
      });
      stats[p] = {
        count: xs.length,
        mean: mean(xs),
        std: sampleStd(xs),
        median: med,
        mad: m,
        min: xs.length ? Math.min(...xs) : null,
        max: xs.length ? Math.max(...xs) : null,
        devices: values,
      };
    }
    return { id: b.id, code: b.code, count: calibrated.length, deviceCount: members.length, stats };
  });
  return { params, units: Object.fromEntries(params.map((p) => [p, unitOf(p, biasUnits)])), specWindows, batches: out };
}

export const CSV_FIELDS = [
  'batch', 'device', 'fit_id', 'fit_version', 'parameter', 'unit', 'value', 'stderr', 'batch_count', 'batch_mean', 'batch_std', 'batch_median',
  'batch_mad', 'robust_z', 'outlier', 'spec_min', 'spec_max', 'in_spec',
] as const;

export function compareCsv(r: BatchCompareResponse): string {
  const e = (x: number | null | boolean) => (x === null ? '' : x);
  const data: Array<Array<string | number | boolean>> = [];
  for (const b of r.batches) {
    for (const p of r.params) {
      const s = b.stats[p];
      for (const d of s.devices) {
        data.push([
          b.code, d.deviceName, d.fitId, d.fitVersion, p, r.units[p], d.value, e(d.stderr), s.count, e(s.mean), e(s.std), e(s.median), e(s.mad),
          e(d.robustZ), d.outlier, e(r.specWindows[p].min), e(r.specWindows[p].max), e(d.inSpec),
        ] as Array<string | number | boolean>);
      }
    }
  }
  return Papa.unparse({ fields: [...CSV_FIELDS], data }) + '\r\n';
}

export async function exportCompareCsv(ds: DataSource, actor: UserRow, q: BatchCompareQuery): Promise<{ filename: string; body: string }> {
  const r = await compareBatches(ds, actor.labId, q);
  const body = compareCsv(r);
  await ds.transaction((em) =>
    recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'batch_compare.export',
      subjectType: 'lab',
      subjectId: actor.labId,
      details: { params: r.params, batches: r.batches.map((b) => b.code) },
    }),
  );
  return { filename: `batch-compare_${r.batches.map((b) => b.code).join('_').replace(/[^A-Za-z0-9._-]+/g, '_') || 'none'}.csv`, body };
}

// ---------------------------------------------------------------------------------------------
// Spec windows

function specJson(w: SpecWindowRow, users: Map<number, UserRow>): SpecWindow {
  const u = w.updatedById !== null ? users.get(w.updatedById) : undefined;
  return { param: w.param, min: w.min, max: w.max, updatedBy: u ? { id: u.id, name: u.name } : null, updatedAt: new Date(w.updatedAt).toISOString() };
}

export async function listSpecWindows(ds: DataSource, labId: number): Promise<SpecWindow[]> {
  const rows = [...(await specMap(ds.manager, labId)).values()];
  const users = await usersById(ds.manager, rows.map((w) => w.updatedById));
  return rows.map((w) => specJson(w, users));
}

export async function putSpecWindow(ds: DataSource, actor: UserRow, param: string, body: SpecWindowRequest): Promise<SpecWindow> {
  await ds.transaction(async (em) => {
    const before = await em.getRepository(SpecWindowEntity).findOneBy({ labId: actor.labId, param });
    await em.getRepository(SpecWindowEntity).upsert({ labId: actor.labId, param, min: body.min, max: body.max, updatedById: actor.id }, { conflictPaths: ['labId', 'param'] });
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'spec_window.put',
      subjectType: 'spec_window',
      subjectId: param,
      details: { min: body.min, max: body.max, before: before ? { min: before.min, max: before.max } : null },
    });
  });
  const w = await ds.getRepository(SpecWindowEntity).findOneByOrFail({ labId: actor.labId, param });
  return specJson(w, new Map([[actor.id, actor]]));
}

export async function deleteSpecWindow(ds: DataSource, actor: UserRow, param: string): Promise<void> {
  await ds.transaction(async (em) => {
    const before = await em.getRepository(SpecWindowEntity).findOneBy({ labId: actor.labId, param });
    if (!before) throw AppError.notFound(`no spec window for ${param} in your lab`);
    await em.getRepository(SpecWindowEntity).delete({ id: before.id });
    await recordAudit(em, {
      labId: actor.labId,
      actorId: actor.id,
      action: 'spec_window.delete',
      subjectType: 'spec_window',
      subjectId: param,
      details: { before: { min: before.min, max: before.max } },
    });
  });
}
