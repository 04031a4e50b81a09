import { isUtf8 } from 'node:buffer';
import { FileInputError } from '../errors.js';

/**
 * A streaming CSV tokenizer that works on bytes and never builds row objects.
 *
 * Rules (RFC 4180, relaxed the way spreadsheet exports need):
 * - fields are separated by one delimiter byte (`,` `;` TAB `|` ...);
 * - a field that starts with `"` is quoted: it runs to the next lone `"`, a doubled `""` inside
 *   stands for one `"`, and it may contain delimiters and line breaks;
 * - text between a closing quote and the next delimiter or line break is kept (the field is then
 *   taken as written) and the record is marked with a problem;
 * - a `"` inside an unquoted field is kept as an ordinary character (e.g. `12" pipe`);
 * - records end at LF, CRLF or a lone CR; each of these counts as one line for line numbers;
 * - a UTF-8 byte order mark at the start is skipped (the caller still hashes it).
 *
 * The consumer gets the tokenizer itself for each record and reads the field byte ranges from
 * `starts`/`ends`/`kinds` (valid only during the callback). kinds: 0 unquoted, 1 quoted,
 * 2 quoted with doubled quotes to undo, 3 malformed (raw text incl. quotes).
 */
export const QUOTE = 0x22;
const LF = 0x0a;
const CR = 0x0d;

/** A record longer than this is almost always a quote that was never closed. */
export const MAX_RECORD_BYTES = 16 * 1024 * 1024;

export type RecordHandler = (t: CsvTokenizer) => boolean | void;

export class CsvTokenizer {
  readonly delimiter: number;
  /** The bytes of the current record (valid during the callback only). */
  buf: Buffer = Buffer.alloc(0);
  starts = new Int32Array(64);
  ends = new Int32Array(64);
  kinds = new Uint8Array(64);
  /** Number of fields in the current record. */
  count = 0;
  /** 1-based line (as a text editor counts) where the current record starts. */
  line = 1;
  /** Problem with the quoting of the current record, if any. */
  problem: string | undefined;
  /** Bytes handed to the tokenizer so far (including the BOM). */
  bytesIn = 0;
  /** True when the input began with a UTF-8 byte order mark. */
  hadBom = false;
  /** First line holding bytes that are not valid UTF-8, if any. */
  firstBadUtf8Line: number | undefined;
  /** Number of lines that hold bytes that are not valid UTF-8. */
  badUtf8Records = 0;

  private rest: Buffer | null = null;
  private started: boolean;
  private stopped = false;
  private nextLine: number;
  private recLines = 0;
  private readonly checkUtf8: boolean;
  /** Absolute byte offset of buf[0], and where the current record starts in buf. */
  private base = 0;
  private recStart = 0;

  constructor(delimiter: number, opts: { checkUtf8?: boolean; startLine?: number; startOffset?: number } = {}) {
    if (delimiter === QUOTE || delimiter === LF || delimiter === CR) {
      throw new FileInputError('', 'The delimiter cannot be a quote or a line break.');
    }
    this.delimiter = delimiter;
    this.checkUtf8 = opts.checkUtf8 ?? true;
    this.nextLine = opts.startLine ?? 1;
    // Starting mid-file (at a known record start): no byte order mark to look for.
    this.started = opts.startOffset !== undefined && opts.startOffset > 0;
    this.bytesIn = opts.startOffset ?? 0;
  }

  /** Whether a handler asked to stop. */
  get isStopped(): boolean {
    return this.stopped;
  }

  /** Absolute byte offset in the input where the current record starts. */
  get offset(): number {
    return this.base + this.recStart;
  }

  /** Feed the next chunk; calls `onRecord` for every complete record. Returns false once stopped. */
  push(chunk: Buffer, onRecord: RecordHandler): boolean {
    return this.pushRange(chunk, 0, chunk.length, onRecord);
  }

  /**
   * Feed buf[start, end). The bytes of buf before `start` are free for the tokenizer to use: the
   * unfinished record of the previous chunk is copied there instead of joining two buffers.
   */
  pushRange(buf: Buffer, start: number, end: number, onRecord: RecordHandler): boolean {
    if (this.stopped) return false;
    const n = end - start;
    const abs = this.bytesIn;
    this.bytesIn += n;
    const rest = this.rest;
    this.rest = null;
    if (rest && rest.length) {
      if (rest.length <= start) {
        rest.copy(buf, start - rest.length);
        return this.run(buf, start - rest.length, end, abs - rest.length, false, onRecord);
      }
      const joined = Buffer.concat([rest, buf.subarray(start, end)]);
      return this.run(joined, 0, joined.length, abs - rest.length, false, onRecord);
    }
    return this.run(buf, start, end, abs, false, onRecord);
  }

  /** Signal the end of input; emits the last record if the file does not end with a line break. */
  end(onRecord: RecordHandler): void {
    if (this.stopped) return;
    const rest = this.rest ?? Buffer.alloc(0);
    this.rest = null;
    this.run(rest, 0, rest.length, this.bytesIn - rest.length, true, onRecord);
  }

  private grow(n: number): void {
    const size = Math.max(n + 1, this.starts.length * 2);
    const s = new Int32Array(size);
    s.set(this.starts);
    const e = new Int32Array(size);
    e.set(this.ends);
    const k = new Uint8Array(size);
    k.set(this.kinds);
    this.starts = s;
    this.ends = e;
    this.kinds = k;
  }

