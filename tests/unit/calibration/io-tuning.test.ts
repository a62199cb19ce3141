/**
 * Tuning-point and phase-versus-flux files of tests/fixtures/io. Expected values are the numbers
 * typed in the files, converted by hand with the SI prefixes (SI Brochure, BIPM 9th ed., table 7)
 * and 1° = π/180 rad; rows are the files' line numbers (header = row 1 when nothing precedes it).
 */
import * as fs from 'fs';
import * as path from 'path';
import { detectKind, parseSweepText, type PhaseFluxData, type TuningPointsData } from '@/calibration/io';

const dir = path.join(__dirname, '../../fixtures/io');
const read = (f: string): string => fs.readFileSync(path.join(dir, f), 'utf8');
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

interface Expect {
  file: string;
  biasUnit: string;
  biasQuantity: string;
  points: { row: number; bias: number; frHz: number; sigmaHz?: number; ql?: number; qc?: number; qi?: number }[];
  warnings: RegExp[];
}

const TUNING: Expect[] = [
  {
    file: 'tuning_brackets.csv',
    biasUnit: 'mA',
    biasQuantity: 'current',
    points: [
      { row: 3, bias: -0.5, frHz: 5.912e9, sigmaHz: 0.15e6, ql: 18000, qc: 30000, qi: 45000 },
      { row: 4, bias: -0.25, frHz: 5.981e9, sigmaHz: 0.12e6, ql: 19000, qc: 30500, qi: 50300 },
      { row: 5, bias: 0, frHz: 6.002e9, sigmaHz: 0.1e6, ql: 20000, qc: 31000, qi: 56300 },
      { row: 6, bias: 0.25, frHz: 5.9805e9, sigmaHz: 0.12e6, qc: 30400 },
      { row: 7, bias: 0.5, frHz: 5.9118e9, sigmaHz: 0.16e6, ql: 17500, qc: 29800, qi: 42400 },
    ],
    warnings: [/row 6, column 'Ql': 1 empty value/, /row 6, column 'Qi': 1 empty value/],
  },
  {
    // µ sign, semicolons, decimal commas, parentheses.
    file: 'tuning_parens_semicolon.csv',
    biasUnit: 'uA',
    biasQuantity: 'current',
    points: [
      { row: 2, bias: -12.5, frHz: 6.1234e9, sigmaHz: 25000 },
      { row: 3, bias: 0, frHz: 6.2001e9, sigmaHz: 21000 },
      { row: 4, bias: 12.5, frHz: 6.1236e9, sigmaHz: 26000 },
    ],
    warnings: [],
  },
  {
    // BOM, CRLF, tabs, suffix units.
    file: 'tuning_suffix_tab.tsv',
    biasUnit: 'V',
    biasQuantity: 'voltage',
    points: [
      { row: 2, bias: 0.1, frHz: 6.1e9, qi: 1e5 },
      { row: 3, bias: 0.2, frHz: 6.05e9, qi: 1.2e5 },
      { row: 4, bias: 0.3, frHz: 5.98e9, qi: 9.5e4 },
    ],
    warnings: [],
  },
  {
    // numpy.savetxt style: the header sits in a '#' line.
    file: 'tuning_numpy_header.csv',
    biasUnit: 'uA',
    biasQuantity: 'current',
    points: [
      { row: 2, bias: -10, frHz: 6.05e9 },
      { row: 3, bias: 0, frHz: 6.1e9 },
      { row: 4, bias: 10, frHz: 6.05e9 },
    ],
    warnings: [/row 1: no header row; took the column names from comment row 1/],
  },
  {
    // Quoted cells; kHz; 'I' names a current.
    file: 'tuning_quoted.csv',
    biasUnit: 'nA',
    biasQuantity: 'current',
    points: [
      { row: 2, bias: -300, frHz: 6001000.5e3, qc: 2.1e4 },
      { row: 3, bias: 0, frHz: 6002000.25e3, qc: 2.2e4 },
      { row: 4, bias: 300, frHz: 6001000.75e3, qc: 2.1e4 },
    ],
    warnings: [],
  },
];

