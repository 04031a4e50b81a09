/**
 * The workpaper file (`*.tolrate.json`): the single record of one test of a control.
 *
 * Every section after the header is optional so that a test saved half-way (planning done,
 * fieldwork pending) is a valid file; the interview continues from the first missing step.
 * Rates are fractions (0.06). Amounts are decimal strings (never floats). Dates are ISO
 * `YYYY-MM-DD`; times are ISO date-times in UTC.
 *
 * Changing the shape: bump SCHEMA_VERSION and bring older files up to date in parseWorkpaper
 * (file.ts) before validation; then `npm run schema` regenerates schema/workpaper.schema.json.
 */
import * as z from 'zod';
import { MODELS } from '../stats/types.js';

export const SCHEMA_VERSION = 1;

const text = z.string().trim().min(1, 'must not be empty');
const optText = z.string().trim().optional();
const isoDate = z.iso.date({ error: 'must be a date written YYYY-MM-DD' });
const isoTime = z.iso.datetime({ error: 'must be an ISO date-time' });
/** A rate strictly between 0 and 1 (0.06 = 6%). */
const rate = z.number().gt(0, 'must be above 0%').lt(1, 'must be below 100%');
const rateOrZero = z.number().gte(0, 'must not be negative').lt(1, 'must be below 100%');
const count = z.number().int('must be a whole number').nonnegative('must not be negative');
const positive = z.number().int('must be a whole number').positive('must be at least 1');
const decimal = z.string().regex(/^-?\d+(\.\d+)?$/, 'must be a decimal number such as 1234.50');

export { MODELS };
export const FREQUENCIES = ['annual', 'quarterly', 'monthly', 'weekly', 'daily', 'many-times-daily'] as const;
export const NATURES = ['manual', 'automated', 'it-dependent-manual'] as const;
export const CAUSES = [
  'not-performed',
  'performed-late',
  'wrong-performer',
  'evidence-missing',
  'system',
  'other',
] as const;
export const INTENT = ['no', 'suspected', 'yes'] as const;
export const PATTERNS = ['isolated', 'systemic', 'unclear'] as const;
export const SEVERITIES = ['none', 'deficiency', 'significant-deficiency', 'material-weakness'] as const;
export const STAGE_DECISIONS = ['accepted-at-first', 'rejected-at-first', 'accepted-at-second', 'rejected-at-second'] as const;
export const FOLLOW_UP_KINDS = [
  'extend-sample',
  'test-compensating-control',
  'reduce-reliance',
  'communicate',
  'assess-severity',
  'other',
] as const;

export const Engagement = z.object({
  entity: text,
  periodStart: isoDate,
  periodEnd: isoDate,
  reference: text,
  preparer: text,
  reviewer: text,
}).refine((e) => e.periodStart <= e.periodEnd, { message: 'the period must not end before it starts', path: ['periodEnd'] });

export const Control = z.object({
  id: text,
  description: text,
  objective: text,
  owner: text,
  frequency: z.enum(FREQUENCIES),
  nature: z.enum(NATURES),
  key: z.boolean(),
});

export const Attribute = z.object({
  id: z.string().regex(/^A\d+$/, 'must be A1, A2, ...'),
  description: text,
  deviationDefinition: text,
  /** Only when it differs from the test's tolerable rate. */
  tolerableRate: rate.optional(),
});

export const PopulationSource = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('csv'),
    /** Relative to the workpaper file's folder, so the folder can be moved whole. */
    path: text,
    keyColumn: text,
    amountColumn: optText,
    dateColumn: optText,
    delimiter: z.string().optional(),
    /** Amounts written with a decimal comma (1.234,56). */
    decimalComma: z.boolean().optional(),
    /** How dates such as 03/04/2026 are read. */
    dateOrder: z.enum(['dmy', 'mdy']).optional(),
  }),
  z.object({
    kind: z.literal('xlsx'),
    path: text,
    sheet: optText,
    keyColumn: text,
    amountColumn: optText,
    dateColumn: optText,
    decimalComma: z.boolean().optional(),
    dateOrder: z.enum(['dmy', 'mdy']).optional(),
  }),
  z.object({
    kind: z.literal('ranges'),
    ranges: text,
    exclusions: z.array(z.string()).default([]),
  }),
  /** The occurrences of a periodic control: each month, quarter, week or working day of the period. */
  z.object({
    kind: z.literal('periods'),
    frequency: z.enum(['monthly', 'quarterly', 'weekly', 'daily']),
    start: isoDate,
    end: isoDate,
    /** Daily: days that are not working days besides Saturdays and Sundays. */
    nonWorkingDays: z.array(isoDate).default([]),
  }),
]);

