/**
 * Header units and column names. Prefix factors are checked against the SI Brochure
 * (BIPM, 9th edition, 2019, table 7: kilo 1e3, mega 1e6, giga 1e9, milli 1e-3, micro 1e-6, nano 1e-9)
 * and the degree against its definition (1° = π/180 rad, SI Brochure table 8).
 */
import { classifyHeader, conversionFactor, normaliseUnit, parseFrequencyValue, parseUnitHeader, toHzFactor } from '@/calibration/io';

describe('parseUnitHeader', () => {
  const cases: [string, string, string | null][] = [
    ['bias [mA]', 'bias', 'mA'],
    ['coil current (uA)', 'coil current', 'uA'],
    ['frequency [GHz]', 'frequency', 'GHz'],
    ['f_r (Hz)', 'f_r', 'Hz'],
    ['bias_mA', 'bias', 'mA'],
    ['f_GHz', 'f', 'GHz'],
    ['flux_bias_V', 'flux_bias', 'V'],
    ['phase {deg}', 'phase', 'deg'],
    ['Re(S21)', 'Re(S21)', null],
    ['abs(S11) [dB]', 'abs(S11)', 'dB'],
    ['|S21|', '|S21|', null],
    ['S21_re', 'S21_re', null],
    ['f_r', 'f_r', null],
    ['Qi', 'Qi', null],
    ['probe frequency GHz', 'probe frequency', 'GHz'],
    ['  bias [ mA ]  ', 'bias', 'mA'],
  ];
  test.each(cases)('%s', (header, quantity, unit) => {
    expect(parseUnitHeader(header)).toEqual({ quantity, unit });
  });
});

describe('normaliseUnit', () => {
  const cases: [string, string, string][] = [
    ['\u00b5A', 'uA', 'current'], // micro sign U+00B5
    ['\u03bcA', 'uA', 'current'], // Greek mu U+03BC
    ['ua', 'uA', 'current'],
    ['MHz', 'MHz', 'frequency'],
    ['GHZ', 'GHz', 'frequency'],
    ['khz', 'kHz', 'frequency'],
    ['mV', 'mV', 'voltage'],
    ['degrees', 'deg', 'angle'],
    ['rad', 'rad', 'angle'],
    ['dB', 'dB', 'decibel'],
    ['Φ0', 'Phi0', 'flux'],
    ['a.u.', 'a.u.', 'arbitrary'],
  ];
  test.each(cases)('%s -> %s', (written, unit, kind) => {
    expect(normaliseUnit(written)).toMatchObject({ unit, kind });
  });
  test('unknown spellings give null', () => {
    expect(normaliseUnit('furlong')).toBeNull();
    expect(normaliseUnit('')).toBeNull();
  });
  test("'mHz' is read as MHz with a note", () => {
    expect(normaliseUnit('mHz')?.unit).toBe('MHz');
    expect(normaliseUnit('mHz')?.note).toMatch(/MHz/);
  });
});

describe('unit factors (SI Brochure prefixes)', () => {
  const hz: [string, number][] = [
    ['Hz', 1],
    ['kHz', 1e3],
    ['MHz', 1e6],
    ['GHz', 1e9],
  ];
  test.each(hz)('%s -> Hz', (u, f) => {
    expect(toHzFactor(u) / f).toBeCloseTo(1, 14);
  });
  const bias: [string, string, number][] = [
    ['mA', 'A', 1e-3],
    ['uA', 'mA', 1e-3],
    ['nA', 'uA', 1e-3],
    ['mV', 'V', 1e-3],
    ['uV', 'mV', 1e-3],
    ['deg', 'rad', Math.PI / 180],
  ];
  test.each(bias)('%s -> %s', (a, b, f) => {
    expect(conversionFactor(a, b) / f).toBeCloseTo(1, 14);
  });
});

describe('parseFrequencyValue (metadata comments)', () => {
  test.each([
    ['6.1 GHz', 6.1e9],
    ['6.1GHz', 6.1e9],
    ['6100 MHz', 6.1e9],
    ['6.1e9', 6.1e9],
    [' 250 kHz ', 2.5e5],
  ])('%s', (text, hz) => {
    const r = parseFrequencyValue(text);
    expect('hz' in r && r.hz / hz).toBeCloseTo(1, 14);
  });
  test.each(['six GHz', '6.1', '6.1 furlong', '-6 GHz'])('rejects %s', (text) => {
    expect('problem' in parseFrequencyValue(text)).toBe(true);
  });
});

describe('column roles', () => {
  const cases: [string, string | null, string | null][] = [
    ['bias [mA]', 'bias', null],
    ['coil current (uA)', 'bias', null],
    ['flux_bias_V', 'bias', null],
    ['I (nA)', 'bias', null],
    ['V [mV]', 'bias', null],
    ['voltage [V]', 'bias', null],
    ['frequency [GHz]', 'frequency', null],
    ['f_r (Hz)', 'frequency', null],
    ['fr [GHz]', 'frequency', null],
    ['resonance frequency [MHz]', 'frequency', null],
    ['freq', 'frequency', null],
    ['sigma [MHz]', 'sigma_frequency', null],
    ['f_r err (Hz)', 'sigma_frequency', null],
    ['uncertainty of frequency [kHz]', 'sigma_frequency', null],
    ['sigma', 'sigma', null],
    ['phase err [deg]', 'sigma_phase', null],
    ['Ql', 'ql', null],
    ['Q_c', 'qc', null],
    ['Qi', 'qi', null],
    ['S21 real', 're', 'S21'],
    ['S21 imag', 'im', 'S21'],
    ['Re(S21)', 're', 'S21'],
    ['Im(S11)', 'im', 'S11'],
    ['S21_re', 're', 'S21'],
    ['S21_im', 'im', 'S21'],
    ['real', 're', null],
    ['S21 [dB]', 'mag_db', 'S21'],
    ['S21_dB', 'mag_db', 'S21'],
    ['mag [dB]', 'mag_db', null],
    ['|S21|', 'mag_lin', 'S21'],
    ['|S11| [lin]', 'mag_lin', 'S11'],
    ['phase [deg]', 'phase', null],
    ['S21 phase [rad]', 'phase', 'S21'],
    ['arg(S11) [rad]', 'phase', 'S11'],
    ['probe frequency [GHz]', 'probe_frequency', null],
    ['S21 (dB)', 'mag_db', 'S21'],
    ['S21 magnitude [dB]', 'mag_db', 'S21'],
    ['S21_phase_deg', 'phase', 'S21'],
    ['S21.real', 're', 'S21'],
    ['Phase(S21) [deg]', 'phase', 'S21'],
    ['coil_current_uA', 'bias', null],
    ['temperature [mK]', null, null],
    ['S21', null, 'S21'],
  ];
  test.each(cases)('%s', (header, role, sparam) => {
    const c = classifyHeader(header, 0);
    expect(c.role).toBe(role);
    expect(c.sparam).toBe(sparam);
  });
  test('name implies the bias quantity', () => {
    expect(classifyHeader('coil current (uA)', 0).nameQuantity).toBe('current');
    expect(classifyHeader('V [mV]', 0).nameQuantity).toBe('voltage');
    expect(classifyHeader('bias [mA]', 0).nameQuantity).toBeNull();
  });
  test("a bare 'S21' explains how to name a magnitude", () => {
    expect(classifyHeader('S21', 0).hint).toMatch(/S21 \[dB\].*\|S21\|/);
  });
});
