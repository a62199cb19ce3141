/**
 * Command handlers for `plan` and `rank` (the dispatcher calibration/cli/main.ts calls these).
 * Thin wrappers over calibration/planner: parse options, read the calibration JSON, print.
 * Exit codes: 0 ok, 1 planner refusal (e.g. above threshold), 2 bad arguments or unreadable input.
 */
import { readFileSync } from 'node:fs';
import { CALIBRATION_SCHEMA, type CalibrationJson } from '../contract';
import { PlanError, planFromCalibration, rankOperatingPoints } from '../planner/plan';
import type { PlanRequest, PlanResult, RankResult } from '../planner/types';
import type { PumpTone } from '../planner/line';

export interface CliOutput {
  stdout: string;
  exitCode: number;
}

class ArgError extends Error {
  constructor(public readonly option: string, message: string) {
    super(message);
  }
}

const VALUE_OPTIONS = new Set([
  'calibration', 'mode', 'flux', 'bias', 'target-pair-rate', 'target-gain-db', 'ql', 'qc', 'band', 'band-centre',
  'pump-frequency', 'detuning', 'temperature', 'pump-period', 'attenuation-db', 'threshold-power-dbm', 'pump-line-z0',
  'cold-stage-limit-w', 'draws', 'seed', 'waveform', 'phase-velocity', 'points', 'top', 'flux-noise',
]);
const FLAG_OPTIONS = new Set(['json', 'help']);

export const PLAN_USAGE = [
  'plan --calibration FIT.json --mode cavity|line (--flux PHI | --bias VALUE)',
  '     (--target-pair-rate R | --target-gain-db G) [--ql Q --qc Q] [--band HZ] [--band-centre HZ]',
  '     [--pump-frequency HZ] [--detuning HZ] [--temperature K]',
  '     [--pump-period A_PER_PHI0 --attenuation-db DB[,DB...] | --threshold-power-dbm P]',
  '     [--pump-line-z0 OHM] [--cold-stage-limit-w W] [--waveform K:A[@PHASE],...] [--phase-velocity M_PER_S]',
  '     [--draws N] [--seed S] [--json]',
  'rank  (same options; --flux/--bias ignored) [--points N] [--top K] [--flux-noise PHI0_RMS] [--json]',
].join('\n');

function parseArgs(argv: readonly string[]): Map<string, string | true> {
  const out = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith('--')) throw new ArgError(a, `unexpected argument '${a}' (options start with --)`);
    let name = a.slice(2);
    let value: string | undefined;
    const eq = name.indexOf('=');
    if (eq >= 0) {
      value = name.slice(eq + 1);
      name = name.slice(0, eq);
    }
    if (FLAG_OPTIONS.has(name)) {
      out.set(name, true);
      continue;
    }
    if (!VALUE_OPTIONS.has(name)) throw new ArgError(`--${name}`, `unknown option --${name}`);
    if (value === undefined) {
      value = argv[i + 1];
      if (value === undefined || (value.startsWith('--') && !/^--?\d/.test(value))) throw new ArgError(`--${name}`, `option --${name} needs a value`);
      i++;
    }
    if (out.has(name)) throw new ArgError(`--${name}`, `option --${name} given twice`);
    out.set(name, value);
  }
  return out;
}

function num(opts: Map<string, string | true>, name: string): number | undefined {
  const v = opts.get(name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (typeof v !== 'string' || v.trim() === '' || !Number.isFinite(x)) throw new ArgError(`--${name}`, `option --${name} needs a finite number, got '${String(v)}'`);
  return x;
}

function parseWaveform(text: string): PumpTone[] {
  return text.split(',').map((part) => {
    const m = /^\s*(\d+)\s*:\s*([^@\s]+)\s*(?:@\s*(\S+))?\s*$/.exec(part);
    if (!m) throw new ArgError('--waveform', `--waveform entries look like K:AMPLITUDE[@PHASE_RAD], got '${part}'`);
    const t: PumpTone = { harmonic: Number(m[1]), amplitudePhi0: Number(m[2]) };
    if (m[3] !== undefined) t.phaseRad = Number(m[3]);
    if (!Number.isFinite(t.amplitudePhi0) || (t.phaseRad !== undefined && !Number.isFinite(t.phaseRad))) throw new ArgError('--waveform', `--waveform entry '${part}' has a non-numeric amplitude or phase`);
    return t;
  });
}

function readCalibration(path: string): CalibrationJson {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new ArgError('--calibration', `cannot read calibration file '${path}': ${(e as Error).message}`);
  }
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw new ArgError('--calibration', `calibration file '${path}' is not valid JSON: ${(e as Error).message}`);
  }
  if (!doc || typeof doc !== 'object' || (doc as { schema?: unknown }).schema !== CALIBRATION_SCHEMA) {
    throw new ArgError('--calibration', `calibration file '${path}' is not a ${CALIBRATION_SCHEMA} document (missing or wrong "schema")`);
  }
  const cal = doc as CalibrationJson;
  if (!cal.params || typeof cal.params !== 'object') throw new ArgError('--calibration', `calibration file '${path}' has no "params" object`);
  return cal;
}

