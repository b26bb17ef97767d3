/**
 * The one CSV reader of Trimout: the unit import (server), the Units import screen's header and the
 * room schedule (Spaces screen, its server checks) all read files with it, so a file the screen
 * shows is read the same way by the server. Built on csv-parse's browser build (plain JavaScript,
 * bundled by Metro for the web; jest maps it to the package's CommonJS build of the same version).
 *
 * Files come as spreadsheets save them: a byte-order mark or none, lines ended CRLF, LF or CR (even
 * mixed), cells separated by commas, semicolons (spreadsheets set to a decimal-comma locale) or
 * tabs (copied cells), quoted the RFC 4180 way. Cells are trimmed; rows with no text in any cell are
 * left out; a row may have more or fewer cells than the header; a quote inside an unquoted cell
 * (`9' 6"`) is a plain character.
 */
import { parse, type CsvError, type InfoRecord, type Options } from 'csv-parse/browser/esm/sync';

export type CsvDelimiter = ',' | ';' | '\t';
/** The separators a file may use, in the order a tie is decided (the earlier wins). */
export const CSV_DELIMITERS: readonly CsvDelimiter[] = [',', ';', '\t'];

/** One record of the file: its cells and the line it starts on (1-based, the header being line 1). */
export interface CsvRecord {
  cells: string[];
  line: number;
}

/**
 * Why a file cannot be read, and the line: where the quote that is never closed opens, or where a
 * quoted cell goes on after its closing quote.
 */
export interface CsvProblem {
  kind: 'quote_not_closed' | 'malformed';
  line: number;
}

export interface CsvText {
  delimiter: CsvDelimiter;
  /** The records read (up to the problem, when there is one). */
  records: CsvRecord[];
  problem?: CsvProblem;
}

const COMMON: Options = {
  bom: true,
  // CRLF, LF and CR alike, even mixed in one file (csv-parse's own guess takes the first it meets).
  record_delimiter: ['\r\n', '\n', '\r'],
  trim: true,
  relax_quotes: true,
  relax_column_count: true,
  skip_empty_lines: true,
  skip_records_with_empty_values: true,
};

/** The start of a text that holds its header row (a header longer than this is not a schedule's). */
const HEAD_CHARS = 64 * 1024;

/**
 * The separator of a CSV text: of comma, semicolon and tab, the one that splits the first record
 * into the most cells (csv-parse reading it with each; a separator that leaves its quoting broken
 * does not count). A comma when none splits it.
 */
export function csvDelimiter(text: string): CsvDelimiter {
  // csv-parse reads the whole input into bytes before it stops at the first record: give it the start.
  const head = text.slice(0, HEAD_CHARS);
  let best: CsvDelimiter = ',';
  let most = 1;
  for (const delimiter of CSV_DELIMITERS) {
    try {
      const [first] = parse(head, { ...COMMON, delimiter, to: 1 }) as string[][];
      const cells = first?.length ?? 0;
      if (cells > most) {
        best = delimiter;
        most = cells;
      }
    } catch {
      // Broken quoting with this separator: not the file's separator (or the file cannot be read at all).
    }
  }
  return best;
}

/** Line numbers of positions in `text`, asked in increasing order: CRLF, LF and CR each end one line. */
function lineCounter(text: string): (position: number) => number {
  let at = 0;
  let line = 1;
  return (position) => {
    for (; at < position && at < text.length; at++) {
      const ch = text[at];
      if (ch === '\r' || (ch === '\n' && text[at - 1] !== '\r')) line++;
    }
    return line;
  };
}

/**
 * Positions in `text` of UTF-8 byte counts, asked in increasing order (csv-parse counts the bytes it
 * has read; a string is read as its UTF-8 encoding, which writes a lone surrogate as 3 bytes too).
 */
function byteToChar(text: string): (bytes: number) => number {
  let at = 0;
  let counted = 0;
  return (bytes) => {
    while (counted < bytes && at < text.length) {
      const code = text.codePointAt(at)!;
      counted += code < 0x80 ? 1 : code < 0x800 ? 2 : code < 0x10000 ? 3 : 4;
      at += code >= 0x10000 ? 2 : 1;
    }
    return at;
  };
}

const LINE_BREAKS = /\r\n|\r|\n/g;
const breaksIn = (cells: readonly string[]) => cells.reduce((n, c) => n + (c.match(LINE_BREAKS)?.length ?? 0), 0);

/**
 * Where the quote that is never closed opens, searched from `from` to the end: inside a quoted cell
 * quotes come only doubled (RFC 4180 section 2, rule 7), so it is the first quote of the last run of
 * an odd number of them.
 */
function openingQuote(text: string, from: number): number {
  let end = text.length;
  while (end > from) {
    const last = text.lastIndexOf('"', end - 1);
    if (last < from) return from;
    let first = last;
    while (first > from && text[first - 1] === '"') first--;
    if ((last - first + 1) % 2 === 1) return first;
    end = first;
  }
  return from;
}

/**
 * The records of a CSV text, each with the line it starts on. The line comes from csv-parse's record
 * info: `info.bytes` says where the record ends, and its cells hold every line break inside it (only
 * quoted cells can). `info.lines` is not used: csv-parse 7 counts a CRLF inside a quoted cell as two
 * lines.
 */
export function readCsv(text: string, delimiter: CsvDelimiter = csvDelimiter(text)): CsvText {
  const records: CsvRecord[] = [];
  const lineAt = lineCounter(text);
  const charAt = byteToChar(text);
  let end = 0;
  try {
    parse(text, {
      ...COMMON,
      delimiter,
      info: true,
      // With info, each record comes as { record, info } (csv-parse's types say string[]).
      on_record: ((entry: { record: string[]; info: InfoRecord }) => {
        end = charAt(entry.info.bytes);
        const ended = text[end - 1] === '\n' || text[end - 1] === '\r';
        records.push({ cells: entry.record, line: lineAt(end) - (ended ? 1 : 0) - breaksIn(entry.record) });
        return null;
      }) as unknown as Options['on_record'],
    });
  } catch (err) {
    const code = (err as Partial<CsvError>).code;
    if (typeof code !== 'string' || !(code.startsWith('CSV_') || code.startsWith('INVALID_'))) throw err;
    if (code === 'CSV_QUOTE_NOT_CLOSED') {
      return { delimiter, records, problem: { kind: 'quote_not_closed', line: lineAt(openingQuote(text, end)) } };
    }
    // The record that cannot be read starts after the last one read and any blank rows.
    const d = delimiter === '\t' ? '\\t' : delimiter;
    const blank = new RegExp(`^(?:(?:[^\\S\\r\\n]|${d})*(?:\\r\\n|\\r|\\n))*`).exec(text.slice(end))?.[0].length ?? 0;
    return { delimiter, records, problem: { kind: 'malformed', line: lineAt(end + blank) } };
  }
  return { delimiter, records };
}

/** The cells of the first record (the header row), or none for an empty text. */
export function readCsvHeader(text: string): string[] {
  try {
    const head = text.slice(0, HEAD_CHARS);
    const [first] = parse(head, { ...COMMON, delimiter: csvDelimiter(head), to: 1 }) as string[][];
    return first ?? [];
  } catch {
    return readCsv(text).records[0]?.cells ?? [];
  }
}

/** A problem said the way the import screens say it. */
export function csvProblemMessage(problem: CsvProblem): string {
  return problem.kind === 'quote_not_closed'
    ? `A quoted cell opened on line ${problem.line} is never closed.`
    : `The row on line ${problem.line} has text after a quoted cell's closing quote: quote the whole cell, doubling any quote inside it.`;
}
