/**
 * Compact duplicate-key detection. Instead of a Set of a million strings, each non-blank key is
 * reduced to a 53-bit hash kept in a Float64Array (8 bytes a row). A hash seen twice is only a candidate,
 * because different keys can share a hash (about 1 chance in 10^4 per million keys). When
 * there are candidates the caller reads the file once more and compares the actual keys of those
 * rows, so the duplicate report is exact. Without duplicates (the usual case) there is no extra pass.
 */

/** 53-bit hash of bytes s..e (two 32-bit multiply-xor lanes, finalised), as an exact double. */
export function hashBytes(b: Uint8Array, s: number, e: number): number {
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
  return (h1 >>> 0) * 2097152 + (h2 >>> 11);
}

/** The same hash over a string's UTF-8 bytes. */
let scratch = Buffer.allocUnsafe(1024);
export function hashString(s: string): number {
  if (s.length * 3 > scratch.length) scratch = Buffer.allocUnsafe(s.length * 3);
  const n = scratch.write(s, 0, 'utf8');
  return hashBytes(scratch, 0, n);
}

export class KeyHashes {
  private data = new Float64Array(1 << 16);
  private n = 0;
  add(h: number): void {
    if (this.n === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.n++] = h;
  }
  get size(): number {
    return this.n;
  }
  /**
   * Hashes held more than once (candidates for duplicate keys); frees the table. A counting sort
   * on the top 16 bits puts equal hashes in the same small bucket, each bucket is then checked by
   * an insertion sort: about a third of the time of a full sort of a million doubles.
   */
  candidates(): Set<number> {
    const n = this.n;
    const a = this.data;
    const out = new Set<number>();
    const B = 1 << 16;
    const counts = new Int32Array(B + 1);
    for (let i = 0; i < n; i++) counts[(a[i]! / 137438953472) >>> 0]!++;
    for (let j = 0, sum = 0; j <= B; j++) {
      const c = counts[j]!;
      counts[j] = sum;
      sum += c;
    }
    const starts = counts.slice();
    const sorted = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const v = a[i]!;
      sorted[counts[(v / 137438953472) >>> 0]!++] = v;
    }
    this.data = new Float64Array(0);
    this.n = 0;
    for (let j = 0; j < B; j++) {
      const lo = starts[j]!;
      const hi = starts[j + 1]!;
      for (let i = lo + 1; i < hi; i++) {
        const v = sorted[i]!;
        let k = i - 1;
        while (k >= lo && sorted[k]! > v) {
          sorted[k + 1] = sorted[k]!;
          k--;
        }
        sorted[k + 1] = v;
        if (k >= lo && sorted[k] === v) out.add(v);
      }
    }
    return out;
  }
}
