/**
 * Touchstone 1.x, per "Touchstone File Format Specification 1.1 (EIA/IBIS, 2002)": option line
 * '# <frequency unit> <parameter> <format> R <n>' with defaults GHz S MA R 50, '!' comments,
 * formats RI / MA (angle in degrees) / DB (20·log10|S|, degrees), 2-port order S11 S21 S12 S22,
 * case-insensitive keywords, noise parameters after the 2-port data. Fixture values come from
 * make_io_fixtures.py (numpy); the inline examples below are computed by hand.
 */
import * as fs from 'fs';
import * as path from 'path';
import { parseSweepText, parseTouchstoneSet, SweepParseError, type RawSweepData } from '@/calibration/io';

const dir = path.join(__dirname, '../../fixtures/io');
const read = (f: string): string => fs.readFileSync(path.join(dir, f), 'utf8');
interface Sample {
  i: number;
  freqHz: number;
  re: number;
  im: number;
}
const expected = (JSON.parse(read('expected_io.json')) as { touchstone: Record<string, { bias: number; rows: [number, number]; S11?: Sample[]; S21?: Sample[]; S22?: Sample[] }> }).touchstone;

function close(got: RawSweepData, k: number, samples: Sample[]): void {
  const t = got.traces[k];
  for (const s of samples) {
    expect(Math.abs(t.freqHz[s.i] - s.freqHz) / s.freqHz).toBeLessThan(1e-14);
    const mag = Math.hypot(s.re, s.im);
    expect(Math.hypot(t.re[s.i] - s.re, t.im[s.i] - s.im) / mag).toBeLessThan(1e-12);
  }
}

/** n lines of a 1-port RI file, S11 = 0.5 + 0.1 i (hand-chosen). */
function ri1(n: number, unit = 'GHz'): string {
  return [`# ${unit} S RI R 50`, ...Array.from({ length: n }, (_, i) => `${6 + i * 0.001} 0.5 0.1`)].join('\n');
}

describe('Touchstone fixture files', () => {
  test.each(Object.keys(expected))('%s', (name) => {
    const exp = expected[name];
    const d = parseSweepText(name, read(name)) as RawSweepData;
    expect(d.kind).toBe('touchstone');
    expect(d.traces).toHaveLength(1);
    expect(d.traces[0].bias).toBe(exp.bias);
    expect(d.traces[0].rows).toEqual(exp.rows);
    expect(d.traces[0].file).toBe(name);
    const isS1p = name.endsWith('.s1p');
    // Default parameter: S11 for .s1p (reflection), S21 for .s2p (notch).
    expect(d.sparam).toBe(isS1p ? 'S11' : 'S21');
    expect(d.geometry).toBe(isS1p ? 'reflection' : 'notch');
    close(d, 0, (isS1p ? exp.S11 : exp.S21)!);
  });

  test.each(['S11', 'S22'] as const)('port %s of a 2-port file', (port) => {
    const name = 'dev3_ri_bias_-0.125mA.s2p';
    const d = parseTouchstoneSet([{ name, text: read(name) }], { port });
    expect(d.sparam).toBe(port);
    expect(d.geometry).toBe('reflection');
    close(d, 0, expected[name][port]!);
  });

  test('round trip: the RI, MA and DB files of the same data agree', () => {
    for (const bias of ['-0.125mA', '0p5mA']) {
      const sets = ['ri', 'ma', 'db'].map((f) => {
        const name = `dev3_${f}_bias_${bias}.s2p`;
        return parseTouchstoneSet([{ name, text: read(name) }]).traces[0];
      });
      for (const t of sets.slice(1)) {
        for (let i = 0; i < t.freqHz.length; i++) {
          expect(Math.abs(t.freqHz[i] - sets[0].freqHz[i]) / sets[0].freqHz[i]).toBeLessThan(1e-14);
          expect(Math.hypot(t.re[i] - sets[0].re[i], t.im[i] - sets[0].im[i]) / Math.hypot(sets[0].re[i], sets[0].im[i])).toBeLessThan(1e-12);
        }
      }
    }
  });

  test('noise parameters after the 2-port data are skipped with a warning', () => {
    const d = parseSweepText('amp_bias_0V.s2p', read('amp_bias_0V.s2p')) as RawSweepData;
    expect(d.traces[0].freqHz.length).toBe(21);
    expect(d.issues.some((i) => /noise parameters from row 24 on are ignored/.test(i.message))).toBe(true);
    expect(d.biasUnit).toBe('V');
  });
});

