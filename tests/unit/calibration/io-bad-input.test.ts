/**
 * Malformed inputs of tests/fixtures/bad-input (written by make_bad_inputs.py). expected.json maps
 * each file to the issues the parser must report: row (file line, header = row 1), column (header
 * text as written) and a message substring. Every file must throw SweepParseError, never return
 * data with NaN in it.
 */
import * as fs from 'fs';
import * as path from 'path';
import { parseSweepText, SweepParseError, MAX_ERRORS, type ParseIssue, type ParseOptions } from '@/calibration/io';

const dir = path.join(__dirname, '../../fixtures/bad-input');
interface Want {
  row: number | null;
  column: string | null;
  message: string;
}
const expected = JSON.parse(fs.readFileSync(path.join(dir, 'expected.json'), 'utf8')) as Record<string, { opts?: ParseOptions; issues: Want[] }>;

function parseError(name: string, opts?: ParseOptions): SweepParseError {
  const text = fs.readFileSync(path.join(dir, name), 'utf8');
  try {
    parseSweepText(name, text, opts);
  } catch (e) {
    if (e instanceof SweepParseError) return e;
    throw new Error(`${name}: threw ${String(e)} instead of SweepParseError`);
  }
  throw new Error(`${name}: parsed without error`);
}

test('the bad-input table has at least 24 files, each listed once', () => {
  const onDisk = fs.readdirSync(dir).filter((f) => f !== 'expected.json' && !f.endsWith('.py'));
  expect(onDisk.length).toBeGreaterThanOrEqual(24);
  expect(onDisk.sort()).toEqual(Object.keys(expected).sort());
});

describe('bad inputs', () => {
  test.each(Object.keys(expected))('%s', (name) => {
    const { opts, issues: wanted } = expected[name];
    const err = parseError(name, opts);
    expect(err.issues.some((i) => i.severity === 'error')).toBe(true);
    // Every issue names the file; the thrown message starts with the first error.
    for (const i of err.issues) expect(i.file).toBe(name);
    expect(err.message.startsWith(`${name}:`)).toBe(true);
    for (const w of wanted) {
      const match = (i: ParseIssue): boolean => i.row === w.row && i.column === w.column && i.message.includes(w.message);
      if (!err.issues.some(match)) {
        throw new Error(`${name}: no issue with row ${w.row}, column ${w.column}, message ~ "${w.message}"; got:\n${err.issues.map((i) => `  [${i.row}, ${i.column}] ${i.message}`).join('\n')}`);
      }
      // The message carries the location as a spreadsheet user reads it.
      const hit = err.issues.find(match)!;
      if (w.row !== null) expect(hit.message).toContain(`row ${w.row}`);
      if (w.column !== null) expect(hit.message).toContain(`column '${w.column}'`);
    }
  });

  test(`error collection stops at ${MAX_ERRORS} errors`, () => {
    const err = parseError('too_many_errors.csv');
    expect(err.issues.filter((i) => i.severity === 'error')).toHaveLength(MAX_ERRORS);
    expect(err.message).toMatch(/and 17 more errors/);
  });
});
