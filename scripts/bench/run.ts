/**
 * `npm run bench`: prints speed figures for the issue targets. Nothing here asserts; figures are
 * for the closing notes and for spotting regressions by eye. Inputs are synthetic (calibration/synth).
 */
import { performance } from 'node:perf_hooks';
import { availableParallelism, loadavg } from 'node:os';
import { rawComplexCsv, tuningPointsCsv } from '../../calibration/synth';
import { BENCH_DEVICE as device, BENCH_RAW_SHAPE } from './device';
import { benchUpload } from './upload';
import { benchPreview } from './preview';
import { calibrateFiles, parseSweepFiles } from '../../calibration/pipeline';
import { fitTuningCurve } from '../../calibration/tuning/fitTuning';
import { createExtractionPool, calibrateFilesParallel } from '../../calibration/workers/pool';
import { planFromCalibration, rankOperatingPoints } from '../../calibration/planner';
import type { TuningPointsData } from '../../calibration/io';


function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const i = (s.length - 1) * q;
  const lo = Math.floor(i);
  return s[lo] + (s[Math.min(s.length - 1, lo + 1)] - s[lo]) * (i - lo);
}

async function timeIt(runs: number, fn: () => unknown | Promise<unknown>): Promise<number[]> {
  const out: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    await fn();
    out.push(performance.now() - t);
  }
  return out;
}

function line(label: string, ms: number[], target?: string): void {
  const f = (x: number) => (x < 10 ? x.toFixed(2) : x.toFixed(0));
  console.log(`${label.padEnd(58)} median ${f(quantile(ms, 0.5)).padStart(7)} ms  p95 ${f(quantile(ms, 0.95)).padStart(7)} ms  (n=${ms.length})${target ? '  target ' + target : ''}`);
}

async function main(): Promise<void> {
  console.log(`Fluxwright benchmarks — node ${process.version}, ${availableParallelism()} cores, load ${loadavg().map((x) => x.toFixed(2)).join(' ')}`);

  // 1. Tuning fit of 200 points, exact model (parse excluded).
  const tuningText = tuningPointsCsv(device, { biasMin: -1.2, biasMax: 1.2, points: 200, noiseHz: 1.5e5, seed: 3 });
  const tuning = parseSweepFiles([{ name: 'tuning.csv', text: tuningText }]) as TuningPointsData;
  const pts = tuning.points.map((p) => ({ bias: p.bias, frHz: p.frHz, sigmaHz: p.sigmaHz ?? null }));
  await timeIt(3, () => fitTuningCurve(pts, { model: 'exact' }));
  line('tuning fit, 200 points, exact model', await timeIt(40, () => fitTuningCurve(pts, { model: 'exact' })), '≤ 20 ms');
  line('tuning fit, 200 points, approx model', await timeIt(40, () => fitTuningCurve(pts, { model: 'approx' })));

  // 2. Raw sweep 201 bias × 2001 frequency points: parse + extraction + tuning fit.
  const raw = rawComplexCsv(device, BENCH_RAW_SHAPE);
  console.log(`raw sweep CSV: ${(raw.length / 1e6).toFixed(1)} MB, 201 × 2001 points`);
  const files = [{ name: 'raw.csv', text: raw }];
  line('raw sweep, parse only', await timeIt(3, () => parseSweepFiles(files)));
  line('raw sweep, parse + extract + fit, one thread', await timeIt(3, () => calibrateFiles(files)), '≤ 2 s');
  const pool = createExtractionPool();
  await calibrateFilesParallel(pool, files); // warm the workers (they compile the core once)
  line(`raw sweep, parse + extract + fit, ${pool.options.maxThreads} worker threads`, await timeIt(5, () => calibrateFilesParallel(pool, files)), '≤ 2 s');
  await pool.destroy();

  // 3. Planner.
  const cal = calibrateFiles(files, { z0Ohm: 50 });
  const cavity = { mode: 'cavity' as const, fluxPhi0: 0.3, targetPairRate: 1e5, uncertaintyDraws: 0 };
  await timeIt(20, () => planFromCalibration(cal, cavity));
  line('plan, cavity mode, no uncertainty', await timeIt(300, () => planFromCalibration(cal, cavity)), '≤ 2 ms');
  line('plan, cavity mode, 1000-draw uncertainty', await timeIt(30, () => planFromCalibration(cal, { ...cavity, uncertaintyDraws: 1000 })));
  const lineReq = { mode: 'line' as const, fluxPhi0: 0.3, targetPairRate: 1e6, pumpFrequencyHz: 11e9, uncertaintyDraws: 0 };
  line('plan, line mode, no uncertainty', await timeIt(300, () => planFromCalibration(cal, lineReq)), '≤ 2 ms');
  line(
    'rank, 200 bias points, 1000-draw uncertainty (cavity)',
    await timeIt(10, () => rankOperatingPoints(cal, { ...cavity, uncertaintyDraws: 1000 }, { points: 200 })),
    '≤ 300 ms',
  );

  // 4. Through the product: upload of the raw sweep to a stored proposed fit (real MariaDB, worker pool).
  console.log('upload of the 201 × 2001 raw sweep through the API (target: stored proposed fit ≤ 5 s):');
  await benchUpload();

  // 5. Plan preview round trip at 20 concurrent clients on loopback (target p95 ≤ 50 ms).
  await benchPreview();
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