/** Build the planner request from parsed options (exported for the server and tests). */
export function requestFromOptions(opts: Map<string, string | true>, needPoint: boolean): PlanRequest {
  const mode = opts.get('mode');
  if (mode !== 'cavity' && mode !== 'line') throw new ArgError('--mode', `--mode must be 'cavity' or 'line'${mode === undefined ? ' (missing)' : `, got '${String(mode)}'`}`);
  const req: PlanRequest = { mode };
  const flux = num(opts, 'flux');
  const bias = num(opts, 'bias');
  if (needPoint) {
    if (flux === undefined && bias === undefined) throw new ArgError('--flux', 'give --flux PHI or --bias VALUE');
    if (flux !== undefined && bias !== undefined) throw new ArgError('--bias', 'give only one of --flux and --bias');
    if (flux !== undefined) req.fluxPhi0 = flux;
    else req.bias = bias;
  }
  const rate = num(opts, 'target-pair-rate');
  const gain = num(opts, 'target-gain-db');
  if (rate === undefined && gain === undefined) throw new ArgError('--target-pair-rate', 'give --target-pair-rate R or --target-gain-db G');
  if (rate !== undefined && gain !== undefined) throw new ArgError('--target-gain-db', 'give only one of --target-pair-rate and --target-gain-db');
  if (rate !== undefined && !(rate > 0)) throw new ArgError('--target-pair-rate', `--target-pair-rate must be > 0, got ${rate}`);
  if (gain !== undefined && !(gain > 0)) throw new ArgError('--target-gain-db', `--target-gain-db must be > 0 dB, got ${gain}`);
  req.targetPairRate = rate;
  req.targetGainDb = gain;
  const positive: Array<[string, keyof PlanRequest]> = [
    ['ql', 'ql'], ['qc', 'qc'], ['band', 'bandHz'], ['band-centre', 'bandCentreHz'], ['pump-frequency', 'pumpFrequencyHz'],
    ['pump-period', 'pumpPeriod'], ['pump-line-z0', 'pumpLineZ0Ohm'], ['cold-stage-limit-w', 'coldStageLimitW'], ['phase-velocity', 'phaseVelocityMPerS'],
  ];
  for (const [opt, key] of positive) {
    const x = num(opts, opt);
    if (x === undefined) continue;
    if (!(x > 0)) throw new ArgError(`--${opt}`, `--${opt} must be > 0, got ${x}`);
    (req as unknown as Record<string, number>)[key] = x;
  }
  const det = num(opts, 'detuning');
  if (det !== undefined) req.detuningHz = det;
  const t = num(opts, 'temperature');
  if (t !== undefined) {
    if (t < 0) throw new ArgError('--temperature', `--temperature must be ≥ 0 K, got ${t}`);
    req.temperatureK = t;
  }
  const thr = num(opts, 'threshold-power-dbm');
  if (thr !== undefined) req.thresholdPowerDbm = thr;
  const att = opts.get('attenuation-db');
  if (typeof att === 'string') {
    const stages = att.split(',').map((s) => Number(s.trim()));
    if (stages.some((x) => !Number.isFinite(x) || x < 0)) throw new ArgError('--attenuation-db', `--attenuation-db needs dB values ≥ 0 separated by commas (warm → cold), got '${att}'`);
    req.attenuationDb = stages;
  }
  if (req.pumpPeriod !== undefined && req.attenuationDb === undefined) throw new ArgError('--attenuation-db', '--pump-period needs --attenuation-db (total, or per stage warm → cold)');
  if (req.pumpPeriod !== undefined && thr !== undefined) throw new ArgError('--threshold-power-dbm', 'give either --pump-period/--attenuation-db or --threshold-power-dbm');
  if (req.qc !== undefined && req.ql !== undefined && req.qc < req.ql) throw new ArgError('--qc', `--qc (${req.qc}) must be ≥ --ql (${req.ql})`);
  const draws = num(opts, 'draws');
  if (draws !== undefined) {
    if (!Number.isInteger(draws) || draws < 0 || draws > 100000) throw new ArgError('--draws', `--draws must be an integer 0..100000, got ${draws}`);
    req.uncertaintyDraws = draws;
  }
  const seed = num(opts, 'seed');
  if (seed !== undefined) {
    if (!Number.isInteger(seed)) throw new ArgError('--seed', `--seed must be an integer, got ${seed}`);
    req.seed = seed;
  }
  const wf = opts.get('waveform');
  if (typeof wf === 'string') req.waveform = parseWaveform(wf);
  return req;
}

