// csv-parse, with each record handed over synchronously together with the physical line it starts on.

import { Parser, type Options } from 'csv-parse';

/** Receives the record's fields (one array per record, owned by the receiver) and its 1-based start line. */
export type RecordSink = (fields: string[], line: number) => void;

/** Longest record csv-parse may buffer; past this an unclosed quote is reported instead of eating memory. */
export const MAX_RECORD_CHARS = 16 * 1024 * 1024;

export function parserOptions(delimiter: string): Options {
  return {
    delimiter,
    bom: true,
    // Cells are trimmed anyway; trimming around quotes also lets `a, "b, c"` parse as two fields.
    trim: true,
    // A stray quote inside an unquoted cell (5'10") is kept as text rather than failing the whole file.
    relax_quotes: true,
    // Ragged rows are reported by us, with the line and the header width.
    relax_column_count: true,
    skip_empty_lines: true,
    // Listed explicitly so files mixing line endings still split on every one of them.
    record_delimiter: ['\r\n', '\n', '\r'],
    max_record_size: MAX_RECORD_CHARS,
  };
}

/**
 * Records are taken in push(), which csv-parse calls synchronously while it parses: at that moment its live
 * `info` describes exactly this record, so no per-record info object has to be built (on_record or `info: true`
 * copy the whole info object for every record, which cost a fifth of the parse time when measured). Nothing is
 * passed on to the readable side, so no record is ever buffered.
 *
 * Line bookkeeping: csv-parse's `info.lines` is the line the record ends on and counts every CR or LF it passes,
 * so a CRLF inside quotes counts twice; `info.empty_lines` counts skipped blank lines. A record starts one line
 * after the previous one ended, plus the blank lines between.
 */
export class RecordParser extends Parser {
  private previousEnd = 0;
  private previousEmpty = 0;
  private drift = 0;
  /** File offset just past the last record handed over, and the line that record ended on. */
  endOffset = 0;
  endLine = 0;

  constructor(
    options: Options,
    private readonly sink: RecordSink,
  ) {
    super(options);
  }

  /** Physical line csv-parse is on, corrected for quoted CRLFs seen so far. */
  get currentLine(): number {
    return this.info.lines - this.drift;
  }

  override push(chunk: unknown, encoding?: BufferEncoding): boolean {
    if (chunk === null) return super.push(null, encoding);
    const fields = chunk as string[];
    const info = this.info;
    const empty = info.empty_lines;
    const start = this.previousEnd + 1 + (empty - this.previousEmpty);
    let end = info.lines - this.drift;
    if (end > start) {
      const doubled = countCrlf(fields);
      this.drift += doubled;
      end -= doubled;
    }
    this.previousEnd = end;
    this.previousEmpty = empty;
    this.endOffset = info.bytes;
    this.endLine = end;
    this.sink(fields, start);
    return true;
  }
}

function countCrlf(fields: readonly string[]): number {
  let count = 0;
  for (const f of fields) {
    let at = f.indexOf('\r\n');
    while (at >= 0) {
      count++;
      at = f.indexOf('\r\n', at + 2);
    }
  }
  return count;
}