describe('Touchstone sets', () => {
  test('bias from the file names (default pattern), sorted by bias, unit kept', () => {
    const names = ['dev3_ri_bias_0p5mA.s2p', 'dev3_ri_bias_-0.125mA.s2p'];
    const d = parseTouchstoneSet(names.map((name) => ({ name, text: read(name) })));
    expect(d.kind).toBe('touchstone');
    expect(d.file).toEqual(names);
    expect(d.biasUnit).toBe('mA');
    expect(d.biasQuantity).toBe('current');
    expect(d.traces.map((t) => t.bias)).toEqual([-0.125, 0.5]);
    expect(d.traces.map((t) => t.file)).toEqual(['dev3_ri_bias_-0.125mA.s2p', 'dev3_ri_bias_0p5mA.s2p']);
  });

  test('mixed units convert to the first file unit (1 uA = 1e-3 mA, SI prefixes)', () => {
    const d = parseTouchstoneSet([
      { name: 'a_250uA.s1p', text: ri1(20) },
      { name: 'a_-0.5mA.s1p', text: ri1(20) },
    ]);
    expect(d.biasUnit).toBe('uA');
    expect(d.traces.map((t) => t.bias)).toEqual([-500, 250]);
  });

  test('bias values given by the caller, with a unit', () => {
    const d = parseTouchstoneSet(
      [
        { name: 'x.s1p', text: ri1(20), bias: 2 },
        { name: 'y.s1p', text: ri1(20), bias: 1 },
      ],
      { biasUnit: 'mV' },
    );
    expect(d.biasUnit).toBe('mV');
    expect(d.biasQuantity).toBe('voltage');
    expect(d.traces.map((t) => [t.bias, t.file])).toEqual([
      [1, 'y.s1p'],
      [2, 'x.s1p'],
    ]);
  });

  test('a custom bias pattern (string or RegExp, "p" as decimal point)', () => {
    const files = [
      { name: 'run7_I=1p25.s1p', text: ri1(20) },
      { name: 'run7_I=-3.s1p', text: ri1(20) },
    ];
    const a = parseTouchstoneSet(files, { biasPattern: 'I=([-\\d.p]+)', biasUnit: 'uA' });
    expect(a.traces.map((t) => t.bias)).toEqual([-3, 1.25]);
    const b = parseTouchstoneSet(files, { biasPattern: /I=([-\d.p]+)/ });
    expect(b.biasUnit).toBe('a.u.');
    expect(b.issues.some((i) => /no bias unit/.test(i.message))).toBe(true);
  });

  test('several bias-like values in a name: the bias unit picks one', () => {
    const files = [{ name: 'dev_10mV_0.5mA.s1p', text: ri1(20) }];
    expect(() => parseTouchstoneSet(files)).toThrow(/several bias-like values \(10mV, 0.5mA\)/);
    expect(parseTouchstoneSet(files, { biasUnit: 'mA' }).traces[0].bias).toBe(0.5);
  });

  test('duplicated bias across files is a warning naming both files', () => {
    const d = parseTouchstoneSet([
      { name: 'a_1mA.s1p', text: ri1(20) },
      { name: 'b_1mA.s1p', text: ri1(20) },
    ]);
    expect(d.traces).toHaveLength(2);
    expect(d.issues.some((i) => /bias 1 mA appears twice: files 'a_1mA.s1p' and 'b_1mA.s1p'/.test(i.message))).toBe(true);
  });

  test('an S21 trace saved as .s1p can be read as notch', () => {
    const d = parseSweepText('s21_bias_0mA.s1p', ri1(20), { geometry: 'notch' }) as RawSweepData;
    expect(d.geometry).toBe('notch');
  });
});

