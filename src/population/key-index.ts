/**
 * Duplicate keys in flat memory.
 *
 * Pass 1 (KeyHashes): each non-blank key becomes a 64-bit hash (two 32-bit multiply-xor lanes);
 * its top 8 bits pick one of 256 buckets and the next 48 bits are kept, in chunks of typed arrays
 * (6 bytes a row: 60 MB for 10 million keys, no copying as it grows). At the end each bucket is
 * sorted on its own (a few tens of thousands of values) and a value held twice is a candidate.
 * A Set of 10 million key strings would take about 600 MB; a Map with the rows of each key, as
 * this project had before, took 2.6 GiB for 10 million rows with every key twice.
 *
 * Candidates are only candidates: two different keys can share 56 hash bits (about 7 chances in
 * 10,000 among 10 million keys). So the confirming pass (DuplicateCollector) compares the keys
 * themselves, byte for byte: the keys whose hash is a candidate are kept in one byte arena with
 * a typed-array hash table over it, each with its count and first row. When those keys would
 * take more than a memory budget, the candidates are split by hash into parts and the file is
 * read once per part, so memory stays bounded whatever the number of repeated keys. Only the
 * first examples (by first row) keep their row numbers. Without candidates (the usual case)
 * there is no confirming pass at all.
 */

/** The hash of the last call to hashBytes/hashString, as two unsigned 32-bit halves. */
export const H = { hi: 0, lo: 0 };

/** 64-bit hash of bytes s..e into H. */
export function hashBytes(b: Uint8Array, s: number, e: number): void {
  let h1 = 0x811c9dc5 | 0;
  let h2 = 0x9747b28c | 0;
  for (let i = s; i < e; i++) {
    const c = b[i]!;
    h1 = Math.imul(h1 ^ c, 0x01000193);
    h2 = Math.imul(h2 ^ c, 0x5bd1e995);
    h2 ^= h2 >>> 15;
  }
  h1 ^= e - s;
  h1 ^= h1 >>> 16;
  h1 = Math.imul(h1, 0x85ebca6b);
  h1 ^= h1 >>> 13;
  h1 = Math.imul(h1, 0xc2b2ae35);
  h1 ^= h1 >>> 16;
  h2 ^= h2 >>> 16;
  h2 = Math.imul(h2, 0x7feb352d);
  h2 ^= h2 >>> 15;
  h2 = Math.imul(h2, 0x846ca68b);
  h2 ^= h2 >>> 16;
  // Mix the lanes so that every output bit depends on both.
  H.hi = (h1 ^ Math.imul(h2, 0x9e3779b1)) >>> 0;
  H.lo = h2 >>> 0;
}

let scratch = Buffer.allocUnsafe(1024);

/** A string's UTF-8 bytes in a scratch buffer (valid until the next call): [buffer, length]. */
export function utf8Of(s: string): [Buffer, number] {
  if (s.length * 3 > scratch.length) scratch = Buffer.allocUnsafe(s.length * 3);
  return [scratch, scratch.write(s, 0, 'utf8')];
}

/** The same hash over a string's UTF-8 bytes, into H. */
export function hashString(s: string): void {
  const [b, n] = utf8Of(s);
  hashBytes(b, 0, n);
}

const BUCKETS = 256;
/**
 * A bucket's first chunk holds SMALL hashes, the next ones CHUNK. A big chunk is mapped by the
 * allocator on its own: its pages count in the process's memory only once written, and they go
 * back to the system when it is freed (small blocks stay in the heap and keep counting).
 */
const SMALL = 4096;
const CHUNK = 65536;
/** 2^16, to put 32 + 16 bits in one exact double. */
const P16 = 65536;

/** The hashes of candidate keys: per bucket, sorted 48-bit values. */
export class Candidates {
  constructor(
    private readonly buckets: Float64Array[],
    readonly size: number,
  ) {}

  /** Whether the hash in H is a candidate. */
  hasCurrent(): boolean {
    const a = this.buckets[H.hi >>> 24]!;
    if (a.length === 0) return false;
    const v = H.lo * P16 + (H.hi & 0xffff);
    let lo = 0;
    let hi = a.length - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >>> 1;
      const m = a[mid]!;
      if (m === v) return true;
      if (m < v) lo = mid + 1;
      else hi = mid - 1;
    }
    return false;
  }
}

/** Pass 1: the hashes of every key, 6 bytes each. */
export class KeyHashes {
  private los: Uint32Array[][] = Array.from({ length: BUCKETS }, () => []);
  private his: Uint16Array[][] = Array.from({ length: BUCKETS }, () => []);
  private fill = new Int32Array(BUCKETS);
  private cap = new Int32Array(BUCKETS);
  private n = 0;
  /** Total bytes of the keys hashed (for the confirming pass's budget). */
  keyBytes = 0;

