/**
 * `plan` / `rank` command handlers: the CLI is a thin wrapper, so its JSON must equal the library
 * result for the same request; bad arguments exit 2 naming the option; refusals exit 1.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runPlan, runRank } from '@/calibration/cli/plan';
import { planFromCalibration } from '@/calibration/planner';
import { tuningCalibration } from '@/tests/fixtures/planner/hand-calibration';

const dir = mkdtempSync(join(tmpdir(), 'planner-cli-'));
const cal = tuningCalibration();
const file = join(dir, 'fit.json');
writeFileSync(file, JSON.stringify(cal));
const bad = join(dir, 'bad.json');
writeFileSync(bad, '{"schema": "something/else"}');

const base = ['--calibration', file, '--mode', 'cavity', '--flux', '0.3', '--target-pair-rate', '1e5', '--ql', '5000', '--qc', '6000'];

describe('plan command', () => {
  test('--json prints one object with the contract keys, equal to the library result', () => {
    const out = runPlan([...base, '--json']);
    expect(out.exitCode).toBe(0);
    const lines = out.stdout.trim().split('\n');
    expect(lines).toHaveLength(1);
    const obj = JSON.parse(lines[0]);
    for (const k of ['mode', 'operating_flux_phi0', 'resonance_hz', 'pump_frequency_hz', 'pump_amplitude_phi0', 'threshold_amplitude_phi0', 'drive_ratio', 'predicted_pair_rate', 'veff_over_v', 'delta_tau_s', 'warnings', 'uncertainty']) {
      expect(obj).toHaveProperty(k);
    }
    for (const k of ['pair_rate_p16', 'pair_rate_p50', 'pair_rate_p84']) expect(typeof obj.uncertainty[k]).toBe('number');
    const lib = planFromCalibration(cal, { mode: 'cavity', fluxPhi0: 0.3, targetPairRate: 1e5, ql: 5000, qc: 6000 });
    expect(obj).toEqual(JSON.parse(JSON.stringify(lib)));
  });

  test('line mode with bias, band and power chain', () => {
    const out = runPlan(['--calibration', file, '--mode', 'line', '--bias', '0.35', '--target-pair-rate', '1e4', '--pump-frequency', '12e9', '--band', '1e9', '--pump-period', '1e-3', '--attenuation-db', '20,20,20', '--draws', '200', '--json']);
    expect(out.exitCode).toBe(0);
    const obj = JSON.parse(out.stdout);
    expect(obj.mode).toBe('line');
    expect(obj.delta_tau_s).toBeGreaterThan(0);
    expect(obj.generator_power_dbm).toBeGreaterThan(obj.power_at_chip_dbm);
    expect(obj.uncertainty.draws).toBe(200);
  });

  test('readable summary without --json', () => {
    const out = runPlan(base);
    expect(out.exitCode).toBe(0);
    expect(out.stdout).toMatch(/Drive plan \(cavity mode\)/);
    expect(out.stdout).toMatch(/pump amplitude/);
  });

  test.each([
    [['--calibration', file, '--flux', '0.3', '--target-pair-rate', '1e5'], '--mode'],
    [['--calibration', file, '--mode', 'bogus', '--flux', '0.3', '--target-pair-rate', '1e5'], '--mode'],
    [['--mode', 'cavity', '--flux', '0.3', '--target-pair-rate', '1e5'], '--calibration'],
    [[...base.slice(0, 4), '--flux', 'abc', ...base.slice(6)], '--flux'],
    [['--calibration', file, '--mode', 'cavity', '--target-pair-rate', '1e5'], '--flux'],
    [[...base, '--bias', '0.2'], '--bias'],
    [[...base, '--target-gain-db', '10'], '--target-gain-db'],
    [[...base.slice(0, 6), '--target-pair-rate', '-5'], '--target-pair-rate'],
    [[...base, '--temperature', '-1'], '--temperature'],
    [[...base, '--pump-period', '1e-3'], '--attenuation-db'],
    [[...base, '--attenuation-db', '20,x'], '--attenuation-db'],
    [[...base, '--frobnicate', '1'], '--frobnicate'],
    [[...base, '--ql'], '--ql'],
    [['--calibration', bad, ...base.slice(2)], '--calibration'],
    [['--calibration', join(dir, 'missing.json'), ...base.slice(2)], '--calibration'],
    [['--calibration', file, '--mode', 'line', '--flux', '0.3', '--target-pair-rate', '1e5'], '--pump-frequency'],
  ])('bad arguments %# → exit 2 naming %s', (argv, option) => {
    const out = runPlan(argv as string[]);
    expect(out.exitCode).toBe(2);
    expect(out.stdout).toContain(option);
    const js = runPlan(['--json', ...(argv as string[])]);
    expect(js.exitCode).toBe(2);
    expect(JSON.parse(js.stdout).error.message).toContain(option);
  });

  test('above threshold → exit 1 with the reason', () => {
    const out = runPlan([...base.slice(0, 6), '--target-pair-rate', '1e20', '--ql', '5000', '--qc', '6000']);
    expect(out.exitCode).toBe(1);
    expect(out.stdout).toMatch(/threshold/);
    expect(out.stdout).toContain('--target-pair-rate');
  });
});

describe('rank command', () => {
  test('--json lists ranked points; text prints a table', () => {
    const argv = ['--calibration', file, '--mode', 'cavity', '--target-pair-rate', '1e5', '--ql', '5000', '--qc', '6000', '--top', '4', '--draws', '100'];
    const js = runRank([...argv, '--json']);
    expect(js.exitCode).toBe(0);
    const obj = JSON.parse(js.stdout);
    expect(obj.points).toHaveLength(4);
    expect(obj.scanned).toBeGreaterThanOrEqual(200);
    const txt = runRank(argv);
    expect(txt.exitCode).toBe(0);
    expect(txt.stdout).toMatch(/rank\s+bias/);
    expect(txt.stdout).toMatch(/Scoring:/);
  });
  test('--flux-noise reaches the ranking (a noisier flux picks a smaller slope)', () => {
    const argv = ['--calibration', file, '--mode', 'cavity', '--target-pair-rate', '1e5', '--ql', '2e5', '--qc', '2.4e5', '--top', '1', '--draws', '0', '--json'];
    const quiet = JSON.parse(runRank([...argv, '--flux-noise', '1e-8']).stdout).points[0].plan;
    const noisy = JSON.parse(runRank([...argv, '--flux-noise', '3e-6']).stdout).points[0].plan;
    expect(Math.abs(noisy.slope_hz_per_phi0)).toBeLessThan(Math.abs(quiet.slope_hz_per_phi0));
    expect(runRank([...argv, '--flux-noise', '-1']).exitCode).toBe(2);
  });
  test('bad --points exits 2', () => {
    const out = runRank(['--calibration', file, '--mode', 'cavity', '--target-pair-rate', '1e5', '--points', '10']);
    expect(out.exitCode).toBe(2);
    expect(out.stdout).toContain('--points');
  });
});
