#!/usr/bin/env node
// Writes the populations of the invented demo scenarios (run once; the CSVs are committed):
//   node samples/make-demo-data.mjs
// - samples/supplier-invoices-2025.csv: supplier invoices posted to the purchase ledger in 2025 by
//   Brackenmoor Kilnworks Ltd, an invented maker of kiln furniture (3,412 rows).
// - samples/small/manual-journals-2025.csv: manual journal entries of 25,000 or more posted in
//   2025 at its invented sister company Tillwater Glazes Ltd (318 rows).
// - samples/engagement/pay-changes-2025-jan-sep.csv and pay-changes-2025-oct-dec.csv: changes to
//   employees' standing pay data at Brackenmoor Kilnworks Ltd, January to September (the interim
//   part of the engagement demo's roll-forward test) and October to December (1,164 and 412 rows).
// Every name below is invented. The content comes from a fixed xorshift generator, so the same
// script always writes the same bytes. It prints the row counts and amount totals that the demo
// answers use as the ledger figures for the completeness tie-out.
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));

function xorshift(seed) {
  let x = seed >>> 0 || 1;
  return () => {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    return x / 4294967296;
  };
}

const SUPPLIERS = [
  'Fellgate Refractories', 'Oxbow Clay Supply', 'Harl Mineral Co', 'Quenby Freight', 'Marrow Lane Packaging',
  'Ostler Gas Services', 'Pellow Engineering', 'Sallow Pallets', 'Thrimby Tools', 'Wendle Kiln Parts',
  'Cragside Chemicals', 'Dunnock Office Supplies', 'Eskholme Electrical', 'Garrow Haulage', 'Inchmere Security',
  'Ketterby Cleaning', 'Lindow Laboratory Services', 'Nanscawen Minerals', 'Rathmoy Software', 'Umberleigh Water',
];

function day(rnd, start, span) {
  return new Date(start + Math.floor(rnd() * span) * 86_400_000);
}
const iso = (d) => d.toISOString().slice(0, 10);

function money(cents) {
  return `${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, '0')}`;
}

function invoices() {
  const rnd = xorshift(20250117);
  const rows = ['invoice_no,supplier,supplier_ref,invoice_date,posted_on,amount'];
  const y0 = Date.UTC(2025, 0, 1);
  let total = 0n;
  const N = 3412;
  for (let i = 0; i < N; i++) {
    // Invoices numbered in posting order over the year, dated 1 to 20 days before posting.
    const posted = new Date(y0 + Math.floor((i / N) * 364) * 86_400_000);
    const inv = new Date(Math.max(y0 - 20 * 86_400_000, posted.getTime() - (1 + Math.floor(rnd() * 20)) * 86_400_000));
    const sup = SUPPLIERS[Math.floor(rnd() * SUPPLIERS.length)];
    const big = rnd() < 0.08;
    const cents = big ? 1_000_000 + Math.floor(rnd() * 4_000_000) : 4_500 + Math.floor(rnd() * 950_000);
    total += BigInt(cents);
    const ref = `${sup.slice(0, 3).toUpperCase()}-${String(10_000 + Math.floor(rnd() * 89_999))}`;
    rows.push(`PI-${String(250001 + i)},${sup},${ref},${iso(inv)},${iso(posted)},${money(cents)}`);
  }
  writeFileSync(join(here, 'supplier-invoices-2025.csv'), `${rows.join('\n')}\n`);
  return { N, total: `${total / 100n}.${String(total % 100n).padStart(2, '0')}` };
}

const PREPARERS = ['H. Quarrie', 'D. Calderbay', 'S. Achterberg', 'M. Farrowby'];
const ACCOUNTS = ['Accruals', 'Prepayments', 'Stock provision', 'Payroll control', 'Intercompany', 'Fixed asset transfers'];

function journals() {
  const rnd = xorshift(20250303);
  const rows = ['journal_id,posted_on,prepared_by,account_area,amount,description'];
  const N = 318;
  let total = 0n;
  for (let i = 0; i < N; i++) {
    const d = day(rnd, Date.UTC(2025, 0, 2), 362);
    const cents = 2_500_000 + Math.floor(rnd() * 47_500_000);
    total += BigInt(cents);
    const area = ACCOUNTS[Math.floor(rnd() * ACCOUNTS.length)];
    rows.push(`MJ-${String(7001 + i)},${iso(d)},${PREPARERS[Math.floor(rnd() * PREPARERS.length)]},${area},${money(cents)},${area} adjustment`);
  }
  // Posted order, as the ledger lists them.
  const [head, ...body] = rows;
  body.sort((a, b) => a.split(',')[1].localeCompare(b.split(',')[1]) || a.localeCompare(b));
  writeFileSync(join(here, 'small', 'manual-journals-2025.csv'), `${[head, ...body].join('\n')}\n`);
  return { N, total: `${total / 100n}.${String(total % 100n).padStart(2, '0')}` };
}

const CHANGE_TYPES = ['Pay rate', 'Pay rate', 'Pay rate', 'Bank account', 'Allowance', 'Hours', 'Pay grade'];
const PAY_GROUPS = ['Kiln shop', 'Glazing line', 'Dispatch', 'Maintenance', 'Office'];

/** Pay data changes from `start` (UTC ms) over `span` days: numbered and listed in date order. */
function payChanges(file, seed, N, first, start, span) {
  const rnd = xorshift(seed);
  const body = [];
  let total = 0n;
  for (let i = 0; i < N; i++) {
    const d = day(rnd, start, span);
    const cents = 160_000 + Math.floor(rnd() * 420_000);
    total += BigInt(cents);
    const type = CHANGE_TYPES[Math.floor(rnd() * CHANGE_TYPES.length)];
    const group = PAY_GROUPS[Math.floor(rnd() * PAY_GROUPS.length)];
    body.push([iso(d), `E-${String(4101 + Math.floor(rnd() * 380))}`, type, group, money(cents)]);
  }
  body.sort((x, y) => x[0].localeCompare(y[0]) || x[1].localeCompare(y[1]));
  const rows = ['change_id,changed_on,employee_ref,change_type,pay_group,monthly_pay_after', ...body.map((r, i) => `PC-${String(first + i)},${r.join(',')}`)];
  writeFileSync(join(here, 'engagement', file), `${rows.join('\n')}\n`);
  return { N, total: `${total / 100n}.${String(total % 100n).padStart(2, '0')}` };
}

const a = invoices();
const b = journals();
process.stdout.write(`supplier-invoices-2025.csv: ${a.N} rows, total ${a.total}\n`);
process.stdout.write(`small/manual-journals-2025.csv: ${b.N} rows, total ${b.total}\n`);
mkdirSync(join(here, 'engagement'), { recursive: true });
const c = payChanges('pay-changes-2025-jan-sep.csv', 20250930, 1164, 10001, Date.UTC(2025, 0, 1), 273);
const d = payChanges('pay-changes-2025-oct-dec.csv', 20251231, 412, 20001, Date.UTC(2025, 9, 1), 92);
process.stdout.write(`engagement/pay-changes-2025-jan-sep.csv: ${c.N} rows, total ${c.total}\n`);
process.stdout.write(`engagement/pay-changes-2025-oct-dec.csv: ${d.N} rows, total ${d.total}\n`);