/** The population by month of its date column, counted when it was read; every row undated when it has no dates. */
export const MonthTally = z.object({
  /** Absent when the population has no dates (number ranges, a file without a date column). */
  dateColumn: z.string().optional(),
  /** How dates such as 03/04/2026 were read. */
  dateOrder: z.enum(['dmy', 'mdy']).optional(),
  months: z.array(z.object({
    month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'must be a month written YYYY-MM'),
    count: positive,
    /** The exact total of the month's readable amounts, with an amount column. */
    amountTotal: decimal.optional(),
  })),
  /** Rows with no readable date. */
  undated: count,
  /** With an amount column: the exact total of those rows' readable amounts. */
  undatedAmountTotal: decimal.optional(),
});

export const Fingerprint = z.object({
  sha256: z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in hexadecimal'),
  rowCount: count,
  firstKey: z.string(),
  lastKey: z.string(),
  columns: z.array(z.string()),
  amountTotal: decimal.optional(),
  format: z.string(),
  sheet: z.string().optional(),
  /** The CSV delimiter used (detected or given). */
  delimiter: z.string().optional(),
  /** Amounts read and added to the total. */
  amountCount: count.optional(),
  bytes: count.optional(),
  file: z.string().optional(),
  dateRange: z.object({ earliest: z.string(), latest: z.string() }).optional(),
  /** Ranges: the canonical text hashed, and how many numbers the exclusions removed. */
  canonical: z.string().optional(),
  excludedCount: count.optional(),
  /** The rows by month (absent in files written before it was recorded). */
  monthTally: MonthTally.optional(),
});

export const Population = z.object({
  description: text,
  samplingUnit: text,
  source: PopulationSource,
  fingerprint: Fingerprint,
  validation: z.object({
    ok: z.boolean(),
    messages: z.array(z.string()),
    /** Why the practitioner went on despite the problems listed. */
    acceptedReason: optText,
  }),
  tieOut: z.object({
    ledgerCount: count.optional(),
    ledgerTotal: decimal.optional(),
    countDifference: z.number().int().optional(),
    totalDifference: decimal.optional(),
    explanation: optText,
    /** Where the ledger figures come from (report name, date run). */
    ledgerSource: optText,
  }),
  scannedAt: isoTime,
});

export const SizeForAttribute = z.object({
  attributeId: z.string(),
  tolerableRate: rate,
  sampleSize: positive,
  expectedDeviations: count,
  achievedRisk: z.number().min(0).max(1),
  /** The most deviations with which the sample still supports reliance. */
  acceptanceNumber: count.optional(),
  /** The risk of underreliance: the chance that a control working at the expected rate shows more deviations than that. */
  underrelianceRisk: z.number().min(0).max(1).optional(),
});

/**
 * A plan other than the ordinary single-stage sample (absent: one sample of approach.sampleSize,
 * relying on the control when the achieved risk of overreliance is within 1 − confidence).
 * 'two-stage': test n1 items; accept with at most c1 deviations, reject with r1 or more, and
 * otherwise test n2 more and accept with at most c2 in all. 'both-risks': one sample of n items
 * whose acceptance number c also keeps the risk of underreliance within the allowed one.
 * The risks are exact for the recorded parameters (confidence, tolerable and expected rates, model).
 */
export const SamplingPlan = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('two-stage'),
    firstSampleSize: positive,
    firstAcceptanceNumber: count,
    firstRejectionNumber: count,
    secondSampleSize: positive,
    secondAcceptanceNumber: count,
    overrelianceRisk: z.number().min(0).max(1),
    underrelianceRisk: z.number().min(0).max(1),
    /** Items expected to be tested when the control works at the expected rate. */
    averageSampleNumber: z.number().nonnegative(),
    /** The chance, at the expected rate, that the second stage is needed. */
    secondStageProbability: z.number().min(0).max(1),
    /** The most risk of underreliance the plan was allowed (that of the single-stage sample). */
    allowedUnderrelianceRisk: z.number().min(0).max(1),
  }),
  z.object({
    kind: z.literal('both-risks'),
    sampleSize: positive,
    acceptanceNumber: count,
    overrelianceRisk: z.number().min(0).max(1),
    underrelianceRisk: z.number().min(0).max(1),
    /** The most risk of underreliance the practitioner accepts. */
    allowedUnderrelianceRisk: z.number().gt(0).lt(1),
  }),
]);

