/**
 * LARGE INPUT (slow, ~50 MB generated in memory): the raw reader must handle a 50 MB long-form
 * sweep (571 bias × 2001 frequencies × 4 columns) and keep every point. No timing assertion here;
 * speeds are measured separately (see the parsers' report). Values are checked against the
 * formulas that generated them.
 */
import { parseSweepText, type RawSweepData } from '@/calibration/io';

const NB = 571;
const NF = 2001;

const dbAt = (k: number): number => -3 - (k % 17) * 0.25 - k * 1e-6;
const phaseDegAt = (k: number): number => ((k * 7) % 360) - 180 + 0.123456;

function generate(): string {
  const chunks: string[] = ['bias [uA],frequency [GHz],S21 [dB],S21 phase [deg]\n'];
  for (let b = 0; b < NB; b++) {
    const bias = (-50 + (100 * b) / (NB - 1)).toFixed(6);
    const lines: string[] = new Array(NF);
    for (let k = 0; k < NF; k++) {
      lines[k] = `${bias},${(5.9 + k * 1e-4).toFixed(10)},${dbAt(k).toFixed(6)},${phaseDegAt(k).toFixed(6)}\n`;
    }
    chunks.push(lines.join(''));
  }
  return chunks.join('');
}

describe('LARGE INPUT (~50 MB, slow)', () => {
  test('a 50 MB raw sweep parses completely', () => {
    const text = generate();
    expect(text.length).toBeGreaterThan(45e6);
    const d = parseSweepText('big.csv', text) as RawSweepData;
    expect(d.traces).toHaveLength(NB);
    expect(d.biasUnit).toBe('uA');
    let total = 0;
    for (const t of d.traces) total += t.freqHz.length;
    expect(total).toBe(NB * NF);
    // Trace 285 (bias 0), point 1234, from the generating formulas as written to 6 decimals; |S| = 10^(dB/20).
    const t = d.traces[285];
    expect(t.bias).toBeCloseTo(0, 12);
    expect(t.rows).toEqual([2 + 285 * NF, 1 + 286 * NF]);
    const k = 1234;
    const db = Number(dbAt(k).toFixed(6));
    const ph = (Number(phaseDegAt(k).toFixed(6)) * Math.PI) / 180;
    const m = Math.pow(10, db / 20);
    expect(t.freqHz[k]).toBeCloseTo((5.9 + k * 1e-4) * 1e9, 0);
    expect(t.re[k]).toBeCloseTo(m * Math.cos(ph), 12);
    expect(t.im[k]).toBeCloseTo(m * Math.sin(ph), 12);
  }, 120000);
});
