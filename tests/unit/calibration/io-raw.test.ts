/**
 * Raw complex long-form sweeps. Expected values come from tests/fixtures/io/expected_io.json,
 * written by make_io_fixtures.py with numpy from the complex S values themselves; the files hold
 * the same data as real/imag, as dB + degrees (dB = 20·log10|S|, definition of the decibel for a
 * field ratio) and as |S| + radians, so reading them back checks each conversion independently.
 */
import * as fs from 'fs';
import * as path from 'path';
import { detectKind, parseSweepText, SweepParseError, type RawSweepData } from '@/calibration/io';

const dir = path.join(__dirname, '../../fixtures/io');
const read = (f: string): string => fs.readFileSync(path.join(dir, f), 'utf8');
interface Sample {
  i: number;
  freqHz: number;
  re: number;
  im: number;
}
interface TraceExp {
  bias: number;
  rows: [number, number];
  n: number;
  samples: Sample[];
}
interface FileExp {
  kind: string;
  biasUnit: string;
  biasQuantity: string;
  geometry: string;
  reversedTraces?: number;
  traces: TraceExp[];
}
const expected = JSON.parse(read('expected_io.json')) as Record<string, FileExp>;
const files = Object.keys(expected).filter((k) => k !== 'touchstone');

describe('raw complex files', () => {
  test.each(files)('%s', (file) => {
    const exp = expected[file];
    const text = read(file);
    expect(detectKind(file, text)).toBe('raw_complex');
    const d = parseSweepText(file, text) as RawSweepData;
    expect(d.kind).toBe('raw_complex');
    expect(d.biasUnit).toBe(exp.biasUnit);
    expect(d.biasQuantity).toBe(exp.biasQuantity);
    expect(d.geometry).toBe(exp.geometry);
    expect(d.traces).toHaveLength(exp.traces.length);
    exp.traces.forEach((t, k) => {
      const got = d.traces[k];
      expect(got.bias).toBe(t.bias);
      expect(got.rows).toEqual(t.rows);
      expect(got.file).toBe(file);
      expect(got.freqHz.length).toBe(t.n);
      for (let i = 1; i < got.freqHz.length; i++) expect(got.freqHz[i]).toBeGreaterThan(got.freqHz[i - 1]);
      for (const s of t.samples) {
        expect(Math.abs(got.freqHz[s.i] - s.freqHz) / s.freqHz).toBeLessThan(1e-14);
        const mag = Math.hypot(s.re, s.im);
        // Round trip through dB/degrees costs a few ulps of |S|.
        expect(Math.abs(got.re[s.i] - s.re) / mag).toBeLessThan(1e-12);
        expect(Math.abs(got.im[s.i] - s.im) / mag).toBeLessThan(1e-12);
      }
    });
    const reversed = d.issues.filter((i) => /frequencies decrease in/.test(i.message));
    expect(reversed.length).toBe(exp.reversedTraces ? 1 : 0);
    if (exp.reversedTraces) expect(reversed[0].message).toMatch(new RegExp(`in ${exp.reversedTraces} trace .*rows ${exp.traces[1].rows[0]}–${exp.traces[1].rows[1]}`));
  });

  test('RI and dB/degree files of the same data agree point by point', () => {
    const a = parseSweepText('raw_s21_ri.csv', read('raw_s21_ri.csv')) as RawSweepData;
    const b = parseSweepText('raw_s21_db_deg.csv', read('raw_s21_db_deg.csv')) as RawSweepData;
    expect(a.traces.length).toBe(b.traces.length);
    let worst = 0;
    a.traces.forEach((t, k) => {
      const u = b.traces[k];
      expect(u.freqHz.length).toBe(t.freqHz.length);
      for (let i = 0; i < t.freqHz.length; i++) {
        worst = Math.max(worst, Math.abs(t.freqHz[i] - u.freqHz[i]) / t.freqHz[i]);
        worst = Math.max(worst, Math.hypot(t.re[i] - u.re[i], t.im[i] - u.im[i]) / Math.hypot(t.re[i], t.im[i]));
      }
    });
    expect(worst).toBeLessThan(1e-12);
  });

  test('the geometry option overrides the S-parameter in the names, with a warning', () => {
    const d = parseSweepText('raw_s21_ri.csv', read('raw_s21_ri.csv').replace('# geometry = notch\n', ''), { geometry: 'reflection' }) as RawSweepData;
    expect(d.geometry).toBe('reflection');
    expect(d.issues.some((i) => /hold S21 \(notch\) but the geometry is set to reflection/.test(i.message))).toBe(true);
  });

  test("'# geometry = reflection' sets the geometry when names carry no S-parameter", () => {
    const rows = Array.from({ length: 20 }, (_, i) => `0,${6 + i * 1e-4},${Math.cos(i)},${Math.sin(i)}`);
    const text = ['# geometry = reflection', 'bias [mA],frequency [GHz],real,imag', ...rows].join('\n');
    const d = parseSweepText('g.csv', text) as RawSweepData;
    expect(d.geometry).toBe('reflection');
    expect(d.traces[0].rows).toEqual([3, 22]);
    expect(d.traces[0].re[5]).toBe(Math.cos(5));
  });

  test('S11 and S21 in one file: the geometry option chooses', () => {
    const rows = Array.from({ length: 20 }, (_, i) => `0,${6 + i * 1e-4},1,0,0.5,0.25`);
    const text = ['bias [mA],f [GHz],S11 re,S11 im,S21 re,S21 im', ...rows].join('\n');
    expect(() => parseSweepText('two.csv', text)).toThrow(/holds S11 and S21/);
    const d = parseSweepText('two.csv', text, { geometry: 'notch' }) as RawSweepData;
    expect(d.sparam).toBe('S21');
    expect(d.traces[0].re[0]).toBe(0.5);
    expect(d.traces[0].im[0]).toBe(0.25);
  });

  test('non-monotonic and repeated trace biases are warnings naming the rows', () => {
    const block = (b: number): string[] => Array.from({ length: 20 }, (_, i) => `${b},${6 + i * 1e-4},1,0`);
    const text = ['bias [mA],f [GHz],S21 re,S21 im', ...block(0), ...block(1), ...block(0)].join('\n');
    const d = parseSweepText('h.csv', text) as RawSweepData;
    expect(d.traces).toHaveLength(3);
    const msgs = d.issues.map((i) => i.message).join('\n');
    expect(msgs).toMatch(/bias 0 mA appears twice: rows 2–21 and rows 42–61/);
    expect(msgs).toMatch(/bias is not monotonic: at rows 42–61/);
  });

  test('a short trace is an error naming its rows', () => {
    const rows = Array.from({ length: 19 }, (_, i) => `0,${6 + i * 1e-4},1,0`);
    try {
      parseSweepText('s.csv', ['bias [mA],f [GHz],S21 re,S21 im', ...rows].join('\n'));
      throw new Error('no error');
    } catch (e) {
      expect(e).toBeInstanceOf(SweepParseError);
      expect((e as SweepParseError).issues[0]).toMatchObject({ row: 2, column: 'bias [mA]', severity: 'error' });
      expect((e as Error).message).toMatch(/rows 2–20: the trace at bias 0 mA has only 19 points/);
    }
  });
});
