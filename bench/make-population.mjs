#!/usr/bin/env node
// Writes an invented invoice population for the selection benchmark:
//   node bench/make-population.mjs [ROWS] [OUT]
// Defaults: 1,000,000 rows in $TMPDIR/tolrate-bench/invoices-1m.csv (about 47 MB).
// Columns invoice_no,date,customer,amount. The content comes from a fixed xorshift generator, so
// the same ROWS always give the same bytes. Customer names are invented; a few contain a comma and
// are quoted, so the reader's quoted-field path is exercised too. The file is never committed.
import { createWriteStream, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';

export const DEFAULT_ROWS = 1_000_000;
export function defaultPath(rows = DEFAULT_ROWS) {
  return join(tmpdir(), 'tolrate-bench', rows === DEFAULT_ROWS ? 'invoices-1m.csv' : `invoices-${rows}.csv`);
}

const FIRST = ['Alder', 'Birchwood', 'Cobalt', 'Dunmore', 'Elmstead', 'Fernhill', 'Granite', 'Hollin', 'Ivybridge', 'Juniper',
  'Kestrel', 'Larchmont', 'Millbrook', 'Northgate', 'Oakvale', 'Pinecrest', 'Quarry', 'Rowan', 'Saltmarsh', 'Thornbury'];
const LAST = ['Supplies', 'Traders', 'Logistics', 'Foods', 'Fittings', 'Textiles', 'Motors', 'Print', 'Timber', 'Electrical'];
const SUFFIX = ['', ' Ltd', '', ' Co', ''];

function xorshift(seed) {
  let x = seed >>> 0 || 1;
  return () => {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    return x;
  };
}

/** `twice`: every invoice number on two rows (row i has number i mod rows/2), for the duplicate check. */
export async function makePopulation(rows = DEFAULT_ROWS, out = defaultPath(rows), { twice = false } = {}) {
  mkdirSync(dirname(out), { recursive: true });
  const ws = createWriteStream(out);
  const next = xorshift(20240101);
  const day0 = Date.UTC(2024, 0, 1);
  let buf = 'invoice_no,date,customer,amount\n';
  for (let i = 0; i < rows; i++) {
    const r = next();
    const d = new Date(day0 + (Math.floor((i / rows) * 366) % 366) * 86_400_000).toISOString().slice(0, 10);
    let customer = `${FIRST[r % 20]} ${LAST[(r >>> 5) % 10]}${SUFFIX[(r >>> 9) % 5]}`;
    if ((r >>> 12) % 50 === 0) customer = `"${FIRST[r % 20]}, ${LAST[(r >>> 5) % 10]} & Sons"`;
    const cents = 1000 + (next() % 999_000);
    const sign = (r >>> 20) % 40 === 0 ? '-' : '';
    const amount = `${sign}${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, '0')}`;
    buf += `INV-${String(1_000_001 + (twice ? i % Math.ceil(rows / 2) : i))},${d},${customer},${amount}\n`;
    if (buf.length > 1 << 20) {
      if (!ws.write(buf)) await new Promise((res) => ws.once('drain', res));
      buf = '';
    }
  }
  ws.write(buf);
  await new Promise((res, rej) => ws.end((e) => (e ? rej(e) : res())));
  return out;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const rows = process.argv[2] ? Number(process.argv[2]) : DEFAULT_ROWS;
  const out = process.argv[3] ?? defaultPath(rows);
  const p = await makePopulation(rows, out);
  process.stdout.write(`${p}\n`);
}