export const Approach = z.object({
  kind: z.enum(['statistical', 'non-statistical']),
  /** Planned confidence. For a non-statistical test, the confidence the firm policy assumes. */
  confidence: rate,
  tolerableRate: rate,
  expectedRate: rateOrZero,
  model: z.enum(MODELS),
  /** Per attribute: the size each attribute's tolerable rate needs (statistical). */
  sizes: z.array(SizeForAttribute).default([]),
  /** Textbook finite population correction of the binomial size, reported beside, never used. */
  finitePopulationCorrection: z
    .object({ binomialSampleSize: positive, correctedSampleSize: positive })
    .optional(),
  policy: z
    .object({
      name: text,
      frequency: z.enum(FREQUENCIES),
      reliance: text,
      size: positive,
      assumptions: text,
    })
    .optional(),
  /** A two-stage plan or one planned for both risks; absent for the ordinary single-stage sample. */
  plan: SamplingPlan.optional(),
  /** The size adopted for selection (for a two-stage plan, n1 + n2: the most items that may be tested). */
  sampleSize: positive,
  /** Why this size, in words (shown in the memo). */
  rationale: text,
}).refine((a) => a.expectedRate < a.tolerableRate, {
  message: 'the expected deviation rate must be below the tolerable rate',
  path: ['expectedRate'],
});

export const SelectedItem = z.object({
  seq: positive,
  role: z.enum(['sample', 'spare']),
  /** 0-based position in the population as read (what the selection algorithm draws). */
  position: count,
  /** Row number a user sees in the source (1-based, header counted for files). */
  row: positive,
  key: z.string(),
  values: z.record(z.string(), z.string()).default({}),
  /** Two-stage plan: the stage of a sample item (the first n1 draws are stage 1, the next n2 stage 2). */
  stage: z.union([z.literal(1), z.literal(2)]).optional(),
});

export const Selection = z.object({
  method: z.enum(['random', 'systematic', 'haphazard']),
  algorithm: z.string(),
  seed: z.string().optional(),
  interval: z.number().positive().optional(),
  starts: z.array(z.number().nonnegative()).optional(),
  sampleSize: positive,
  spares: count,
  haphazard: z.object({ selectedBy: text, how: text }).optional(),
  items: z.array(SelectedItem).min(1),
  /** Relative to the workpaper file. */
  fieldworkSheet: z.string().optional(),
  selectedAt: isoTime,
});

export const AttributeResult = z.discriminatedUnion('result', [
  z.object({ result: z.literal('conforms'), note: optText }),
  z.object({
    result: z.literal('deviation'),
    /** What was found, in the tester's words. */
    found: text,
    cause: z.enum(CAUSES),
    causeDetail: optText,
    intentional: z.enum(INTENT),
    pattern: z.enum(PATTERNS),
  }),
]);

/** One piece of evidence inspected for an item: a document number, a file name, any reference. */
export const EvidenceRef = z.object({
  ref: text,
  /** When the reference names a file beside the workpaper: its SHA-256 and size as recorded. */
  sha256: z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in hexadecimal').optional(),
  bytes: count.optional(),
});

export const ItemResult = z.object({
  key: z.string(),
  seq: positive,
  /** Who tested the item, when, what evidence was inspected, and a note (any tested item). */
  testedBy: optText,
  testedOn: isoDate.optional(),
  evidence: z.array(EvidenceRef).optional(),
  note: optText,
  /** A properly voided document: not tested, replaced by the next spare. */
  void: z.object({ reason: text, replacedBy: z.string().optional() }).optional(),
  /** When this spare replaces a voided item, that item's key. */
  replaces: z.string().optional(),
  attributes: z.record(z.string(), AttributeResult).default({}),
});

export const Results = z.object({
  source: z.enum(['interview', 'sheet']),
  sheetPath: z.string().optional(),
  /** When results were read from several sheets (one per tester): every one, the first being sheetPath. */
  sheetPaths: z.array(z.string()).optional(),
  items: z.array(ItemResult),
  recordedAt: isoTime,
});