  /** Add the hash in H, of a key of `len` bytes. */
  addCurrent(len: number): void {
    const b = H.hi >>> 24;
    let f = this.fill[b]!;
    if (f === this.cap[b]) {
      const size = this.los[b]!.length === 0 ? SMALL : CHUNK;
      this.los[b]!.push(new Uint32Array(size));
      this.his[b]!.push(new Uint16Array(size));
      this.cap[b] = size;
      f = 0;
    }
    const los = this.los[b]!;
    los[los.length - 1]![f] = H.lo;
    const his = this.his[b]!;
    his[his.length - 1]![f] = H.hi & 0xffff;
    this.fill[b] = f + 1;
    this.n++;
    this.keyBytes += len;
  }

  get size(): number {
    return this.n;
  }

  /**
   * Hashes held more than once; frees the table. Each bucket (a few tens of thousands of
   * values) goes through an open-addressing table of its own that fits in the processor's cache:
   * measured on 10 million keys, a third of the time of sorting each bucket.
   */
  candidates(): Candidates {
    const out: Float64Array[] = [];
    let total = 0;
    let table = new Float64Array(0);
    let marks = new Uint8Array(0);
    for (let b = 0; b < BUCKETS; b++) {
      const los = this.los[b]!;
      const his = this.his[b]!;
      let count = los.length ? this.fill[b]! : 0;
      for (let c = 0; c < los.length - 1; c++) count += los[c]!.length;
      let size = 16;
      while (size < count * 2) size *= 2;
      if (table.length < size) {
        table = new Float64Array(size);
        marks = new Uint8Array(size);
      }
      const mask = size - 1;
      table.fill(-1, 0, size);
      marks.fill(0, 0, size);
      let dups = 0;
      for (let c = 0; c < los.length; c++) {
        const l = los[c]!;
        const h = his[c]!;
        const m = c === los.length - 1 ? this.fill[b]! : l.length;
        for (let i = 0; i < m; i++) {
          const lo = l[i]!;
          const v = lo * P16 + h[i]!;
          let k = (lo ^ (lo >>> 16)) & mask;
          for (;;) {
            const t = table[k]!;
            if (t === -1) {
              table[k] = v;
              break;
            }
            if (t === v) {
              if (marks[k] === 0) {
                marks[k] = 1;
                dups++;
              }
              break;
            }
            k = (k + 1) & mask;
          }
        }
      }
      this.los[b] = [];
      this.his[b] = [];
      const d = new Float64Array(dups);
      let j = 0;
      if (dups > 0) for (let k = 0; k < size; k++) if (marks[k] === 1) d[j++] = table[k]!;
      d.sort();
      out.push(d);
      total += dups;
    }
    this.n = 0;
    return new Candidates(out, total);
  }
}

export interface DuplicateExample {
  key: string;
  occurrences: number;
  rows: number[];
}

export interface DuplicateResult {
  /** Keys held by more than one row. */
  count: number;
  /** Rows holding those keys. */
  rows: number;
  /** The first of them by first row, each with its first rows. */
  examples: DuplicateExample[];
}

/** Memory the confirming pass may use for the candidate keys, per reading of the file. */
export const CONFIRM_BUDGET_BYTES = 32 * 1024 * 1024;
/** Bytes a candidate key costs in the confirming pass besides its own bytes. */
const PER_KEY = 36;

/** How many readings of the file the confirming pass needs for these candidates. */
export function confirmParts(c: Candidates, hashes: { keyBytes: number; size: number }, budget = CONFIRM_BUDGET_BYTES): number {
  if (c.size === 0) return 0;
  const avg = hashes.size > 0 ? hashes.keyBytes / hashes.size : 16;
  return Math.max(1, Math.ceil((c.size * (avg + PER_KEY)) / budget));
}

/**
 * The confirming pass for one part of the candidates (those with H.lo % parts === part): the
 * exact keys, their counts and first rows, and the first examples with their rows.
 */
export class DuplicateCollector {
  private arena = Buffer.allocUnsafe(1 << 16);
  private used = 0;
  private start: Uint32Array;
  private len: Uint32Array;
  private count: Uint32Array;
  private first: Float64Array;
  private slots: Int32Array;
  private groups = 0;
  /** The examples so far: up to `examples` groups with the smallest first rows. */
  private ex: Array<{ g: number; rows: number[] }> = [];

  constructor(
    readonly candidates: Candidates,
    public part = 0,
    readonly parts = 1,
    private readonly examples = 10,
    private readonly rowsPerExample = 5,
  ) {
    const expect = Math.max(16, Math.ceil((candidates.size / parts) * 1.2));
    this.start = new Uint32Array(expect);
    this.len = new Uint32Array(expect);
    this.count = new Uint32Array(expect);
    this.first = new Float64Array(expect);
    let s = 16;
    while (s < expect * 2) s *= 2;
    this.slots = new Int32Array(s);
  }

