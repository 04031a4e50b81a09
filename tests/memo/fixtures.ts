/**
 * Test workpapers for the memo, built with the real library functions: the sample size from
 * src/stats, the evaluation and the proposed conclusion from src/evaluation, validated by the
 * workpaper schema and saved with saveWorkpaper (so the change log is real).
 *
 * The scenario is invented (no real company or person): a tile wholesaler's approval of purchase
 * invoices. Which items deviate, and why, is chosen here; every figure is computed.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sampleSize } from '../../src/stats/index.js';
import { HAPHAZARD_V1, selectRandom } from '../../src/selection/index.js';
import { evaluate, proposeConclusion } from '../../src/control-test/index.js';
import { newWorkpaper, parseWorkpaper, saveWorkpaper } from '../../src/workpaper/index.js';
import type { AttributeResult, ItemResult, Model, SelectedItem, Workpaper } from '../../src/workpaper/schema.js';

export type Variant = 'supported' | 'not-supported' | 'non-statistical' | 'haphazard' | 'hypergeometric';
export type Stage = 'planned' | 'selected' | 'recorded' | 'evaluated' | 'concluded';

export interface PlantedDeviation {
  /** 0-based index among the tested sample items. */
  at: number;
  attributeId: 'A1' | 'A2';
  result: Extract<AttributeResult, { result: 'deviation' }>;
}

export interface FixtureOptions {
  variant: Variant;
  stage?: Stage;
  /** Population size (default 1,240 invoices). */
  populationSize?: number;
  /** Force the sample size (e.g. 500 for the bench); default: computed by sampleSize(). */
  sampleSizeOverride?: number;
  /** Deviations to plant; default: per variant. */
  deviations?: PlantedDeviation[];
  /** Void the item at this index among the sample items and replace it with the first spare. */
  voidAt?: number | null;
  reviewerSigned?: boolean;
  /** Extra attributes beyond A1 and A2 (A3, A4, ...), all conforming, to widen the appendix. */
  extraAttributes?: number;
}

export const SCENARIO = {
  entity: 'Harbourside Tile Supply Ltd (invented)',
  reference: 'C-310',
  preparer: 'R. Okafor',
  reviewer: 'M. Lindqvist',
  controlId: 'AP-03',
  populationFile: 'invoices-2025.csv',
  seed: '20260120-C310',
} as const;

const DEFAULT_DEVIATIONS: Record<Variant, PlantedDeviation[]> = {
  supported: [
    {
      at: 17,
      attributeId: 'A2',
      result: { result: 'deviation', found: 'Goods received note dated after the invoice was approved', cause: 'performed-late', causeDetail: 'receiving clerk on leave', intentional: 'no', pattern: 'isolated' },
    },
  ],
  'not-supported': [
    {
      at: 9,
      attributeId: 'A1',
      result: { result: 'deviation', found: 'No approval recorded before payment', cause: 'not-performed', causeDetail: 'approver absent, invoice paid on the due date', intentional: 'no', pattern: 'isolated' },
    },
    {
      at: 41,
      attributeId: 'A1',
      result: { result: 'deviation', found: 'Approved by a buyer who is not on the authority list', cause: 'wrong-performer', intentional: 'no', pattern: 'isolated' },
    },
  ],
  'non-statistical': [],
  haphazard: [],
  hypergeometric: [
    {
      at: 3,
      attributeId: 'A1',
      result: { result: 'deviation', found: 'Approval evidence could not be found', cause: 'evidence-missing', intentional: 'no', pattern: 'isolated' },
    },
  ],
};

/** The population file: keys INV-10001..., amounts in cents turned into decimal strings. */
export function populationCsv(n: number): { text: string; total: string; firstKey: string; lastKey: string } {
  const lines = ['InvoiceNo,InvoiceDate,Supplier,Amount'];
  let cents = 0n;
  for (let i = 0; i < n; i++) {
    const c = 500000 + ((i * 7919) % 4500000);
    cents += BigInt(c);
    const day = String((i % 28) + 1).padStart(2, '0');
    const month = String((i % 12) + 1).padStart(2, '0');
    lines.push(`INV-${10001 + i},2025-${month}-${day},SUP-${(i % 37) + 1},${Math.floor(c / 100)}.${String(c % 100).padStart(2, '0')}`);
  }
  const total = `${cents / 100n}.${String(cents % 100n).padStart(2, '0')}`;
  return { text: `${lines.join('\n')}\n`, total, firstKey: 'INV-10001', lastKey: `INV-${10000 + n}` };
}

export interface Fixture {
  wp: Workpaper;
  dir: string;
  path: string;
  populationPath: string;
  populationSha256: string;
}