/** The figures of one part of a test done in parts (the interim part and the roll-forward part). */
export const PartEvaluation = z.object({
  part: z.enum(['interim', 'roll-forward']),
  populationSize: positive,
  sampleSize: count,
  deviations: count,
  sampleRate: z.number().min(0).max(1),
  /** The part's own upper deviation limit at the planned confidence (the test's model). */
  upperLimit: z.number().min(0).max(1),
  /** Hypergeometric: the part's own limit as a count of deviations in its population. */
  deviationsInPopulation: count.optional(),
});

/**
 * The whole period of a test done in parts: the exact upper limit over both parts (the worst
 * allocation of the deviations across them), the conservative bound beside it, and the decision.
 */
export const CombinedEvaluation = z.object({
  /** The exact limit as a count of deviations in the whole population; null when the search was too large. */
  deviationsInPopulation: count.nullable(),
  rate: z.number().min(0).max(1).nullable(),
  /** The sum of the parts' own limits, each at confidence 1 − β/2 (Bonferroni). */
  conservativeDeviations: count,
  conservativeRate: z.number().min(0).max(1),
  /** The whole-period limit (the exact one, or the conservative bound when it is null) is below the tolerable count. */
  supported: z.boolean(),
  /** Why the exact limit is missing, when it is. */
  note: optText,
});

export const AttributeEvaluation = z.object({
  attributeId: z.string(),
  model: z.enum(MODELS),
  confidence: rate,
  tolerableRate: rate,
  sampleSize: count,
  deviations: count,
  sampleRate: z.number().min(0).max(1),
  upperLimit: z.number().min(0).max(1),
  /** Hypergeometric: the largest number of deviations in the population consistent with the result. */
  deviationsInPopulation: count.optional(),
  achievedRisk: z.number().min(0).max(1),
  /** The rates alone: achieved risk ≤ 1 − confidence. */
  supportedByRates: z.boolean(),
  /** True when the figures cannot support a statistical conclusion (non-statistical or haphazard). */
  illustrative: z.boolean(),
  /**
   * The single-stage extension figure: additional items needed if none of them deviates, as if the
   * larger sample had been planned in advance; null when not practical or not applicable.
   */
  extension: count.nullable(),
  /**
   * The exact risk of overreliance of extending by that figure after seeing these results and
   * relying only if none of the added items deviates (the second look depends on the first), and
   * of repeating the extension after each failure. Absent when no extension is offered.
   */
  extensionRisk: z.object({ procedure: z.number().min(0).max(1), repeated: z.number().min(0).max(1) }).optional(),
  /** Two-stage plan: the stage reached, the items and deviations of each stage, and the plan's decision. */
  stage: z
    .object({
      reached: z.union([z.literal(1), z.literal(2)]),
      firstSampleSize: count,
      firstDeviations: count,
      secondSampleSize: count.optional(),
      secondDeviations: count.optional(),
      decision: z.enum(STAGE_DECISIONS),
    })
    .optional(),
  /**
   * A test done in parts (interim and roll-forward): the figures of each part. The attribute's
   * sampleSize, deviations and sampleRate are then the whole period's (both parts added), its
   * upperLimit and deviationsInPopulation the whole-period limit, achievedRisk the whole-period
   * risk of overreliance at the tolerable count (worst allocation), and supportedByRates the
   * whole-period decision (combined.supported).
   */
  parts: z.array(PartEvaluation).optional(),
  combined: CombinedEvaluation.optional(),
});

export const Evaluation = z.object({
  attributes: z.array(AttributeEvaluation),
  evaluatedAt: isoTime,
});

export const FollowUp = z.object({
  kind: z.enum(FOLLOW_UP_KINDS),
  description: text,
  owner: optText,
  due: isoDate.optional(),
  /** For extend-sample: the number of additional items. */
  items: count.optional(),
});

export const Conclusion = z.object({
  attributes: z.array(
    z.object({
      attributeId: z.string(),
      supportsReliance: z.boolean(),
      /** Why, when the qualitative review overrides the rates, or any practitioner remark. */
      reasoning: text,
    }),
  ),
  qualitative: z.object({
    intentionalFound: z.boolean(),
    systemicFound: z.boolean(),
    compensatingControls: optText,
    notes: optText,
  }),
  control: z.object({ supportsReliance: z.boolean(), text }),
  severity: z
    .object({
      answers: z.array(z.object({ question: text, answer: text })),
      classification: z.enum(SEVERITIES),
      rationale: text,
    })
    .optional(),
  followUps: z.array(FollowUp),
  concludedAt: isoTime,
});