function fmt(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return x.toPrecision(digits);
}

export function formatPlan(r: PlanResult): string {
  const lines: string[] = [];
  lines.push(`Drive plan (${r.mode} mode)`);
  lines.push(`  operating flux      ${fmt(r.operating_flux_phi0, 6)} Φ0   bias ${fmt(r.operating_bias, 6)}`);
  if (r.mode === 'cavity') {
    lines.push(`  resonance           ${fmt(r.resonance_hz, 10)} Hz   κ/2π ${fmt(r.kappa_over_2pi_hz)} Hz   Q_l ${fmt(r.ql)}  Q_c ${fmt(r.qc)} (${r.q_source})`);
    lines.push(`  pump frequency      ${fmt(r.pump_frequency_hz, 10)} Hz   (pump shift of the mean resonance ${fmt(r.pump_frequency_shift_hz)} Hz, detuning ${fmt(r.detuning_hz)} Hz)`);
    lines.push(`  pump amplitude      ${fmt(r.pump_amplitude_phi0)} Φ0   threshold ${fmt(r.threshold_amplitude_phi0)} Φ0   δω/κ ${fmt(r.drive_ratio)}`);
    lines.push(`  predicted           ${fmt(r.predicted_pair_rate)} pairs/s   photons out ${fmt(r.photon_rate)} /s   intracavity ${fmt(r.intracavity_photons)}   gain ${fmt(r.gain_db)} dB`);
  } else {
    lines.push(`  pump frequency      ${fmt(r.pump_frequency_hz, 10)} Hz   band ${fmt(r.band_hz?.low, 8)} … ${fmt(r.band_hz?.high, 8)} Hz`);
    lines.push(`  pump amplitude      ${fmt(r.pump_amplitude_phi0)} Φ0   δτ ${fmt(r.delta_tau_s)} s   v_eff/v ${fmt(r.veff_over_v)}`);
    lines.push(`  predicted           ${fmt(r.predicted_pair_rate)} pairs/s in band   total emission ${fmt(r.total_photon_rate)} photons/s`);
    const a = r.context?.mechanical_mirror_amplitude_m;
    if (typeof a === 'number') lines.push(`  context             a mechanical mirror (two faces) would need a peak displacement of ${fmt(a, 3)} m at the same frequency`);
  }
  if (r.n_thermal > 0) lines.push(`  thermal occupation  ${fmt(r.n_thermal)} at ${r.temperature_k} K`);
  if (r.generator_power_dbm !== null) lines.push(`  generator power     ${fmt(r.generator_power_dbm)} dBm   at chip ${fmt(r.power_at_chip_dbm)} dBm`);
  if (r.uncertainty) {
    const u = r.uncertainty;
    lines.push(`  pair rate 16/50/84% ${fmt(u.pair_rate_p16)} / ${fmt(u.pair_rate_p50)} / ${fmt(u.pair_rate_p84)}  (${u.draws} draws, seed ${u.seed})`);
    if (u.threshold_amplitude_p50_phi0 !== null) lines.push(`  threshold 16/50/84% ${fmt(u.threshold_amplitude_p16_phi0)} / ${fmt(u.threshold_amplitude_p50_phi0)} / ${fmt(u.threshold_amplitude_p84_phi0)} Φ0`);
  }
  if (r.caution) lines.push(`  CAUTION: ${r.caution.text}`);
  for (const w of r.warnings) lines.push(`  warning [${w.code}] ${w.message}`);
  return lines.join('\n') + '\n';
}

