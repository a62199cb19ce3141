/**
 * Raw-trace views computed on demand: the stored sweep bytes are parsed again with the core, the
 * chosen trace re-extracted, and the fitted notch/reflection model evaluated on its frequencies.
 * Nothing is stored; the last few parsed sweeps are kept in memory so stepping through traces
 * does not re-parse a large file each time (sweeps are immutable, so the cache cannot go stale).
 */
import type { DataSource } from 'typeorm';
import { extractionOptions, parseSweepFiles, type CalibrateOptions } from '@/calibration/pipeline';
import type { RawSweepData, SweepData } from '@/calibration/io';
import { extractResonance, notchResponse, reflectionResponse, type TraceExtraction } from '@/calibration/resonator';
import type { FitOptions } from '@/shared/api/calibration';
import type { TraceView } from '@/shared/api/traces';
import { AppError } from '../../http/errors';
import { findFitInLab, findSweep, sweepFileBytes } from './repository';

const CACHE_SIZE = 3;
const parsed = new Map<string, RawSweepData>();

/** The core's options from the options the fit ran with (only those the parser and extraction read). */
function coreOptions(o: FitOptions): CalibrateOptions {
  const out: CalibrateOptions = {};
  if (o.kind) out.kind = o.kind;
  if (o.geometry) out.geometry = o.geometry;
  if (o.probeFrequencyHz) out.probeFrequencyHz = o.probeFrequencyHz;
  if (o.biasPattern) out.biasPattern = o.biasPattern;
  if (o.biasUnit) out.biasUnit = o.biasUnit;
  return out;
}

async function rawSweep(ds: DataSource, sweepId: number, opts: CalibrateOptions): Promise<RawSweepData> {
  const key = `${sweepId}:${JSON.stringify(opts)}`;
  const hit = parsed.get(key);
  if (hit) {
    parsed.delete(key);
    parsed.set(key, hit); // most recently used last
    return hit;
  }
  const files = await sweepFileBytes(ds.manager, sweepId);
  if (!files.length) throw AppError.notFound(`sweep ${sweepId} has no stored files`);
  const dec = new TextDecoder('utf-8');
  let data: SweepData;
  try {
    data = parseSweepFiles(files.map((f) => ({ name: f.name, text: dec.decode(f.content) })), opts);
  } catch (e) {
    // The file parsed when it was uploaded; failing now means the core changed underneath it.
    throw AppError.conflict(`the stored sweep no longer parses: ${(e as Error).message}`);
  }
  if (data.kind !== 'raw_complex' && data.kind !== 'touchstone') {
    throw AppError.conflict(`this fit's sweep holds ${data.kind.replace('_', ' ')}, not raw traces`);
  }
  parsed.set(key, data);
  while (parsed.size > CACHE_SIZE) parsed.delete(parsed.keys().next().value as string);
  return data;
}

const finite = (x: number | null | undefined): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** S·e^{+2πifτ} (after conjugating when the fit did): the frame of the resonance circle. */
function removeDelay(freqHz: ArrayLike<number>, re: ArrayLike<number>, im: ArrayLike<number>, delayS: number, conjugate: boolean) {
  const n = freqHz.length;
  const r = new Array<number>(n);
  const i = new Array<number>(n);
  for (let k = 0; k < n; k++) {
    const ph = 2 * Math.PI * freqHz[k] * delayS;
    const c = Math.cos(ph);
    const s = Math.sin(ph);
    const y = conjugate ? -im[k] : im[k];
    r[k] = re[k] * c - y * s;
    i[k] = re[k] * s + y * c;
  }
  return { re: r, im: i };
}

/**
 * The fitted resonance in the delay-removed frame is a circle: notch a·e^{iα}[1 − k·e^{iφ}/(1+iu)]
 * with k = Q_l/|Q_c|, reflection a·e^{iα}[1 − k/(1+iu)] with k = 2Q_l/Q_c; 1/(1+iu) runs over the
 * circle of centre 1/2 and radius 1/2 (Probst et al., Rev. Sci. Instrum. 86, 024706 (2015)).
 */
