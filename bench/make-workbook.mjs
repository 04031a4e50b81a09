#!/usr/bin/env node
// Writes an invented invoice population as an XLSX workbook for the XLSX benchmark:
//   node bench/make-workbook.mjs ROWS OUT
// Columns Invoice no (shared strings, unique), Date (a number with a date format), Customer
// (shared strings, 200 names), Amount (a number), as a spreadsheet program saves them: one
// sheet, shared strings, a styles part. The content comes from a fixed xorshift generator, so
// the same ROWS always give the same bytes. The zip is written with node's zlib (deflate) and
// zlib.crc32, streaming, so a million rows never sit in memory. Never committed.
import { createWriteStream } from 'node:fs';
import { crc32, createDeflateRaw } from 'node:zlib';

const NS = 'http://schemas.openxmlformats.org/spreadsheetml/2006/main';
const RNS = 'http://schemas.openxmlformats.org/officeDocument/2006/relationships';
const PNS = 'http://schemas.openxmlformats.org/package/2006/relationships';
const FIRST = ['Alder', 'Birchwood', 'Cobalt', 'Dunmore', 'Elmstead', 'Fernhill', 'Granite', 'Hollin', 'Ivybridge', 'Juniper',
  'Kestrel', 'Larchmont', 'Millbrook', 'Northgate', 'Oakvale', 'Pinecrest', 'Quarry', 'Rowan', 'Saltmarsh', 'Thornbury'];
const LAST = ['Supplies', 'Traders', 'Logistics', 'Foods', 'Fittings', 'Textiles', 'Motors', 'Print', 'Timber', 'Electrical'];

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

export class ZipOut {
  constructor(path) {
    this.ws = createWriteStream(path);
    this.offset = 0;
    this.central = [];
  }
  async write(b) {
    this.offset += b.length;
    if (!this.ws.write(b)) await new Promise((r) => this.ws.once('drain', r));
  }
  /** A member from an async iterable of strings, deflated as it comes (sizes in a data descriptor). */
  async member(name, pieces, level = 6) {
    const nb = Buffer.from(name);
    const at = this.offset;
    const lh = Buffer.alloc(30);
    lh.writeUInt32LE(0x04034b50, 0);
    lh.writeUInt16LE(20, 4);
    lh.writeUInt16LE(0x0808, 6); // sizes after the data; UTF-8 names
    lh.writeUInt16LE(8, 8);
    lh.writeUInt16LE(nb.length, 26);
    await this.write(lh);
    await this.write(nb);
    const def = createDeflateRaw({ level });
    let csize = 0;
    let usize = 0;
    let crc = 0;
    const done = (async () => {
      for await (const c of def) {
        csize += c.length;
        await this.write(c);
      }
    })();
    for await (const s of pieces) {
      const b = Buffer.from(s);
      usize += b.length;
      crc = crc32(b, crc);
      if (!def.write(b)) await new Promise((r) => def.once('drain', r));
    }
    def.end();
    await done;
    const dd = Buffer.alloc(16);
    dd.writeUInt32LE(0x08074b50, 0);
    dd.writeUInt32LE(crc >>> 0, 4);
    dd.writeUInt32LE(csize, 8);
    dd.writeUInt32LE(usize, 12);
    await this.write(dd);
    const ch = Buffer.alloc(46);
    ch.writeUInt32LE(0x02014b50, 0);
    ch.writeUInt16LE(20, 4);
    ch.writeUInt16LE(20, 6);
    ch.writeUInt16LE(0x0808, 8);
    ch.writeUInt16LE(8, 10);
    ch.writeUInt32LE(crc >>> 0, 16);
    ch.writeUInt32LE(csize, 20);
    ch.writeUInt32LE(usize, 24);
    ch.writeUInt16LE(nb.length, 28);
    ch.writeUInt32LE(at, 42);
    this.central.push(ch, nb);
  }
  async end() {
    const cd = Buffer.concat(this.central);
    const at = this.offset;
    await this.write(cd);
    const e = Buffer.alloc(22);
    e.writeUInt32LE(0x06054b50, 0);
    e.writeUInt16LE(this.central.length / 2, 8);
    e.writeUInt16LE(this.central.length / 2, 10);
    e.writeUInt32LE(cd.length, 12);
    e.writeUInt32LE(at, 16);
    await this.write(e);
    await new Promise((res, rej) => this.ws.end((err) => (err ? rej(err) : res())));
  }
}

async function* batched(gen) {
  let buf = '';
  for (const s of gen) {
    buf += s;
    if (buf.length > 1 << 18) {
      yield buf;
      buf = '';
    }
  }
  if (buf) yield buf;
}

