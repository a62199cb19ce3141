/**
 * Problems found while reading an input file. Every issue says where (file, row, column) and what
 * was expected, so a device engineer can fix the file without guessing.
 */

export interface ParseIssue {
  severity: 'error' | 'warning';
  file: string;
  /** 1-based row as a spreadsheet shows it (for CSV the file's line number; header = row 1 when nothing precedes it). */
  row: number | null;
  /** The header text as written (or a descriptive name for headerless formats such as Touchstone). */
  column: string | null;
  /** Full sentence including the location, e.g. "sweep.csv: row 214, column 'f [GHz]': 'n/a' is not a number". */
  message: string;
  /** The same text without the location prefix. */
  detail?: string;
}

/** Thrown when the file cannot be used; `issues` holds every error (and the warnings gathered so far). */
export class SweepParseError extends Error {
  readonly issues: ParseIssue[];
  constructor(issues: ParseIssue[], message?: string) {
    const errors = issues.filter((i) => i.severity === 'error');
    const shown = errors.slice(0, 3).map((i) => i.message);
    let text = message ?? shown.join('; ');
    if (!message && errors.length > 3) text += ` (and ${errors.length - 3} more error${errors.length - 3 === 1 ? '' : 's'})`;
    super(text || 'the input could not be read');
    this.name = 'SweepParseError';
    this.issues = issues;
  }
}

/** Stop collecting once this many errors are known: more would only bury the first ones. */
export const MAX_ERRORS = 20;

/** Internal signal: the error limit was reached. Caught by `runWithLog`. */
class ErrorLimitReached {}

export function locate(file: string, row: number | null, column: string | null): string {
  let where = file;
  if (row !== null) where += `: row ${row}`;
  if (column !== null) where += `${row !== null ? ',' : ':'} column '${column}'`;
  return where;
}

interface LogState {
  issues: ParseIssue[];
  errors: number;
  max: number;
}

export class IssueLog {
  private readonly state: LogState;
  constructor(
    public readonly file: string,
    state?: LogState,
  ) {
    this.state = state ?? { issues: [], errors: 0, max: MAX_ERRORS };
  }

  /** A log for another file that shares the error count (Touchstone sets). */
  forFile(file: string): IssueLog {
    return new IssueLog(file, this.state);
  }

  get issues(): ParseIssue[] {
    return this.state.issues;
  }
  get errorCount(): number {
    return this.state.errors;
  }

  private push(severity: 'error' | 'warning', row: number | null, column: string | null, detail: string): void {
    const message = `${locate(this.file, row, column)}: ${detail}`;
    this.state.issues.push({ severity, file: this.file, row, column, message, detail });
  }

  error(row: number | null, column: string | null, detail: string): void {
    this.push('error', row, column, detail);
    this.state.errors++;
    if (this.state.errors >= this.state.max) throw new ErrorLimitReached();
  }

  /** An error after which reading cannot continue (e.g. missing column). */
  fatal(row: number | null, column: string | null, detail: string): never {
    this.push('error', row, column, detail);
    this.state.errors++;
    throw new SweepParseError(this.state.issues);
  }

  warn(row: number | null, column: string | null, detail: string): void {
    this.push('warning', row, column, detail);
  }

  warnings(): ParseIssue[] {
    return this.state.issues.filter((i) => i.severity === 'warning');
  }

  throwIfErrors(): void {
    if (this.state.errors > 0) throw new SweepParseError(this.state.issues);
  }
}

/** Run a parse step; turn the error-limit signal into a SweepParseError carrying all issues so far. */
export function runWithLog<T>(log: IssueLog, fn: () => T): T {
  try {
    const out = fn();
    log.throwIfErrors();
    return out;
  } catch (e) {
    if (e instanceof ErrorLimitReached) {
      log.warn(null, null, `stopped reading after ${MAX_ERRORS} errors; fix these first`);
      throw new SweepParseError(log.issues);
    }
    throw e;
  }
}