function modelCircle(e: TraceExtraction): { xc: number; yc: number; r: number } | null {
  if (e.a === null || e.alphaRad === null || e.ql === null || e.qcAbs === null) return null;
  const k = e.geometry === 'notch' ? e.ql / e.qcAbs : (2 * e.ql) / e.qcAbs;
  const phi = e.geometry === 'notch' ? (e.phiRad ?? 0) : 0;
  // centre = a e^{iα} (1 − (k/2) e^{iφ})
  const cr = 1 - (k / 2) * Math.cos(phi);
  const ci = -(k / 2) * Math.sin(phi);
  const ca = Math.cos(e.alphaRad);
  const sa = Math.sin(e.alphaRad);
  const xc = e.a * (cr * ca - ci * sa);
  const yc = e.a * (cr * sa + ci * ca);
  const r = (e.a * k) / 2;
  return Number.isFinite(xc) && Number.isFinite(yc) && Number.isFinite(r) ? { xc, yc, r } : null;
}

function modelResponse(freqHz: ArrayLike<number>, e: TraceExtraction): { re: Float64Array; im: Float64Array } | null {
  if (e.frHz === null || e.ql === null || e.qcAbs === null || e.a === null || e.alphaRad === null || e.delayS === null) return null;
  const env = { a: e.a, alphaRad: e.alphaRad, delayS: e.delayS };
  return e.geometry === 'notch'
    ? notchResponse(freqHz, { ...env, frHz: e.frHz, ql: e.ql, qcAbs: e.qcAbs, phiRad: e.phiRad ?? 0 })
    : reflectionResponse(freqHz, { ...env, frHz: e.frHz, ql: e.ql, qc: e.qcAbs });
}

export async function traceView(ds: DataSource, labId: number, fitId: number, index: number): Promise<TraceView> {
  const fit = await findFitInLab(ds.manager, labId, fitId);
  if (!fit) throw AppError.notFound(`no fit ${fitId} in your lab`);
  if (fit.kind !== 'raw_complex' && fit.kind !== 'touchstone') {
    throw AppError.notFound(`fit ${fitId} was made from ${fit.kind.replace('_', ' ')}: it has no raw traces`);
  }
  const count = fit.calibration.traces?.length ?? 0;
  if (index >= count) throw AppError.notFound(`fit ${fitId} has ${count} traces (index 0–${count - 1}); there is no trace ${index}`);
  const sweep = await findSweep(ds.manager, fit.sweepId);
  if (!sweep) throw AppError.notFound(`the sweep of fit ${fitId} is gone`);
  const opts = coreOptions({ ...(sweep.options ?? {}), ...(fit.options ?? {}) });
  const data = await rawSweep(ds, sweep.id, opts);
  const t = data.traces[index];
  if (!t) throw AppError.conflict(`the stored sweep has ${data.traces.length} traces but the fit lists ${count}`);

  const x = extractionOptions(data, opts);
  const e = extractResonance(t.freqHz, t.re, t.im, x);
  const freq = Array.from(t.freqHz);
  const model = modelResponse(t.freqHz, e);
  // The model describes the conjugated data when the fit conjugated them; shown against the file's data, conjugate it back.
  const modelRaw = model ? { re: Array.from(model.re), im: Array.from(model.im, (v) => (e.conjugated ? -v : v)) } : null;
  const tau = e.delayS ?? 0;
  const dataFrame = removeDelay(t.freqHz, t.re, t.im, tau, e.conjugated);
  const modelFrame = model ? removeDelay(t.freqHz, model.re, model.im, tau, false) : null;
  return {
    index,
    count,
    bias: t.bias,
    biasUnit: data.biasUnit,
    geometry: e.geometry,
    file: t.file ?? null,
    rows: t.rows ?? null,
    freqHz: freq,
    re: Array.from(t.re),
    im: Array.from(t.im),
    model: modelRaw,
    delayRemoved: { ...dataFrame, model: modelFrame },
    circle: modelCircle(e),
    extraction: {
      frHz: finite(e.frHz),
      ql: finite(e.ql),
      qcAbs: finite(e.qcAbs),
      qi: finite(e.qi),
      phiRad: finite(e.phiRad),
      a: finite(e.a),
      alphaRad: finite(e.alphaRad),
      delayS: finite(e.delayS),
      snr: finite(e.snr),
      conjugated: e.conjugated,
      flag: e.flag,
      reason: e.reason,
    },
  };
}