/** Build a workpaper for a variant and stage, save it in a fresh temp folder with its population. */
export function buildFixture(o: FixtureOptions): Fixture {
  const stage = o.stage ?? 'concluded';
  const order: Stage[] = ['planned', 'selected', 'recorded', 'evaluated', 'concluded'];
  const upTo = (s: Stage) => order.indexOf(stage) >= order.indexOf(s);
  const N = o.populationSize ?? 1240;
  const dir = mkdtempSync(join(tmpdir(), 'tolrate-memo-'));
  const pop = populationCsv(N);
  const populationPath = join(dir, SCENARIO.populationFile);
  writeFileSync(populationPath, pop.text);
  const sha = createHash('sha256').update(pop.text).digest('hex');

  const nonStatistical = o.variant === 'non-statistical';
  const model: Model = o.variant === 'hypergeometric' ? 'hypergeometric' : 'binomial';
  const confidence = nonStatistical ? 0.9 : 0.95;
  const tolerableRate = nonStatistical ? 0.1 : 0.06;
  const expectedRate = nonStatistical ? 0 : 0.01;

  const wp = newWorkpaper('0.1.0-test', new Date('2026-01-20T09:00:00Z'));
  wp.engagement = {
    entity: SCENARIO.entity,
    periodStart: '2025-01-01',
    periodEnd: '2025-12-31',
    reference: SCENARIO.reference,
    preparer: SCENARIO.preparer,
    reviewer: SCENARIO.reviewer,
  };
  wp.control = {
    id: SCENARIO.controlId,
    description: 'Purchase invoices of 5,000 or more are approved in the purchasing system by an authorised budget holder before payment.',
    objective: 'Only authorised purchases for goods received are paid.',
    owner: 'Head of Accounts Payable',
    frequency: 'many-times-daily',
    nature: 'it-dependent-manual',
    key: true,
  };
  wp.attributes = [
    {
      id: 'A1',
      description: 'Approval by an authorised budget holder before payment',
      deviationDefinition: 'No approval, approval dated after payment, or an approver not on the authority list.',
    },
    {
      id: 'A2',
      description: 'Invoice matched to a goods received note',
      deviationDefinition: 'No goods received note, or quantities differing by more than 2%.',
    },
  ];
  for (let i = 0; i < (o.extraAttributes ?? 0); i++) {
    wp.attributes.push({ id: `A${i + 3}`, description: `Supporting check ${i + 1} (invented)`, deviationDefinition: 'The check is not evidenced.' });
  }
  wp.population = {
    description: 'purchase invoices of 5,000 or more posted in 2025',
    samplingUnit: 'one purchase invoice',
    source: { kind: 'csv', path: SCENARIO.populationFile, keyColumn: 'InvoiceNo', amountColumn: 'Amount', dateColumn: 'InvoiceDate' },
    fingerprint: {
      sha256: sha,
      rowCount: N,
      firstKey: pop.firstKey,
      lastKey: pop.lastKey,
      columns: ['InvoiceNo', 'InvoiceDate', 'Supplier', 'Amount'],
      amountTotal: pop.total,
      format: 'csv',
    },
    validation: { ok: true, messages: [] },
    tieOut: {
      ledgerCount: N,
      ledgerTotal: pop.total,
      countDifference: 0,
      totalDifference: '0.00',
      ledgerSource: 'AP invoice register, run 2026-01-15',
    },
    scannedAt: '2026-01-20T09:05:00.000Z',
  };

  let n: number;
  if (nonStatistical) {
    n = o.sampleSizeOverride ?? 25;
    wp.approach = {
      kind: 'non-statistical',
      confidence,
      tolerableRate,
      expectedRate,
      model: 'binomial',
      sizes: [],
      policy: { name: 'Firm sampling policy 2025', frequency: 'many-times-daily', reliance: 'moderate', size: 25, assumptions: 'The policy assumes 90% confidence and no expected deviations.' },
      sampleSize: n,
      rationale: 'Firm policy for a control operating many times a day, moderate reliance.',
    };
  } else {
    const populationSize = model === 'hypergeometric' ? N : undefined;
    const size = sampleSize({ confidence, tolerableRate, expectedRate, model, ...(populationSize ? { populationSize } : {}) });
    n = o.sampleSizeOverride ?? size.sampleSize;
    wp.approach = {
      kind: 'statistical',
      confidence,
      tolerableRate,
      expectedRate,
      model,
      sizes: wp.attributes.map((a) => ({ attributeId: a.id, tolerableRate, sampleSize: size.sampleSize, expectedDeviations: size.expectedDeviations, achievedRisk: size.achievedRisk })),
      ...(size.finitePopulationCorrection ? { finitePopulationCorrection: size.finitePopulationCorrection } : {}),
      sampleSize: n,
      rationale:
        o.sampleSizeOverride !== undefined
          ? `Size raised to ${n} to cover the whole year's approvers.`
          : 'The size the planning parameters require; no judgemental adjustment.',
    };
  }

  if (upTo('selected')) {
    const spares = 5;
    const total = n + spares;
    let positions: number[];
    if (o.variant === 'haphazard') {
      // Chosen by a person: spread over the year by hand (no random draw).
      positions = [];
      const taken = new Set<number>();
      for (let i = 0; i < total; i++) {
        let pos = Math.floor(((i + 0.5) * N) / total);
        while (taken.has(pos)) pos = (pos + 1) % N;
        taken.add(pos);
        positions.push(pos);
      }
    } else {
      positions = selectRandom({ populationSize: N, sampleSize: n, spares, seed: SCENARIO.seed }).positions;
    }
    const items: SelectedItem[] = positions.map((pos, i) => ({ seq: i + 1, role: i < n ? 'sample' : 'spare', position: pos, row: pos + 2, key: `INV-${10001 + pos}`, values: {} }));
    wp.selection =
      o.variant === 'haphazard'
        ? {
            method: 'haphazard',
            algorithm: HAPHAZARD_V1,
            sampleSize: n,
            spares,
            haphazard: { selectedBy: SCENARIO.preparer, how: 'Invoices picked from the monthly binders, spread across suppliers and months, without looking at amounts.' },
            items,
            selectedAt: '2026-01-20T09:10:00.000Z',
          }
        : {
            method: 'random',
            algorithm: selectRandom({ populationSize: N, sampleSize: n, spares, seed: SCENARIO.seed }).algorithm,
            seed: SCENARIO.seed,
            sampleSize: n,
            spares,
            items,
            selectedAt: '2026-01-20T09:10:00.000Z',
          };
  }

  if (upTo('recorded')) {
    const sel = wp.selection!;
    const sample = sel.items.filter((i) => i.role === 'sample');
    const spareItems = sel.items.filter((i) => i.role === 'spare');
    const voidAt = o.voidAt === undefined ? 5 : o.voidAt;
    const planted = o.deviations ?? DEFAULT_DEVIATIONS[o.variant];
    const results: ItemResult[] = [];
    const tested: SelectedItem[] = [];
    sample.forEach((it, i) => {
      if (voidAt !== null && i === voidAt) {
        const spare = spareItems[0]!;
        results.push({ key: it.key, seq: it.seq, void: { reason: 'Invoice cancelled and properly voided by a credit note', replacedBy: spare.key }, attributes: {} });
      } else tested.push(it);
    });
    if (voidAt !== null) tested.splice(voidAt, 0, spareItems[0]!);
    tested.forEach((it, i) => {
      const attributes: Record<string, AttributeResult> = {};
      for (const a of wp.attributes!.map((x) => x.id)) {
        const d = planted.find((x) => x.at === i && x.attributeId === a);
        attributes[a] = d ? d.result : { result: 'conforms' };
      }
      const r: ItemResult = { key: it.key, seq: it.seq, attributes };
      if (it.role === 'spare') r.replaces = sample[voidAt!]!.key;
      results.push(r);
    });
    results.sort((x, y) => x.seq - y.seq);
    wp.results = { source: 'interview', items: results, recordedAt: '2026-02-10T15:00:00.000Z' };
  }

  if (upTo('evaluated')) wp.evaluation = evaluate(wp, new Date('2026-02-11T10:00:00Z'));

  if (upTo('concluded')) {
    const proposed = proposeConclusion(wp, wp.evaluation!, new Date('2026-02-11T10:30:00Z'));
    const { findings: _f, ...conclusion } = proposed;
    conclusion.followUps = conclusion.followUps.map((f, i) => ({ ...f, owner: i % 2 === 0 ? 'R. Okafor' : 'Head of Accounts Payable', due: `2026-03-${String(2 + i).padStart(2, '0')}` }));
    conclusion.qualitative.compensatingControls = 'Monthly review of payments over 50,000 by the finance director (not tested).';
    if (!conclusion.control.supportsReliance) {
      wp.conclusion = {
        ...conclusion,
        severity: {
          answers: [
            { question: 'Is there a reasonable possibility of a misstatement?', answer: 'Yes, for unapproved purchases.' },
            { question: 'Does a tested compensating control address the same risk?', answer: 'No compensating control was tested.' },
          ],
          classification: 'deficiency',
          rationale: 'Both deviations were isolated and the amounts involved were small; the practitioner judges this a deficiency, not a significant deficiency.',
        },
      };
    } else wp.conclusion = conclusion;
    wp.signoffs = {
      preparer: { name: SCENARIO.preparer, date: '2026-02-12' },
      ...(o.reviewerSigned ? { reviewer: { name: SCENARIO.reviewer, date: '2026-02-20' } } : {}),
    };
  }

  const checked = parseWorkpaper(JSON.parse(JSON.stringify(wp)) as unknown, 'fixture');
  const path = join(dir, `${SCENARIO.reference}.tolrate.json`);
  const saved = saveWorkpaper(path, checked, { by: SCENARIO.preparer, step: 'fixture', at: new Date('2026-02-12T08:00:00Z') });
  return { wp: saved, dir, path, populationPath, populationSha256: sha };
}