export async function makeWorkbook(rows, out) {
  const z = new ZipOut(out);
  const one = (s) => batched([s]);
  const customers = [];
  for (let i = 0; i < 200; i++) customers.push(`${FIRST[i % 20]} ${LAST[Math.floor(i / 20) % 10]}${i >= 100 ? ' Ltd' : ''}`);
  await z.member('[Content_Types].xml', one('<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/></Types>'));
  await z.member('_rels/.rels', one(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${PNS}"><Relationship Id="rId1" Type="${RNS}/officeDocument" Target="xl/workbook.xml"/></Relationships>`));
  await z.member('xl/workbook.xml', one(`<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="${NS}" xmlns:r="${RNS}"><workbookPr/><sheets><sheet name="Invoices" sheetId="1" r:id="rId1"/></sheets></workbook>`));
  await z.member('xl/_rels/workbook.xml.rels', one(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${PNS}"><Relationship Id="rId1" Type="${RNS}/worksheet" Target="worksheets/sheet1.xml"/><Relationship Id="rId2" Type="${RNS}/styles" Target="styles.xml"/><Relationship Id="rId3" Type="${RNS}/sharedStrings" Target="sharedStrings.xml"/></Relationships>`));
  await z.member('xl/styles.xml', one(`<?xml version="1.0" encoding="UTF-8"?><styleSheet xmlns="${NS}"><numFmts count="1"><numFmt numFmtId="164" formatCode="yyyy-mm-dd"/></numFmts><fonts count="1"><font><sz val="11"/><name val="Calibri"/></font></fonts><fills count="1"><fill><patternFill patternType="none"/></fill></fills><borders count="1"><border/></borders><cellStyleXfs count="1"><xf numFmtId="0" fontId="0" fillId="0" borderId="0"/></cellStyleXfs><cellXfs count="3"><xf numFmtId="0" fontId="0" fillId="0" borderId="0" xfId="0"/><xf numFmtId="164" fontId="0" fillId="0" borderId="0" xfId="0" applyNumberFormat="1"/><xf numFmtId="4" fontId="0" fillId="0" borderId="0" xfId="0" applyNumberFormat="1"/></cellXfs></styleSheet>`));
  // Shared strings: 4 header names, 200 customers, then one invoice number a row.
  const header = ['Invoice no', 'Date', 'Customer', 'Amount'];
  await z.member('xl/sharedStrings.xml', batched((function* () {
    yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><sst xmlns="${NS}" count="${rows * 2 + 4}" uniqueCount="${rows + 204}">`;
    for (const h of header) yield `<si><t>${h}</t></si>`;
    for (const c of customers) yield `<si><t>${c}</t></si>`;
    for (let i = 0; i < rows; i++) yield `<si><t>INV-${1_000_001 + i}</t></si>`;
    yield '</sst>';
  })()));
  await z.member('xl/worksheets/sheet1.xml', batched((function* () {
    const next = xorshift(20240101);
    yield `<?xml version="1.0" encoding="UTF-8" standalone="yes"?><worksheet xmlns="${NS}" xmlns:r="${RNS}"><dimension ref="A1:D${rows + 1}"/><sheetViews><sheetView workbookViewId="0"/></sheetViews><sheetFormatPr defaultRowHeight="15"/><cols><col min="1" max="4" width="14" customWidth="1"/></cols><sheetData>`;
    yield `<row r="1" spans="1:4"><c r="A1" t="s"><v>0</v></c><c r="B1" t="s"><v>1</v></c><c r="C1" t="s"><v>2</v></c><c r="D1" t="s"><v>3</v></c></row>`;
    for (let i = 0; i < rows; i++) {
      const r = i + 2;
      const x = next();
      const day = 45292 + (Math.floor((i / rows) * 366) % 366);
      const cents = 1000 + (next() % 999_000);
      const amount = `${(x >>> 20) % 40 === 0 ? '-' : ''}${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, '0')}`;
      yield `<row r="${r}" spans="1:4"><c r="A${r}" t="s"><v>${204 + i}</v></c><c r="B${r}" s="1"><v>${day}</v></c><c r="C${r}" t="s"><v>${4 + (x % 200)}</v></c><c r="D${r}" s="2"><v>${amount}</v></c></row>`;
    }
    yield '</sheetData><pageMargins left="0.7" right="0.7" top="0.75" bottom="0.75" header="0.3" footer="0.3"/></worksheet>';
  })()));
  await z.end();
  return out;
}

/**
 * A hostile workbook: one small sheet, and a shared-strings part that unpacks to `bytes` bytes
 * (strings of 1 KB each) from a few MB of zip, as a zip bomb would.
 */
export async function makeHostileWorkbook(out, bytes) {
  const z = new ZipOut(out);
  const one = (s) => batched([s]);
  await z.member('_rels/.rels', one(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${PNS}"><Relationship Id="rId1" Type="${RNS}/officeDocument" Target="xl/workbook.xml"/></Relationships>`));
  await z.member('xl/workbook.xml', one(`<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="${NS}" xmlns:r="${RNS}"><sheets><sheet name="Invoices" sheetId="1" r:id="rId1"/></sheets></workbook>`));
  await z.member('xl/_rels/workbook.xml.rels', one(`<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="${PNS}"><Relationship Id="rId1" Type="${RNS}/worksheet" Target="worksheets/sheet1.xml"/><Relationship Id="rId3" Type="${RNS}/sharedStrings" Target="sharedStrings.xml"/></Relationships>`));
  const item = `<si><t>${'A'.repeat(1000)}</t></si>`;
  await z.member('xl/sharedStrings.xml', batched((function* () {
    yield `<?xml version="1.0" encoding="UTF-8"?><sst xmlns="${NS}">`;
    for (let n = 0; n < bytes; n += item.length) yield item;
    yield '</sst>';
  })()), 1);
  await z.member('xl/worksheets/sheet1.xml', one(`<?xml version="1.0" encoding="UTF-8"?><worksheet xmlns="${NS}"><sheetData><row r="1"><c r="A1" t="s"><v>0</v></c></row><row r="2"><c r="A2" t="s"><v>1</v></c></row></sheetData></worksheet>`));
  await z.end();
  return out;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const rows = Number(process.argv[2] ?? 1_048_575);
  const out = process.argv[3];
  if (!out) {
    console.error('usage: node bench/make-workbook.mjs ROWS OUT.xlsx');
    process.exit(2);
  }
  await makeWorkbook(rows, out);
  process.stdout.write(`${out}\n`);
}
