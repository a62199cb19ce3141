/**
 * Delimited text tables: BOM, CRLF, '#' comment lines (with `# key = value` metadata), comma /
 * semicolon / tab delimiters guessed by papaparse. Rows are numbered by file line, which is what
 * a spreadsheet shows when the file is opened there (header = row 1 when nothing precedes it).
 */
import Papa from 'papaparse';
import { IssueLog } from './issues';

export interface MetaEntry {
  value: string;
  row: number;
}

export interface TableHead {
  file: string;
  /** Text without BOM. */
  text: string;
  header: string[];
  headerRow: number;
  /** Offset in `text` where the header line starts (or the first data line when the header came from a comment). */
  bodyStart: number;
  /** Row of the line at `bodyStart`. */
  bodyRow: number;
  /** The header came from a '#' line; `bodyStart` is then the first data line. */
  headerFromComment: boolean;
  delimiter: string;
  newline: '\n' | '\r';
  quoted: boolean;
  /** `# key = value` lines; keys folded to lower case with '_' for spaces. */
  metadata: Map<string, MetaEntry>;
  /** Rough count of lines, for preallocating typed arrays. */
  lineCount: number;
}

const BINARY = /[\x00-\x08\x0e-\x1f\ufffd]/;

function lineOf(text: string, index: number): number {
  let n = 1;
  for (let i = text.indexOf('\n'); i !== -1 && i < index; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

function countLines(text: string, newline: string): number {
  let n = 1;
  for (let i = text.indexOf(newline); i !== -1; i = text.indexOf(newline, i + 1)) n++;
  return n;
}

/** Reject what is not a text table before any parsing: empty, binary, spreadsheet workbooks. */
export function preflight(file: string, raw: string, log: IssueLog): string {
  const text = raw.charCodeAt(0) === 0xfeff ? raw.slice(1) : raw;
  if (text.trim() === '') log.fatal(null, null, 'the file is empty');
  if (text.startsWith('PK\u0003\u0004')) log.fatal(1, null, 'this is a ZIP archive (an .xlsx workbook?), not a text table; export the sheet as CSV');
  // UTF-16 (spreadsheet "Unicode text" export) read as UTF-8: BOM bytes undecodable, NUL every other byte.
  if (/^\ufffd\ufffd/.test(text) || (text.length > 3 && text.charCodeAt(1) === 0 && text.charCodeAt(3) === 0)) {
    log.fatal(1, null, 'this looks like UTF-16 text; save the table as UTF-8 CSV');
  }
  const m = BINARY.exec(text);
  if (m) {
    const code = m[0].charCodeAt(0);
    const what = code === 0xfffd ? 'undecodable bytes (not UTF-8 text)' : `a control byte 0x${code.toString(16).padStart(2, '0')}`;
    log.fatal(lineOf(text, m.index), null, `contains ${what}; the file looks binary, not text`);
  }
  return text;
}

function parseMetaLine(line: string): { key: string; value: string } | null {
  const m = /^\s*#+\s*([A-Za-z][\w .-]*?)\s*[=:]\s*(.*?)\s*$/.exec(line);
  if (!m) return null;
  return { key: m[1].toLowerCase().replace(/[\s.-]+/g, '_'), value: m[2] };
}

export function isNumberLike(s: string): boolean {
  const t = s.trim();
  return t !== '' && Number.isFinite(Number(t.replace(/^([+-]?\d+),(\d+)/, '$1.$2')));
}

function splitCells(line: string, delimiter: string): string[] {
  const r = Papa.parse<string[]>(line, { delimiter, newline: '\n' });
  return (r.data[0] ?? []).map((c) => c.trim());
}

/** Find the header, guess the delimiter, collect leading metadata. */
export function readHead(file: string, raw: string, log: IssueLog): TableHead {
  const text = preflight(file, raw, log);
  const newline: '\n' | '\r' = text.includes('\n') ? '\n' : text.includes('\r') ? '\r' : '\n';
  const metadata = new Map<string, MetaEntry>();
  let pos = 0;
  let row = 0;
  let headerStart = -1;
  let headerRow = 0;
  let lastComment: { text: string; row: number } | null = null;
  const sample: string[] = [];
  while (pos <= text.length) {
    let end = text.indexOf(newline, pos);
    if (end === -1) end = text.length;
    row++;
    const line = text.slice(pos, end).replace(/\r$/, '');
    const t = line.trim();
    if (headerStart === -1) {
      if (t.startsWith('#')) {
        const kv = parseMetaLine(t);
        if (kv && !metadata.has(kv.key)) metadata.set(kv.key, { value: kv.value, row });
        lastComment = { text: t.replace(/^#+\s*/, ''), row };
      } else if (t !== '') {
        headerStart = pos;
        headerRow = row;
        sample.push(line);
      }
    } else if (t !== '' && !t.startsWith('#')) {
      sample.push(line);
    }
    pos = end + 1;
    if (sample.length >= 21) break;
  }
  if (headerStart === -1) log.fatal(null, null, 'the file holds only comments or blank lines, no table');

  const guess = Papa.parse<string[]>(sample.join('\n'), { delimitersToGuess: [',', '\t', ';', '|'], newline: '\n' });
  let delimiter = guess.meta.delimiter;
  const undetected = guess.errors.some((e) => e.code === 'UndetectableDelimiter');
  if (undetected) {
    // One column, or a delimiter papaparse could not settle on: take the most frequent candidate in the header.
    const counts = [',', '\t', ';'].map((d) => [d, sample[0].split(d).length] as const).sort((a, b) => b[1] - a[1]);
    delimiter = counts[0][1] > 1 ? counts[0][0] : ',';
  }
  let header = splitCells(sample[0], delimiter);
  const bodyStart = headerStart;
  const bodyRow = headerRow;
  let headerFromComment = false;
  if (header.every(isNumberLike)) {
    // numpy.savetxt writes the header as a '#' line; accept it when it fits the data.
    const fromComment = lastComment ? splitCells(lastComment.text, delimiter) : [];
    if (lastComment && fromComment.length === header.length && !fromComment.some(isNumberLike)) {
      log.warn(lastComment.row, null, `no header row; took the column names from comment row ${lastComment.row}`);
      header = fromComment;
      headerFromComment = true;
      headerRow = lastComment.row;
    } else {
      log.fatal(headerRow, null, `the first row holds numbers, not column names; add a header such as 'bias [mA],frequency [GHz]'`);
    }
  }
  const quoted = text.indexOf('"', bodyStart) !== -1;
  return {
    file,
    text,
    header,
    headerRow,
    bodyStart,
    bodyRow,
    headerFromComment,
    delimiter,
    newline,
    quoted,
    metadata,
    lineCount: countLines(text, newline),
  };
}

interface ChunkedStringConfig extends Papa.ParseConfig<string[]> {
  chunkSize: number;
  chunk: (res: Papa.ParseResult<string[]>) => void;
}

export type RowHandler = (cells: string[], row: number) => void;

/**
 * Stream data rows (after the header) to `onRow`, skipping blank and '#' rows (the latter feed
 * metadata). Ragged rows are reported here. Returns the number of data rows seen.
 */
export function forEachRow(head: TableHead, log: IssueLog, onRow: RowHandler): number {
  const width = head.header.length;
  let dataRows = 0;
  const handle = (cells: string[], row: number, skipHeader: boolean): void => {
    if (skipHeader) return;
    if (cells.length === 1 && cells[0].trim() === '') return;
    const c0 = cells[0];
    const k0 = c0.charCodeAt(0);
    // '#' rows are comments; trimStart only when the cell starts with white space (keeps the hot path allocation-free).
    if (k0 === 35 || (k0 <= 32 && c0.trimStart().startsWith('#'))) {
      const kv = parseMetaLine(cells.join(head.delimiter));
      if (kv && !head.metadata.has(kv.key)) head.metadata.set(kv.key, { value: kv.value, row });
      return;
    }
    let n = cells.length;
    // A trailing delimiter (empty last field) is a common export quirk, not a missing value.
    if (n === width + 1 && cells[n - 1].trim() === '') n = width;
    dataRows++;
    if (n !== width) {
      const d = head.delimiter === '\t' ? 'tab' : `'${head.delimiter}'`;
      log.error(row, null, `has ${n} field${n === 1 ? '' : 's'} but the header has ${width} (delimiter ${d})`);
      return;
    }
    onRow(cells, row);
  };

  const body = head.text.slice(head.bodyStart);
  let first = !head.headerFromComment;
  if (!head.quoted) {
    // No quotes: one row per line, so rows are counted exactly; papaparse fastMode in 1 MB chunks.
    let row = head.bodyRow - 1;
    // The typings allow `chunk` only for files; papaparse streams strings the same way, synchronously.
    const config: ChunkedStringConfig = {
      delimiter: head.delimiter,
      newline: head.newline,
      fastMode: true,
      chunkSize: 1 << 20,
      chunk: (res: Papa.ParseResult<string[]>) => {
        const data = res.data;
        for (let i = 0; i < data.length; i++) {
          row++;
          handle(data[i], row, first);
          first = false;
        }
      },
    };
    Papa.parse<string[]>(body, config as Papa.ParseConfig<string[]>);
  } else {
    // Quoted fields may span lines: follow papaparse's cursor to keep row numbers right.
    let line = head.bodyRow;
    let prev = 0;
    const newline = body.includes('\r\n') ? '\r\n' : head.newline;
    Papa.parse<string[]>(body, {
      delimiter: head.delimiter,
      newline,
      step: (res) => {
        const row = line;
        for (let i = body.indexOf(newline, prev); i !== -1 && i < res.meta.cursor; i = body.indexOf(newline, i + 1)) line++;
        prev = res.meta.cursor;
        for (const e of res.errors) log.error(row, null, `${e.message.replace(/\.$/, '')} (check the quotes)`);
        handle(res.data, row, first);
        first = false;
      },
    });
  }
  return dataRows;
}

export type CellProblem = 'empty' | 'not_finite' | 'not_number';

/**
 * Strict number from a cell: NaN for empty, 'NaN'/'Inf' and text. The common case (a plain
 * non-zero number) costs one conversion.
 */
export function cellNumber(s: string): number {
  const v = +s;
  if (v === v && v !== 0 && v !== Infinity && v !== -Infinity) return v;
  return cellNumberSlow(s);
}

function cellNumberSlow(s: string): number {
  const t = s.trim();
  if (t === '') return NaN;
  const v = Number(t);
  if (v === 0) return v; // Number('') is 0 too, excluded above
  if (Number.isFinite(v)) return v;
  // Decimal comma (semicolon/tab files from European locales): '6,1' -> 6.1.
  if (/^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/.test(t)) {
    const w = Number(t.replace(',', '.'));
    if (Number.isFinite(w)) return w;
  }
  return NaN;
}

export function describeBadCell(s: string): string {
  const t = s.trim();
  if (t === '') return 'empty cell (a number is expected)';
  if (/^[+-]?(nan|inf|infinity)$/i.test(t) || Number(t) === Infinity || Number(t) === -Infinity) return `'${t}' is not a finite number`;
  return `'${t.length > 40 ? t.slice(0, 40) + '…' : t}' is not a number`;
}

export function metaLookup(meta: Map<string, MetaEntry>, ...keys: string[]): (MetaEntry & { key: string }) | null {
  for (const k of keys) {
    const e = meta.get(k);
    if (e) return { ...e, key: k };
  }
  return null;
}