export const SignOff = z.object({ name: text, date: isoDate });

export const ROLES = ['preparer', 'reviewer'] as const;
export const REVIEW_SECTIONS = ['engagement', 'attributes', 'population', 'approach', 'selection', 'results', 'evaluation', 'conclusion', 'severity'] as const;

/** One event in a review note's thread. */
export const NoteEvent = z.object({
  kind: z.enum(['raised', 'answered', 'reopened', 'cleared']),
  by: text,
  role: z.enum(ROLES),
  at: isoTime,
  /** The note, the answer, or the further comment. */
  text: optText,
  /** The preparer changed the record to answer it. */
  changedRecord: z.boolean().optional(),
});

export const ReviewNote = z.object({
  id: z.string().regex(/^N\d+$/, 'must be N1, N2, ...'),
  section: z.enum(REVIEW_SECTIONS),
  /** The item the note is on (its key), when it is on one item. */
  item: z.string().optional(),
  /** Must be cleared before the reviewer signs off. */
  mustClear: z.boolean(),
  thread: z.array(NoteEvent).min(1),
});

/** A change to the record after a sign-off: who, in which role, when, why, and every old -> new value. */
export const Amendment = z.object({
  at: isoTime,
  by: text,
  role: z.enum(ROLES),
  why: text,
  /** The sign-offs it cleared. */
  cleared: z.array(z.enum(ROLES)),
  changes: z.array(z.object({ path: z.string(), old: z.unknown().optional(), new: z.unknown().optional() })),
});

export const Review = z.object({
  notes: z.array(ReviewNote).default([]),
  /** Each sitting of a reviewer, with any warning recorded (e.g. the reviewer is the preparer). */
  sittings: z.array(z.object({ by: text, at: isoTime, warning: optText })).default([]),
});

export const MemoRecord = z.object({
  /** SHA-256 of the DOCX file as written. */
  sha256: z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in hexadecimal'),
  /** Where it was written, relative to the workpaper's folder when it is inside it. */
  path: z.string(),
  at: isoTime,
  /** The state the memo shows: the SHA-256 of the workpaper's content, and the last log entry then. */
  stateHash: z.string(),
  logSeq: count,
  logHash: z.string(),
  final: z.boolean(),
  /** Written with the appendix of the operating characteristic. */
  operatingCharacteristic: z.boolean().optional(),
  /** The memo template folder, when not the shipped one. */
  template: z.string().optional(),
});

export const LogChange = z.object({
  /** JSON path of the changed value, e.g. ["results","items",3,"attributes","A1"]. */
  path: z.array(z.union([z.string(), z.number().int()])),
  old: z.unknown().optional(),
  new: z.unknown().optional(),
  deleted: z.boolean().optional(),
});

export const LogEntry = z.object({
  seq: positive,
  at: isoTime,
  by: z.string(),
  /** In which role `by` made the change (the tool itself for computed steps: absent). */
  role: z.enum(ROLES).optional(),
  step: z.string(),
  reason: optText,
  changes: z.array(LogChange),
  /** SHA-256 of the workpaper (without its log) after this entry. */
  stateHash: z.string(),
  prevHash: z.string(),
  /** SHA-256 of this entry without this field, chained to prevHash. */
  hash: z.string(),
});

/**
 * Where a test carried forward from an earlier one came from: the earlier file (its path relative
 * to this file's folder, and the state hash it had), the answers copied as defaults to confirm
 * (by step, then question id), and the earlier figures shown when the expected rate is asked.
 */
export const CarriedForward = z.object({
  path: text,
  stateHash: z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in hexadecimal'),
  reference: optText,
  periodEnd: isoDate.optional(),
  defaults: z.record(z.string(), z.record(z.string(), z.union([z.string(), z.boolean()]))),
  lastYear: z.object({
    expectedRate: rateOrZero.optional(),
    attributes: z.array(z.object({ attributeId: z.string(), sampleSize: count, deviations: count, sampleRate: z.number().min(0).max(1), upperLimit: z.number().min(0).max(1), tolerableRate: rate })),
    controlSupportsReliance: z.boolean().optional(),
    severity: z.object({ classification: z.enum(SEVERITIES), rationale: text }).optional(),
    followUps: z.array(FollowUp),
  }),
});