describe('Touchstone grammar, hand-computed values', () => {
  const lines = (opt: string, data: string[]): string => [opt, ...data].join('\n');
  // 20 identical-format points; first data line carries the value under test.
  const pad = (first: string, rest: (i: number) => string): string[] => [first, ...Array.from({ length: 19 }, (_, i) => rest(i + 1))];

  test('MA: 0.5 at 90° is 0 + 0.5i; frequency in MHz', () => {
    const d = parseSweepText('m_0mA.s1p', lines('# MHz S MA R 50', pad('6000 0.5 90', (i) => `${6000 + i} 0.5 90`))) as RawSweepData;
    const t = d.traces[0];
    expect(t.freqHz[0]).toBe(6e9);
    expect(t.re[0]).toBeCloseTo(0, 15);
    expect(t.im[0]).toBeCloseTo(0.5, 15);
  });

  test('DB: -6.0206 dB at 180° is -0.5 (10^(-6.0206/20) = 0.5); keywords are case-insensitive', () => {
    const db = 20 * Math.log10(0.5);
    const d = parseSweepText('d_0mA.s1p', lines('# khz s db r 75', pad(`6000000 ${db} 180`, (i) => `${6000000 + i} ${db} 180`))) as RawSweepData;
    expect(d.traces[0].freqHz[0]).toBe(6e9);
    expect(d.traces[0].re[0]).toBeCloseTo(-0.5, 14);
    expect(d.traces[0].im[0]).toBeCloseTo(0, 14);
  });

  test('defaults: an empty option line means GHz S MA R 50', () => {
    const d = parseSweepText('e_0mA.s1p', lines('#', pad('6.1 2 0 ! comment after data', (i) => `${6.1 + i * 1e-3} 2 0`))) as RawSweepData;
    expect(d.traces[0].freqHz[0]).toBeCloseTo(6.1e9, 3);
    expect(d.traces[0].re[0]).toBe(2);
  });

  test('2-port RI order is S11 S21 S12 S22', () => {
    const row = (f: number): string => `${f} 11 0.11 21 0.21 12 0.12 22 0.22`;
    const text = lines('# GHz S RI R 50', pad(row(6), (i) => row(6 + i * 1e-3)));
    const pick = (port: 'S11' | 'S21' | 'S12' | 'S22'): [number, number] => {
      const t = parseTouchstoneSet([{ name: 'p_0mA.s2p', text }], { port }).traces[0];
      return [t.re[0], t.im[0]];
    };
    expect(pick('S11')).toEqual([11, 0.11]);
    expect(pick('S21')).toEqual([21, 0.21]);
    expect(pick('S12')).toEqual([12, 0.12]);
    expect(pick('S22')).toEqual([22, 0.22]);
  });

  test('a second option line is ignored with a warning', () => {
    const d = parseSweepText('o_0mA.s1p', lines('# GHz S RI R 50\n# MHz S MA R 50', pad('6 0.5 0.1', (i) => `${6 + i * 1e-3} 0.5 0.1`))) as RawSweepData;
    expect(d.traces[0].freqHz[0]).toBe(6e9);
    expect(d.issues.some((i) => i.row === 2 && /second option line/.test(i.message))).toBe(true);
  });

  test('a 1-port file holds only S11', () => {
    expect(() => parseTouchstoneSet([{ name: 'a_1mA.s1p', text: ri1(20) }], { port: 'S21' })).toThrow(SweepParseError);
  });
});