describe('tuning-point files', () => {
  test.each(TUNING.map((t) => [t.file, t] as const))('%s', (file, exp) => {
    const text = read(file);
    expect(detectKind(file, text)).toBe('tuning_points');
    const d = parseSweepText(file, text) as TuningPointsData;
    expect(d.kind).toBe('tuning_points');
    expect(d.file).toBe(file);
    expect(d.biasUnit).toBe(exp.biasUnit);
    expect(d.biasQuantity).toBe(exp.biasQuantity);
    expect(d.points).toHaveLength(exp.points.length);
    exp.points.forEach((p, i) => {
      const got = d.points[i];
      expect(got.row).toBe(p.row);
      expect(got.bias).toBeCloseTo(p.bias, 12);
      expect(rel(got.frHz, p.frHz)).toBeLessThan(1e-13);
      for (const k of ['sigmaHz', 'ql', 'qc', 'qi'] as const) {
        if (p[k] === undefined) expect(got[k]).toBeUndefined();
        else expect(rel(got[k] as number, p[k] as number)).toBeLessThan(1e-13);
      }
    });
    for (const w of exp.warnings) expect(d.issues.some((i) => i.severity === 'warning' && w.test(i.message))).toBe(true);
    expect(d.issues.every((i) => i.severity === 'warning')).toBe(true);
  });

  test('metadata comments are kept', () => {
    const d = parseSweepText('tuning_brackets.csv', read('tuning_brackets.csv')) as TuningPointsData;
    expect(d.points.length).toBe(5);
    const p = parseSweepText('phase_flux_deg.csv', read('phase_flux_deg.csv')) as PhaseFluxData;
    expect(p.metadata.probe_frequency).toBe('6.1 GHz');
  });

  test('duplicated bias points are a warning naming both rows', () => {
    const d = parseSweepText('dup.csv', 'bias [mA],f [GHz]\n0.1,6.0\n0.2,6.1\n0.1,6.01\n') as TuningPointsData;
    expect(d.points).toHaveLength(3);
    expect(d.issues.map((i) => i.message)).toEqual(
      expect.arrayContaining([expect.stringMatching(/row 4, column 'bias \[mA\]': bias 0.1 mA appears twice: row 2 and row 4/)]),
    );
  });

  test('a unitless frequency column in Hz is accepted with a warning', () => {
    const d = parseSweepText('hz.csv', 'bias [mA],frequency\n0,6.1e9\n1,6.2e9\n') as TuningPointsData;
    expect(d.points.map((p) => p.frHz)).toEqual([6.1e9, 6.2e9]);
    expect(d.issues[0].message).toMatch(/column 'frequency': no unit; values ≥ 1 MHz taken as Hz/);
  });

  test('a bias without unit is kept as arbitrary units, with a warning', () => {
    const d = parseSweepText('au.csv', 'coil,f [GHz]\n0,6.1\n1,6.2\n') as TuningPointsData;
    expect(d.biasUnit).toBe('a.u.');
    expect(d.biasQuantity).toBe('current');
    expect(d.issues.some((i) => /bias has no unit/.test(i.message))).toBe(true);
  });

  test('unused columns are reported, not ignored silently', () => {
    const d = parseSweepText('x.csv', 'bias [mA],f [GHz],T [mK]\n0,6.1,20\n1,6.2,21\n') as TuningPointsData;
    expect(d.issues.some((i) => i.column === 'T [mK]' && /not used/.test(i.message))).toBe(true);
  });
});

describe('phase-versus-flux files', () => {
  test('degrees, probe frequency from a comment', () => {
    const text = read('phase_flux_deg.csv');
    expect(detectKind('phase_flux_deg.csv', text)).toBe('phase_flux');
    const d = parseSweepText('phase_flux_deg.csv', text) as PhaseFluxData;
    expect(d.kind).toBe('phase_flux');
    expect(d.biasUnit).toBe('mA');
    expect(d.probeFrequencyHz).toBeCloseTo(6.1e9, 0);
    expect(d.probeFrequencySource).toBe('comment');
    const want = [
      [4, -0.5, -170, 0.5],
      [5, -0.25, -95.5, 0.4],
      [6, 0, 12.25, 0.4],
      [7, 0.25, 100, 0.6],
    ];
    expect(d.points).toHaveLength(4);
    want.forEach(([row, bias, deg, sdeg], i) => {
      expect(d.points[i].row).toBe(row);
      expect(d.points[i].bias).toBe(bias);
      expect(d.points[i].phaseRad).toBeCloseTo((deg * Math.PI) / 180, 14);
      expect(d.points[i].sigmaRad).toBeCloseTo((sdeg * Math.PI) / 180, 14);
    });
  });

  test('radians, probe frequency from a column; the option wins over both', () => {
    const text = read('phase_flux_rad_column.csv');
    const d = parseSweepText('phase_flux_rad_column.csv', text) as PhaseFluxData;
    expect(d.biasUnit).toBe('V');
    expect(d.biasQuantity).toBe('voltage');
    expect(d.probeFrequencyHz).toBeCloseTo(7.25e9, 0);
    expect(d.probeFrequencySource).toBe('column');
    expect(d.points.map((p) => p.phaseRad)).toEqual([0.1, 0.4, 1.2]);
    const o = parseSweepText('phase_flux_rad_column.csv', text, { probeFrequencyHz: 7.2e9 }) as PhaseFluxData;
    expect(o.probeFrequencyHz).toBe(7.2e9);
    expect(o.probeFrequencySource).toBe('option');
    expect(o.issues.some((i) => /differs/.test(i.message))).toBe(true);
  });

  test('no probe frequency anywhere gives null (the CLI asks for it)', () => {
    const d = parseSweepText('p.csv', 'bias [mA],phase [rad]\n0,0.1\n1,0.2\n') as PhaseFluxData;
    expect(d.probeFrequencyHz).toBeNull();
    expect(d.probeFrequencySource).toBeNull();
  });
});

describe('detectKind', () => {
  const cases: [string, string, string][] = [
    ['a.s1p', '# GHz S MA R 50\n', 'touchstone'],
    ['a.S2P', 'anything', 'touchstone'],
    ['a.txt', '! exported\n# MHz S RI R 50\n6000 0.1 0.2\n', 'touchstone'],
    ['a.csv', 'bias [mA],frequency [GHz],S21 real,S21 imag\n0,6,1,0\n', 'raw_complex'],
    ['a.csv', 'bias [mA],frequency [GHz],S21 [dB],phase [deg]\n0,6,1,0\n', 'raw_complex'],
    ['a.csv', 'bias [mA],phase [deg]\n0,1\n', 'phase_flux'],
    ['a.csv', 'bias [mA],phase [deg],probe frequency [GHz]\n0,1,6\n', 'phase_flux'],
    ['a.csv', 'bias [mA],fr [GHz],Qi\n0,6,1e5\n', 'tuning_points'],
    ['a.csv', 'bias [mA],frequency [GHz],phase [deg]\n0,6.1,1\n1,6.1,2\n', 'phase_flux'],
    ['a.csv', 'bias [mA],frequency [GHz],phase [deg]\n0,6.1,1\n0,6.2,2\n', 'raw_complex'],
  ];
  test.each(cases)('%s: %s', (name, text, kind) => {
    expect(detectKind(name, text)).toBe(kind);
  });
});