/**
 * The roll-forward part of a test done at an interim date: the top-level population, selection
 * and results are the interim part (period start to interimDate); this part runs from the day
 * after interimDate to the period end, with its own population, size, selection and results.
 * Saved step by step, so every member after the dates is optional.
 */
export const RollForward = z.object({
  /** The last day of the interim part. */
  interimDate: isoDate,
  /** The roll-forward part: interimDate + 1 day to the engagement's period end. */
  periodStart: isoDate,
  periodEnd: isoDate,
  population: Population.optional(),
  /** The size adopted for the roll-forward part, and why (in words). */
  sampleSize: positive.optional(),
  rationale: optText,
  /** How the size was reached: the policy pro rata to the months remaining, or statistically on the roll-forward population. */
  sizing: z.object({
    kind: z.enum(['policy-pro-rata', 'statistical']),
    /** The size the rule gives (the adopted size may be larger, with a reason). */
    computed: positive,
    /** Policy pro rata: the policy's size for the period and the months of the period and of the roll-forward. */
    policySize: positive.optional(),
    periodMonths: positive.optional(),
    rollForwardMonths: positive.optional(),
    reason: optText,
  }).optional(),
  selection: Selection.optional(),
  results: Results.optional(),
}).refine((r) => r.periodStart <= r.periodEnd, { message: 'the roll-forward must not end before it starts', path: ['periodEnd'] });