  /** Start on another part, keeping the memory. */
  reset(part: number): void {
    this.part = part;
    this.used = 0;
    this.groups = 0;
    this.slots.fill(0);
    this.ex = [];
  }

  /** A key of bytes b[s, e) (hashed into H by the caller) on `row`. */
  offerCurrent(b: Uint8Array, s: number, e: number, row: number): void {
    if (this.parts > 1 && H.lo % this.parts !== this.part) return;
    if (!this.candidates.hasCurrent()) return;
    const n = e - s;
    const mask = this.slots.length - 1;
    let i = (H.lo ^ (H.hi >>> 7)) & mask;
    for (;;) {
      const g1 = this.slots[i]!;
      if (g1 === 0) break;
      const g = g1 - 1;
      if (this.len[g] === n && this.same(g, b, s, n)) {
        this.count[g]!++;
        this.seen(g, row);
        return;
      }
      i = (i + 1) & mask;
    }
    // A new key.
    if (this.groups === this.start.length) this.growGroups();
    if ((this.groups + 1) * 2 > this.slots.length) {
      this.growSlots();
      this.offerCurrent(b, s, e, row);
      return;
    }
    if (this.used + n > this.arena.length) {
      const next = Buffer.allocUnsafe(Math.max(this.arena.length * 2, this.used + n));
      this.arena.copy(next, 0, 0, this.used);
      this.arena = next;
    }
    for (let k = 0; k < n; k++) this.arena[this.used + k] = b[s + k]!;
    const g = this.groups++;
    this.start[g] = this.used;
    this.len[g] = n;
    this.count[g] = 1;
    this.first[g] = row;
    this.used += n;
    this.slots[i] = g + 1;
  }

  private same(g: number, b: Uint8Array, s: number, n: number): boolean {
    const a = this.arena;
    const at = this.start[g]!;
    for (let k = 0; k < n; k++) if (a[at + k] !== b[s + k]) return false;
    return true;
  }

  private growGroups(): void {
    const size = this.start.length * 2;
    const grow32 = (x: Uint32Array) => {
      const y = new Uint32Array(size);
      y.set(x);
      return y;
    };
    this.start = grow32(this.start);
    this.len = grow32(this.len);
    this.count = grow32(this.count);
    const f = new Float64Array(size);
    f.set(this.first);
    this.first = f;
  }

  private growSlots(): void {
    const slots = new Int32Array(this.slots.length * 2);
    const mask = slots.length - 1;
    for (let g = 0; g < this.groups; g++) {
      hashBytes(this.arena, this.start[g]!, this.start[g]! + this.len[g]!);
      let i = (H.lo ^ (H.hi >>> 7)) & mask;
      while (slots[i] !== 0) i = (i + 1) & mask;
      slots[i] = g + 1;
    }
    this.slots = slots;
  }

  /** Another row of group g. */
  private seen(g: number, row: number): void {
    const ex = this.ex;
    for (const e of ex) {
      if (e.g === g) {
        if (e.rows.length < this.rowsPerExample) e.rows.push(row);
        return;
      }
    }
    if (this.count[g] !== 2) return;
    // Just confirmed: an example if its first row is among the smallest so far.
    const f = this.first[g]!;
    if (ex.length >= this.examples && f > this.first[ex[ex.length - 1]!.g]!) return;
    let at = ex.length;
    while (at > 0 && this.first[ex[at - 1]!.g]! > f) at--;
    ex.splice(at, 0, { g, rows: this.rowsPerExample >= 2 ? [f, row] : [f] });
    if (ex.length > this.examples) ex.pop();
  }

  result(): DuplicateResult {
    let count = 0;
    let rows = 0;
    for (let g = 0; g < this.groups; g++) {
      const c = this.count[g]!;
      if (c >= 2) {
        count++;
        rows += c;
      }
    }
    const examples = this.ex.map((e) => ({
      key: this.arena.toString('utf8', this.start[e.g]!, this.start[e.g]! + this.len[e.g]!),
      occurrences: this.count[e.g]!,
      rows: e.rows,
    }));
    return { count, rows, examples };
  }
}

/** The results of the parts of a confirming pass, as one. */
export function mergeDuplicates(parts: DuplicateResult[], examples = 10): DuplicateResult {
  const all = parts.flatMap((p) => p.examples).sort((a, b) => a.rows[0]! - b.rows[0]!);
  return {
    count: parts.reduce((s, p) => s + p.count, 0),
    rows: parts.reduce((s, p) => s + p.rows, 0),
    examples: all.slice(0, examples),
  };
}