  /** Tokenize d[p, end); `abs` is the absolute offset of d[p]. */
  private run(d: Buffer, p: number, end: number, abs: number, final: boolean, onRecord: RecordHandler): boolean {
    this.base = abs - p;
    if (!this.started) {
      if (end - p < 3 && !final) {
        this.rest = Buffer.from(d.subarray(p, end));
        return true;
      }
      this.started = true;
      if (end - p >= 3 && d[p] === 0xef && d[p + 1] === 0xbb && d[p + 2] === 0xbf) {
        this.hadBom = true;
        p += 3;
      }
    }
    this.buf = d;
    const from = p;
    const lineAtFrom = this.nextLine;
    let stop = false;
    while (p < end) {
      const next = this.parseRecord(d, p, end, final);
      if (next < 0) break;
      this.recStart = p;
      this.line = this.nextLine;
      this.nextLine += this.recLines;
      p = next;
      if (onRecord(this) === false) {
        stop = true;
        break;
      }
    }
    if (this.checkUtf8 && p > from && !isUtf8(d.subarray(from, p))) this.locateBadUtf8(d, from, p, lineAtFrom);
    if (stop) {
      this.stopped = true;
      return false;
    }
    if (p < end) {
      if (final) throw new Error('internal: tokenizer left bytes at end of input');
      if (end - p > MAX_RECORD_BYTES) {
        throw new FileInputError(
          '',
          `Line ${this.nextLine}: one record runs for more than ${MAX_RECORD_BYTES / 1048576} MiB. ` +
            'This is almost always a quote (") that is never closed. Fix the file and try again.',
        );
      }
      // Copy: the caller may reuse the chunk's memory for the next read.
      this.rest = Buffer.from(d.subarray(p, end));
    }
    return true;
  }

  /** Count the lines that are not valid UTF-8 between a and b (rare path, after a failed check). */
  private locateBadUtf8(d: Buffer, a: number, b: number, line: number): void {
    let s = a;
    let ln = line;
    for (let j = a; j <= b; j++) {
      const c = j < b ? d[j] : LF;
      if (c === LF || c === CR) {
        if (j > s && !isUtf8(d.subarray(s, j))) {
          this.badUtf8Records++;
          if (this.firstBadUtf8Line === undefined) this.firstBadUtf8Line = ln;
        }
        if (c === CR && j + 1 < b && d[j + 1] === LF) j++;
        ln++;
        s = j + 1;
      }
    }
  }

  private countBreaks(d: Buffer, a: number, b: number): number {
    let n = 0;
    for (let j = a; j < b; j++) {
      const c = d[j];
      if (c === LF) n++;
      else if (c === CR) {
        n++;
        if (j + 1 < b && d[j + 1] === LF) j++;
      }
    }
    return n;
  }

  /** Parse one record from p; returns the start of the next record, or -1 if more input is needed. */
  private parseRecord(d: Buffer, p: number, end: number, final: boolean): number {
    const delim = this.delimiter;
    let n = 0;
    let lines = 0;
    this.problem = undefined;
    for (;;) {
      if (n >= this.starts.length) this.grow(n);
      let c = p < end ? d[p]! : -1;
      if (c === QUOTE) {
        const open = p;
        let q = p + 1;
        let esc = false;
        let k: number;
        for (;;) {
          k = d.indexOf(QUOTE, q);
          if (k < 0) {
            if (!final) return -1;
            // Quote never closed: the field runs to the end of the input.
            this.starts[n] = open + 1;
            this.ends[n] = end;
            this.kinds[n] = esc ? 2 : 1;
            n++;
            lines += this.countBreaks(d, open + 1, end);
            this.problem = 'a quote (") is opened and never closed, so the rest of the file was read as one field';
            this.count = n;
            this.recLines = lines;
            return end;
          }
          if (k + 1 < end) {
            if (d[k + 1] === QUOTE) {
              esc = true;
              q = k + 2;
              continue;
            }
          } else if (!final) return -1;
          break;
        }
        lines += this.countBreaks(d, open + 1, k);
        this.starts[n] = open + 1;
        this.ends[n] = k;
        this.kinds[n] = esc ? 2 : 1;
        p = k + 1;
        c = p < end ? d[p]! : -1;
        if (c !== delim && c !== LF && c !== CR && c !== -1) {
          let i = p;
          while (i < end) {
            const b = d[i]!;
            if (b === delim || b === LF || b === CR) break;
            i++;
          }
          if (i === end && !final) return -1;
          this.problem ??= 'text follows a closing quote in a field';
          this.starts[n] = open;
          this.ends[n] = i;
          this.kinds[n] = 3;
          p = i;
          c = p < end ? d[p]! : -1;
        }
        n++;
      } else {
        let i = p;
        while (i < end) {
          const b = d[i]!;
          if (b === delim || b === LF || b === CR) break;
          i++;
        }
        if (i === end && !final) return -1;
        this.starts[n] = p;
        this.ends[n] = i;
        this.kinds[n] = 0;
        n++;
        p = i;
        c = p < end ? d[p]! : -1;
      }
      if (c === delim) {
        p++;
        continue;
      }
      if (c === CR) {
        if (p + 1 < end) p += d[p + 1] === LF ? 2 : 1;
        else if (final) p += 1;
        else return -1;
        lines++;
      } else if (c === LF) {
        p += 1;
        lines++;
      }
      this.count = n;
      this.recLines = lines;
      return p;
    }
  }

  /** True when the current record is an empty line. */
  isBlank(): boolean {
    return this.count === 1 && this.kinds[0] === 0 && this.starts[0] === this.ends[0];
  }

  /** The text of field i of the current record (as written, not trimmed). */
  field(i: number): string {
    if (i >= this.count) return '';
    const s = this.starts[i]!;
    const e = this.ends[i]!;
    const k = this.kinds[i]!;
    const text = this.buf.toString('utf8', s, e);
    return k === 2 ? text.replace(/""/g, '"') : text;
  }
}