export const Workpaper = z.object({
  schemaVersion: z.literal(SCHEMA_VERSION),
  tool: z.object({ name: z.literal('tolrate'), version: z.string() }),
  id: z.string().min(1),
  createdAt: isoTime,
  updatedAt: isoTime,
  engagement: Engagement.optional(),
  control: Control.optional(),
  attributes: z.array(Attribute).min(1, 'at least one attribute is needed').optional(),
  population: Population.optional(),
  approach: Approach.optional(),
  selection: Selection.optional(),
  results: Results.optional(),
  evaluation: Evaluation.optional(),
  conclusion: Conclusion.optional(),
  signoffs: z.object({ preparer: SignOff.optional(), reviewer: SignOff.optional() }).optional(),
  /**
   * The conclusion as it was before a change to the results (or an earlier answer) made it out of
   * date. Not a conclusion: its answers are offered as the defaults when the test is concluded again.
   */
  earlierConclusion: Conclusion.optional(),
  /** The answers given in a step that was stopped before it was complete (offered as defaults when it is asked again). */
  unfinishedStep: z
    .object({ step: z.string(), answers: z.record(z.string(), z.union([z.string(), z.boolean()])) })
    .optional(),
  /** The review: the reviewer's notes with their threads, and the reviewer's sittings. */
  review: Review.optional(),
  /** Changes made after a sign-off, each with who, when, why and every old -> new value. */
  amendments: z.array(Amendment).optional(),
  /** Every memo written from this workpaper: its SHA-256, when, and the state it shows. */
  memos: z.array(MemoRecord).optional(),
  /** The earlier test this one was carried forward from (optional: absent for a test started afresh). */
  carriedForward: CarriedForward.optional(),
  /** A test done at an interim date: the roll-forward part (absent for a test over the whole period at once). */
  rollForward: RollForward.optional(),
  log: z.array(LogEntry).default([]),
}).superRefine((wp, ctx) => {
  const ids = new Set((wp.attributes ?? []).map((a) => a.id));
  if (wp.attributes && ids.size !== wp.attributes.length) {
    ctx.addIssue({ code: 'custom', message: 'attribute ids must be unique', path: ['attributes'] });
  }
  if (wp.results) {
    wp.results.items.forEach((item, i) => {
      for (const id of Object.keys(item.attributes)) {
        if (!ids.has(id)) {
          ctx.addIssue({ code: 'custom', message: `result for unknown attribute ${id}`, path: ['results', 'items', i, 'attributes', id] });
        }
      }
    });
  }
  const rf = wp.rollForward;
  if (rf) {
    const e = wp.engagement;
    const next = new Date(Date.parse(`${rf.interimDate}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
    if (rf.periodStart !== next) ctx.addIssue({ code: 'custom', message: `the roll-forward must start the day after the interim date (${next})`, path: ['rollForward', 'periodStart'] });
    if (e && (rf.interimDate < e.periodStart || rf.interimDate >= e.periodEnd)) {
      ctx.addIssue({ code: 'custom', message: `the interim date must fall inside the period, before its last day (${e.periodStart} to ${e.periodEnd})`, path: ['rollForward', 'interimDate'] });
    }
    if (e && rf.periodEnd !== e.periodEnd) ctx.addIssue({ code: 'custom', message: `the roll-forward must end at the period end (${e.periodEnd})`, path: ['rollForward', 'periodEnd'] });
    rf.results?.items.forEach((item, i) => {
      for (const id of Object.keys(item.attributes)) {
        if (!ids.has(id)) ctx.addIssue({ code: 'custom', message: `result for unknown attribute ${id}`, path: ['rollForward', 'results', 'items', i, 'attributes', id] });
      }
    });
    if (rf.selection && rf.population && rf.selection.method !== 'haphazard') {
      const n = rf.population.fingerprint.rowCount;
      rf.selection.items.forEach((it, i) => {
        if (it.position >= n) ctx.addIssue({ code: 'custom', message: `position ${it.position} is outside the roll-forward population of ${n}`, path: ['rollForward', 'selection', 'items', i, 'position'] });
      });
    }
  }
  if (wp.selection && wp.population && wp.selection.method !== 'haphazard') {
    const n = wp.population.fingerprint.rowCount;
    wp.selection.items.forEach((it, i) => {
      if (it.position >= n) {
        ctx.addIssue({ code: 'custom', message: `position ${it.position} is outside the population of ${n}`, path: ['selection', 'items', i, 'position'] });
      }
    });
  }
});

export type Workpaper = z.infer<typeof Workpaper>;
export type WorkpaperInput = z.input<typeof Workpaper>;
export type Engagement = z.infer<typeof Engagement>;
export type Control = z.infer<typeof Control>;
export type Attribute = z.infer<typeof Attribute>;
export type PopulationSource = z.infer<typeof PopulationSource>;
export type Fingerprint = z.infer<typeof Fingerprint>;
export type Population = z.infer<typeof Population>;
export type Approach = z.infer<typeof Approach>;
export type SizeForAttribute = z.infer<typeof SizeForAttribute>;
export type SamplingPlan = z.infer<typeof SamplingPlan>;
export type StageDecision = (typeof STAGE_DECISIONS)[number];
export type SelectedItem = z.infer<typeof SelectedItem>;
export type Selection = z.infer<typeof Selection>;
export type AttributeResult = z.infer<typeof AttributeResult>;
export type ItemResult = z.infer<typeof ItemResult>;
export type EvidenceRef = z.infer<typeof EvidenceRef>;
export type Results = z.infer<typeof Results>;
export type AttributeEvaluation = z.infer<typeof AttributeEvaluation>;
export type Evaluation = z.infer<typeof Evaluation>;
export type PartEvaluation = z.infer<typeof PartEvaluation>;
export type CombinedEvaluation = z.infer<typeof CombinedEvaluation>;
export type RollForward = z.infer<typeof RollForward>;
export type FollowUp = z.infer<typeof FollowUp>;
export type Conclusion = z.infer<typeof Conclusion>;
export type LogEntry = z.infer<typeof LogEntry>;
export type MemoRecord = z.infer<typeof MemoRecord>;
export type CarriedForward = z.infer<typeof CarriedForward>;
export type ReviewNote = z.infer<typeof ReviewNote>;
export type NoteEvent = z.infer<typeof NoteEvent>;
export type Amendment = z.infer<typeof Amendment>;
export type Role = (typeof ROLES)[number];
export type ReviewSection = (typeof REVIEW_SECTIONS)[number];
export type LogChange = z.infer<typeof LogChange>;
export type Model = (typeof MODELS)[number];
export type Frequency = (typeof FREQUENCIES)[number];
export type Cause = (typeof CAUSES)[number];
export type Severity = (typeof SEVERITIES)[number];
export type FollowUpKind = (typeof FOLLOW_UP_KINDS)[number];

/** JSON Schema of the workpaper file, for other tools (written by `npm run schema`). */
export function workpaperJsonSchema(): unknown {
  return z.toJSONSchema(Workpaper, { io: 'input', unrepresentable: 'any' });
}