export function formatRank(r: RankResult): string {
  const lines = [`Operating points (${r.mode} mode): ${r.feasible} of ${r.scanned} scanned biases feasible in [${fmt(r.bias_range[0], 6)}, ${fmt(r.bias_range[1], 6)}]`];
  lines.push(' rank  bias          flux/Φ0     score   δΦ/Φ0       pairs/s     power dBm');
  for (const p of r.points) {
    lines.push(` ${String(p.rank).padEnd(5)} ${fmt(p.bias, 6).padEnd(13)} ${fmt(p.operating_flux_phi0, 5).padEnd(11)} ${p.score.toFixed(3).padEnd(7)} ${fmt(p.plan.pump_amplitude_phi0, 4).padEnd(11)} ${fmt(p.plan.predicted_pair_rate, 4).padEnd(11)} ${fmt(p.plan.generator_power_dbm, 4)}`);
    for (const reason of p.reasons) lines.push(`        - ${reason}`);
  }
  const refused = Object.entries(r.refused);
  if (refused.length > 0) lines.push(`Refused: ${refused.map(([k, v]) => `${k} ×${v}`).join(', ')}`);
  lines.push(`Scoring: ${r.scoring}`);
  return lines.join('\n') + '\n';
}

function run(argv: readonly string[], kind: 'plan' | 'rank'): CliOutput {
  // Seen before parsing so that even a parse error is reported as JSON when asked.
  const json = argv.includes('--json');
  try {
    const opts = parseArgs(argv);
    if (opts.get('help') === true) return { stdout: PLAN_USAGE + '\n', exitCode: 0 };
    const path = opts.get('calibration');
    if (typeof path !== 'string') throw new ArgError('--calibration', '--calibration FIT.json is required');
    const req = requestFromOptions(opts, kind === 'plan');
    const cal = readCalibration(path);
    if (kind === 'plan') {
      const r = planFromCalibration(cal, req);
      return { stdout: json ? JSON.stringify(r) + '\n' : formatPlan(r), exitCode: 0 };
    }
    const points = num(opts, 'points');
    const top = num(opts, 'top');
    if (points !== undefined && !(Number.isInteger(points) && points >= 200 && points <= 5000)) throw new ArgError('--points', `--points must be an integer 200..5000, got ${points}`);
    if (top !== undefined && !(Number.isInteger(top) && top >= 1 && top <= 100)) throw new ArgError('--top', `--top must be an integer 1..100, got ${top}`);
    const fluxNoise = num(opts, 'flux-noise');
    if (fluxNoise !== undefined && !(fluxNoise > 0 && fluxNoise < 0.5)) throw new ArgError('--flux-noise', `--flux-noise must be in (0, 0.5) Φ0, got ${fluxNoise}`);
    const r = rankOperatingPoints(cal, req, { points, top, fluxNoisePhi0: fluxNoise });
    return { stdout: json ? JSON.stringify(r) + '\n' : formatRank(r), exitCode: 0 };
  } catch (e) {
    if (e instanceof ArgError) {
      const msg = `${kind}: ${e.message}${e.message.includes(e.option) ? '' : ` (${e.option})`}`;
      return { stdout: json ? JSON.stringify({ error: { code: 'bad_arguments', option: e.option, message: msg } }) + '\n' : `${msg}\n\n${PLAN_USAGE}\n`, exitCode: 2 };
    }
    if (e instanceof PlanError) {
      const code = e.code === 'bad_request' || e.code === 'calibration_incomplete' ? 2 : 1;
      const opt = e.option ? `--${e.option}` : undefined;
      const msg = `${kind}: ${e.message}${opt ? ` (${opt})` : ''}`;
      return { stdout: json ? JSON.stringify({ error: { code: e.code, option: opt ?? null, message: msg } }) + '\n' : msg + '\n', exitCode: code };
    }
    throw e;
  }
}

/** `plan` command. */
export function runPlan(argv: string[]): CliOutput {
  return run(argv, 'plan');
}

/** `rank` command. */
export function runRank(argv: string[]): CliOutput {
  return run(argv, 'rank');
}
