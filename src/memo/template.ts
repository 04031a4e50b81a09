/**
 * The memo's wording: a folder of JSON files (templates/memo/ by default) that a firm can copy and
 * edit. Every heading, label and paragraph lives there; paragraphs carry placeholders such as
 * `{{entity}}` that the renderer fills from the workpaper. `**bold**` marks bold text.
 *
 * Layout of the folder:
 *   memo.json                    settings, title, headings, labels, paragraphs
 *   outcomes/supported.json      wording when the results support the planned reliance
 *   outcomes/not-supported.json  ... when they do not
 *   outcomes/non-statistical.json  caveats for a non-statistical test
 *   outcomes/haphazard.json      caveats for a haphazard selection
 *   outcomes/draft.json          marks of a memo of a test in progress
 *   styles.docx (optional)       a Word document whose styles the memo takes (fonts, headings)
 *
 * A template is validated when it is loaded: the shape with zod (every key present, no unknown
 * key), then every placeholder against the known list. A problem names the file, the key and the
 * placeholder, and is a TolrateInputError (exit 2).
 */
import { existsSync, statSync } from 'node:fs';
import { readRegularFile, readRegularText } from '../io/read.js';
import { jsonErrorWhere } from '../io/messages.js';
import { xmlProblem } from '../io/xml.js';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as z from 'zod';
import { editDistance } from '../util/text.js';
import { FileInputError, TolrateInputError } from '../errors.js';
import { CAUSE_LABELS, FOLLOW_UP_LABELS, INTENT_LABELS, PATTERN_LABELS, SEVERITY_LABELS } from '../control-test/labels.js';
import {
  CAUSES,
  FOLLOW_UP_KINDS,
  FREQUENCIES,
  INTENT,
  MODELS,
  NATURES,
  PATTERNS,
  SEVERITIES,
  STAGE_DECISIONS,
} from '../workpaper/schema.js';

/** The templates shipped with tolrate. */
export const DEFAULT_TEMPLATE_DIR = fileURLToPath(new URL('../../templates/memo/', import.meta.url));

/** Placeholders every paragraph may use, with what each is filled with. */
export const PLACEHOLDERS = {
  entity: 'the entity tested',
  period: 'the period tested, "start – end"',
  periodStart: 'first day of the period (YYYY-MM-DD)',
  periodEnd: 'last day of the period (YYYY-MM-DD)',
  reference: 'the workpaper reference',
  preparer: "the preparer's name",
  reviewer: "the reviewer's name",
  preparerDate: "the preparer's sign-off date, or the 'not yet signed' label",
  reviewerDate: "the reviewer's sign-off date, or the 'not yet signed' label",
  controlId: 'the control identifier',
  controlDescription: 'what the control does',
  controlObjective: 'the objective of the control',
  controlOwner: 'who performs or owns the control',
  controlFrequency: 'how often the control operates (label)',
  controlNature: 'manual, automated or IT-dependent manual (label)',
  keyControl: 'the yes/no label: is it a key control',
  attributeCount: 'the number of attributes tested',
  attributeIds: 'the attribute ids, comma separated',
  populationDescription: 'the population, in words',
  samplingUnit: 'the sampling unit',
  populationSource: 'the population file (relative to the workpaper) or the document-number ranges',
  populationCount: 'number of items (rows) in the population',
  populationTotal: 'total amount of the population, when recorded',
  ledgerCount: 'the ledger count the population was agreed to',
  ledgerTotal: 'the ledger total the population was agreed to',
  countDifference: 'population count minus ledger count',
  totalDifference: 'population total minus ledger total',
  tieOutExplanation: 'the explanation of tie-out differences',
  ledgerSource: 'where the ledger figures come from',
  validationAcceptedReason: 'why the preparer went on despite population-check problems',
  sha256: 'SHA-256 of the population file',
  firstKey: 'first key of the population',
  lastKey: 'last key of the population',
  populationSize: 'N, the population size the hypergeometric model uses',
  populationDeviations: '⌈TDR × N⌉, the tolerable deviations in the population (hypergeometric)',
  approachKind: 'statistical or non-statistical (label)',
  confidence: 'the planned confidence, e.g. 95%',
  risk: 'the allowed risk of overreliance, 1 − confidence, e.g. 5.0%',
  tolerableRate: "the test's tolerable deviation rate",
  expectedRate: 'the expected deviation rate',
  model: 'the model: binomial, hypergeometric or Poisson (label)',
  sampleSize: 'the sample size adopted',
  spares: 'the number of spares selected',
  rationale: "the preparer's rationale for the size, in words",
  plannedSize: 'the sample size the governing tolerable rate needs',
  plannedTolerableRate: 'the tolerable rate that governs the size',
  plannedExpectedDeviations: 'k_e at the planned size',
  plannedRisk: 'the risk of overreliance achieved at planning (rounded up)',
  fpcBinomialSize: 'the binomial size before the textbook finite population correction',
  fpcCorrectedSize: 'the size after the textbook finite population correction',
  planKind: 'the sampling plan adopted (label): one sample, one sample planned for both risks, or two stages',
  planFirstSize: 'two stages: n1, the items tested at the first stage',
  planFirstAcceptance: 'two stages: c1, the most first-stage deviations that still support reliance',
  planFirstRejection: 'two stages: r1, the first-stage deviations from which reliance is not supported',
  planSecondSize: 'two stages: n2, the items tested at the second stage when it is needed',
  planSecondAcceptance: 'two stages: c2, the most deviations in both stages together that still support reliance',
  planMaxSize: 'two stages: n1 + n2, the most items that may be tested',
  planSize: 'planned for both risks: n, the sample size',
  planAcceptance: 'planned for both risks: c, the most deviations that still support reliance',
  planOverrelianceRisk: "the plan's exact risk of overreliance at the tolerable rate (rounded up)",
  planUnderrelianceRisk: "the plan's exact risk of underreliance at the expected rate (rounded up)",
  planAllowedUnderrelianceRisk: 'the most risk of underreliance allowed to the plan',
  planTolerableRate: 'the tolerable rate the planned plan is computed at (the lowest that applies to an attribute, named when it is an attribute\'s own)',
  planExpectedItems: 'two stages: the items expected to be tested when the control works at the expected rate',
  planSecondStageChance: 'two stages: the chance, at the expected rate, that the second stage is needed (rounded up)',
  policyName: 'the firm policy used for a non-statistical size',
  policyFrequency: 'the control frequency the policy row applies to (label)',
  policyReliance: 'the reliance level the policy row applies to',
  policySize: 'the size the policy gives',
  policyAssumptions: "the policy's stated assumptions",
  selectionMethod: 'random, systematic or haphazard (label)',
  algorithm: 'the selection algorithm id, e.g. random-v1',
  algorithmDescription: 'what the selection algorithm does, as recorded with its id',
  seed: 'the selection seed',
  interval: 'the systematic interval',
  haphazardBy: 'who chose a haphazard selection',
  haphazardHow: 'how a haphazard selection was chosen',
  selectedAt: 'when the selection was made',
  itemsSelected: 'number of items selected (sample and spares)',
  sparesUsed: 'number of spares that replaced voided items',
  testedItems: 'number of items tested (voided items excluded)',
  totalDeviations: 'number of deviations over all attributes',
  attributesNotSupported: 'the attributes whose results do not support reliance',
  attributesAgainstEvidence: 'the attributes concluded as supporting reliance although the recorded rates or causes do not',
  controlConclusion: "the practitioner's conclusion on the control",
  severity: 'the severity classification (label)',
  followUpsSection: 'the number of the follow-up actions section',
  workpaperFile: 'the workpaper file name',
  reperformCommand: 'the re-performance command line',
  toolVersion: 'the version of tolrate',
  generatedAt: 'when the memo was written (UTC)',
  updatedAt: 'when the workpaper was last saved',
  workpaperId: 'the workpaper id',
  logEntries: 'the number of change-log entries',
  lastLogHash: 'the hash of the last change-log entry',
  contentHash: 'SHA-256 of the workpaper\'s content as it is now (without its log); equal to the state hash of the last log entry unless the file was changed outside tolrate',
  spreadDateColumn: 'the date column the population and the sample are counted by month from',
  spreadMonthsUnselected: 'the months of the period whose population holds items but from which no item was selected, comma separated',
  spreadMonthsEmpty: 'the months of the period in which the population holds no item, comma separated',
  spreadOutsideCount: 'the number of population items dated outside the period',
  spreadUndatedCount: 'the number of population items with no readable date',
  spreadSplitMonth: 'a test done in parts: the month the interim date falls inside (it belongs to both parts), when the interim date is not a month\'s last day',
  spreadPartsPending: 'a test done in parts: the part(s) whose sample is not selected yet, by the words of labels.spreadPartNames',
  spreadPartsNoTally: 'a test done in parts: the part(s) whose population has no rows by month recorded (a file written before they were)',
  spreadPartsNoDates: 'a test done in parts: the part(s) whose population carries no dates',
  spreadPartsNoPopulation: 'a test done in parts: the part(s) whose population is not recorded yet',
  spreadPartsCounted: 'a test done in parts: the part(s) whose population is counted by month',
  interimDate: 'a test done in parts: the interim date, the last day of the interim part (YYYY-MM-DD)',
  rollForwardStart: 'the first day of the roll-forward part (YYYY-MM-DD)',
  rollForwardEnd: 'the last day of the roll-forward part, the period end (YYYY-MM-DD)',
  rollForwardPopulationCount: 'number of items (rows) in the roll-forward population',
  rollForwardSha256: 'SHA-256 of the roll-forward population',
  rollForwardSampleSize: 'the sample size adopted for the roll-forward part',
  rollForwardRationale: 'why that roll-forward size, in words',
  rollForwardSeed: 'the seed of the roll-forward selection',
  rollForwardSparesUsed: 'number of roll-forward spares that replaced voided items',
  wholePeriodPopulation: 'the items of both parts\' populations together',
  wholePeriodSection: 'the number of the section with the results by part and for the whole period',
} as const;

/** Placeholders of the paragraphs written once per attribute (see ATTRIBUTE_SCOPED_KEYS). */
export const ATTRIBUTE_PLACEHOLDERS = {
  attributeId: 'the attribute id, e.g. A1',
  attributeDescription: 'what the attribute checks',
  attributeTolerableRate: "the attribute's tolerable rate",
  n: 'items tested for the attribute',
  deviations: 'deviations found for the attribute',
  sampleRate: 'the sample deviation rate',
  upperLimit: 'the upper deviation limit (rounded up)',
  achievedRisk: 'the risk of overreliance (rounded up)',
  decision: 'the decision label',
  extension: 'the additional items an extension needs (the single-stage figure)',
  extensionRisk: 'the exact risk of overreliance of extending by that figure after seeing the results (rounded up)',
  extensionRepeatedRisk: 'the same when the sample is extended again after each failure (rounded up)',
} as const;

export type PlaceholderName = keyof typeof PLACEHOLDERS;
export type AttributePlaceholderName = keyof typeof ATTRIBUTE_PLACEHOLDERS;

/** Keys (file, key) whose text is written once per attribute and may use ATTRIBUTE_PLACEHOLDERS. */
export const ATTRIBUTE_SCOPED_KEYS: ReadonlyArray<readonly [string, string]> = [
  ['memo.json', 'text.extension'],
];

const para = z.string();
const paras = z.union([z.string(), z.array(z.string()).min(1)]);

function labelsOf<T extends readonly string[]>(values: T) {
  return z.strictObject(Object.fromEntries(values.map((v) => [v, z.string()])) as Record<T[number], z.ZodString>);
}

const HEADINGS = [
  'objective', 'attributes', 'population', 'approach', 'selection', 'results', 'deviations', 'qualitative',
  'conclusion', 'followUps', 'severity', 'responsibility', 'signoff', 'fingerprint', 'spares', 'tieOut', 'sizes',
  'chart', 'appendixItems', 'appendixExact', 'appendixReperform', 'reperformCommand', 'reperformManual', 'formulas',
] as const;

const LABELS = [
  'entity', 'period', 'reference', 'control', 'preparedBy', 'reviewedBy', 'date', 'name', 'role', 'signature',
  'status', 'statusDraft', 'statusFinal', 'notSigned', 'notRecorded', 'notYetEvaluated', 'none', 'yes', 'no',
  'controlId', 'description', 'objective', 'owner', 'frequency', 'nature', 'keyControl', 'attribute',
  'attributeDescription', 'deviationDefinition', 'tolerableRate', 'populationDescription', 'populationSize', 'samplingUnit', 'source',
  'keyColumn', 'amountColumn', 'scannedAt', 'figure', 'population', 'ledger', 'difference', 'count', 'total',
  'explanation', 'ledgerSource', 'approachKind', 'confidence', 'allowedRisk', 'expectedRate', 'model', 'sampleSize',
  'spares', 'expectedDeviations', 'plannedRisk', 'policy', 'method', 'algorithm', 'seed', 'interval', 'starts',
  'selectedBy', 'how', 'selectedAt', 'sha256', 'rowCount', 'firstKey', 'lastKey', 'amountTotal', 'format', 'columns',
  'sparesUsed', 'replaces', 'voidReason', 'n', 'deviations', 'sampleRate', 'upperLimit', 'risk', 'decision',
  'deviationsInPopulation', 'itemKey', 'found', 'cause', 'intentional', 'pattern', 'question', 'answer',
  'intentionalFound', 'systemicFound', 'compensatingControls', 'notes', 'supportsReliance', 'reasoning', 'recordedConclusion', 'action',
  'actionOwner', 'due', 'items', 'classification', 'rationale', 'seq', 'row', 'itemRole', 'voidOrReplacement', 'attributesShown',
  'illustrative', 'evaluationFigures', 'planningFigures', 'decisionSupported', 'decisionNotSupported', 'decisionOverridden', 'decisionAgainstEvidence', 'resultConforms',
  'resultDeviation', 'resultMissing', 'resultVoid', 'spareUnused', 'replacedBy', 'replacing', 'legendSampleRate',
  'legendUpperLimit', 'legendExceeds', 'legendTolerable', 'page', 'of', 'generatedBy',
] as const;

const TEXTS = [
  'intro', 'objective', 'attributes', 'attributesMissing', 'population', 'populationMissing', 'tieOutAgreed',
  'tieOutDifferences', 'tieOutNone', 'validationOk', 'validationProblems', 'approachStatistical',
  'approachNonStatistical', 'approachMissing', 'sizeRuleBinomial', 'sizeRuleHypergeometric', 'sizeRulePoisson',
  'sizePlanned', 'fpc', 'policy', 'rationale', 'adopted', 'selectionRandom', 'selectionSystematic',
  'selectionHaphazard', 'selectionMissing', 'fingerprint', 'sparesNone', 'sparesUsed', 'resultsLead',
  'limitRuleBinomial', 'limitRuleHypergeometric', 'limitRulePoisson', 'decisionRule', 'resultsMissing',
  'resultsNotEvaluated', 'chartCaption', 'chartUnavailable', 'extension', 'deviationsLead', 'deviationsNone',
  'deviationsMissing', 'qualitative', 'qualitativeMissing', 'conclusionMissing',
  'followUpsNone', 'followUpsMissing', 'severity', 'severityMissing', 'severityNotNeeded', 'againstEvidence', 'caution', 'signoff', 'appendixItems',
  'appendixItemsMissing', 'appendixExact', 'reperform', 'reperformCommand', 'reperformHaphazard',
  'formulaSampleRate', 'formulaRiskBinomial', 'formulaRiskHypergeometric', 'formulaRiskPoisson',
  'formulaLimitBinomial', 'formulaLimitHypergeometric', 'formulaLimitPoisson', 'formulaSize', 'formulaDecision',
  'workpaperState',
] as const;

export const MemoFile = z.strictObject({
  settings: z.strictObject({
    paper: z.enum(['A4', 'Letter']),
    font: z.string().min(1),
    fontSize: z.number().min(7).max(14),
    numberHeadings: z.boolean(),
  }),
  title: para,
  subtitle: para,
  headings: z.strictObject({
    ...(Object.fromEntries(HEADINGS.map((k) => [k, para])) as Record<(typeof HEADINGS)[number], z.ZodString>),
    // Added after the first release: a firm's copy without it gets the default.
    appendixItemsList: para.default('A.1 Items and their results'),
    amendments: para.default('Amendments after sign-off'),
    appendixReview: para.default('Appendix C — Review notes'),
    appendixOc: para.default('Appendix D — Operating characteristic'),
    // Added with the spread of the sample over the period.
    spread: para.default('Spread of the sample over the period'),
    spreadChart: para.default('The months in a picture'),
    // Added with the roll-forward part (a test done at an interim date).
    rollForward: para.default('Roll-forward part'),
    wholePeriod: para.default('Results by part and for the whole period'),
    appendixItemsRollForward: para.default('Roll-forward items and their results'),
  }),
  labels: z.strictObject({
    ...(Object.fromEntries(LABELS.map((k) => [k, para])) as Record<(typeof LABELS)[number], z.ZodString>),
    frequencies: labelsOf(FREQUENCIES),
    natures: labelsOf(NATURES),
    approaches: labelsOf(['statistical', 'non-statistical'] as const),
    models: labelsOf(MODELS),
    methods: labelsOf(['random', 'systematic', 'haphazard'] as const),
    // The words for the recorded codes are the test's own (src/control-test/labels.ts); a firm's
    // template may give its own wording for any of these lists.
    causes: labelsOf(CAUSES).default(CAUSE_LABELS),
    intent: labelsOf(INTENT).default(INTENT_LABELS),
    patterns: labelsOf(PATTERNS).default(PATTERN_LABELS),
    severities: labelsOf(SEVERITIES).default(SEVERITY_LABELS),
    followUpKinds: labelsOf(FOLLOW_UP_KINDS).default(FOLLOW_UP_LABELS),
    roles: labelsOf(['sample', 'spare'] as const),
    // Added with the review: a firm's copy without them gets these.
    note: para.default('Note'),
    reviewSection: para.default('On'),
    thread: para.default('Thread'),
    why: para.default('Why'),
    field: para.default('Field'),
    before: para.default('Before'),
    after: para.default('After'),
    clearedSignoffs: para.default('Sign-offs cleared'),
    reviewerWarning: para.default('Warning recorded at review'),
    noteRaised: para.default('raised'),
    noteAnswered: para.default('answered'),
    noteAnsweredChanged: para.default('answered, with a change to the record'),
    noteReopened: para.default('re-opened'),
    noteCleared: para.default('cleared'),
    mustClear: para.default('must be cleared before sign-off'),
    underrelianceRisk: para.default('Risk of underreliance'),
    trueRate: para.default('True deviation rate'),
    chanceOfReliance: para.default('Chance of relying on the control'),
    // Added with the evidence per item: a firm's copy without them gets these.
    testedBy: para.default('Tested by'),
    dateTested: para.default('Date tested'),
    evidence: para.default('Evidence inspected'),
    itemDate: para.default('Date'),
    amount: para.default('Amount'),
    evidencePerItem: para.default('Who tested each item, when, and on what evidence'),
    // Added with the planned plans (two stages, both risks): a firm's copy without them gets these.
    plan: para.default('Sampling plan'),
    planKinds: labelsOf(['single', 'both-risks', 'two-stage'] as const).default({ single: 'One sample', 'both-risks': 'One sample planned for both risks', 'two-stage': 'Two stages' }),
    stage: para.default('Stage'),
    firstStage: para.default('First stage'),
    secondStage: para.default('Second stage'),
    stageReached: para.default('Stage reached'),
    firstSampleSize: para.default('First stage: items (n1)'),
    firstAcceptanceNumber: para.default('Relies with at most (c1)'),
    firstRejectionNumber: para.default('Does not rely from (r1)'),
    secondSampleSize: para.default('Second stage: items (n2)'),
    secondAcceptanceNumber: para.default('Relies with at most, both stages (c2)'),
    acceptanceNumber: para.default('Relies with at most (c)'),
    allowedUnderrelianceRisk: para.default('Risk of underreliance allowed'),
    expectedItems: para.default('Items expected at the expected rate'),
    secondStageChance: para.default('Chance the second stage is needed'),
    stageNotNeeded: para.default('not needed: the first stage decided'),
    stageDecisions: labelsOf(STAGE_DECISIONS).default({
      'accepted-at-first': 'Relied on at the first stage',
      'rejected-at-first': 'Not relied on at the first stage',
      'accepted-at-second': 'Relied on after the second stage',
      'rejected-at-second': 'Not relied on after the second stage',
    }),
    // Added with the spread of the sample over the period.
    month: para.default('Month'),
    populationItems: para.default('Population items'),
    sampleItems: para.default('Sample items'),
    populationShare: para.default('Share of population'),
    sampleShare: para.default('Share of sample'),
    spreadTotal: para.default('Total'),
    populationAmount: para.default('Population amount'),
    sampleAmount: para.default('Sample amount'),
    outsidePeriod: para.default('Outside the period'),
    undated: para.default('No readable date'),
    legendPopulationShare: para.default("Share of the population's items"),
    legendSampleShare: para.default("Share of the sample's items"),
    // Added with the roll-forward part.
    part: para.default('Part'),
    partInterim: para.default('Interim'),
    partRollForward: para.default('Roll-forward'),
    wholePeriod: para.default('Whole period'),
    interimDate: para.default('Interim date'),
    partDates: para.default('Dates'),
    conservativeBound: para.default('Conservative bound'),
    combinedLimit: para.default('Limit over both parts'),
    notComputed: para.default('not computed'),
    sizeRule: para.default('Size rule'),
    sizeRulePolicyProRata: para.default('Firm policy, pro rata to the months remaining'),
    sizeRuleStatistical: para.default('Statistical, on the roll-forward population'),
    // Added with the spread of a test in parts over the whole period.
    partBoth: para.default('Both (interim date inside)'),
    spreadPartNames: labelsOf(['interim', 'roll-forward'] as const).default({ interim: 'interim', 'roll-forward': 'roll-forward' }),
    spreadPartsAnd: para.default('and'),
  }),
  text: z.strictObject({
    ...(Object.fromEntries(TEXTS.map((k) => [k, para])) as Record<(typeof TEXTS)[number], z.ZodString>),
    reperformManual: paras,
    amendmentsNone: para.default('No change was made to the record after a sign-off.'),
    amendmentsLead: para.default('Each change made to the record after a sign-off: who made it, in which role, when and why, and every value before and after. A change to the record clears both sign-offs; the test is signed again afterwards.'),
    reviewNone: para.default('No review notes were raised.'),
    ocLead: para.default('For each attribute, the chance that the sample as adopted (n items, relying on the control with at most c deviations) leads to reliance, for each true deviation rate of the population (with a known population, the rate times N deviations, rounded up). At the tolerable rate this chance is the risk of overreliance; near the expected rate, one minus it is the risk of underreliance (which counts the expected deviations rounded down, so the two can differ slightly).'),
    ocTwoStage: para.default('Here the plan adopted has two stages: the chance of relying on the control counts both (relying at the first stage, or after the second when the first is inconclusive), and the second stage is drawn from the items the first left untested.'),
    ocCaption: para.default('The chance of relying on the control against the true deviation rate (dashed: the tolerable rate; dotted: the expected rate).'),
    ocNotStatistical: para.default('The sample is not statistical: it has no operating characteristic to show.'),
    appendixEvidence: para.default('For every item tested: who tested it, the date tested, the evidence inspected and the tester\'s note. An evidence file kept beside the workpaper is shown with the start of its SHA-256, which re-performance checks again.'),
    appendixEvidenceNone: para.default('No item has been tested yet.'),
    planTwoStage: para.default('The sample is planned in two stages, both selected in advance: {{planFirstSize}} items are tested first. With at most {{planFirstAcceptance}} deviation(s) the results support reliance; with {{planFirstRejection}} or more they do not. Otherwise {{planSecondSize}} more items are tested, and the results support reliance with at most {{planSecondAcceptance}} deviation(s) in all {{planMaxSize}}. Computed exactly over both stages, the plan\'s risk of overreliance at the tolerable rate of {{planTolerableRate}} is {{planOverrelianceRisk}} and its risk of underreliance at the expected rate {{planUnderrelianceRisk}} (allowed: {{planAllowedUnderrelianceRisk}}, that of one sample). At the expected rate {{planExpectedItems}} items are tested on average, and the second stage is needed with a chance of {{planSecondStageChance}}. The decision is fixed by the plan before any item is tested, so no extension follows it.'),
    planBothRisks: para.default('The sample is planned for both risks: {{planSize}} items, supporting reliance with at most {{planAcceptance}} deviation(s). Its risk of overreliance at the tolerable rate of {{planTolerableRate}} is {{planOverrelianceRisk}} and its risk of underreliance (the chance of not relying on a control that works at the expected rate) {{planUnderrelianceRisk}}, within the {{planAllowedUnderrelianceRisk}} the practitioner accepted.'),
    supportedTwoStage: para.default('For every attribute the results meet the two-stage plan\'s rule for reliance, stage by stage as set out above; the plan\'s risk of overreliance, exact over both stages, is at most {{risk}}. Under the plan the decision rests on the count of deviations at each stage, not on the upper deviation limit of the items tested.'),
    resultsTwoStage: para.default('Under the two-stage plan the decision follows the plan stage by stage (below). The risk of overreliance shown above is the plan\'s, exact over both stages; the sample deviation rate and the upper deviation limit are those of the items tested, shown for information.'),
    reviewLead: para.default('The reviewer\'s notes, each with its whole thread: raised, answered, re-opened and cleared, with who and when.'),
    // Added with the spread of the sample over the period.
    spreadLead: para.default("The population and the sample by month of the column {{spreadDateColumn}}, for each month of the period {{period}}: the items each month holds, their amount, and each month's share of all the items. The population's months were counted when it was read; the sample's come from the dates of the items selected (spares not included; under a two-stage plan, second-stage items only once the first stage calls for them)."),
    spreadUnselected: para.default('No item was selected from these months, in which the population holds items: {{spreadMonthsUnselected}}. Whether that matters for the test is for the practitioner to judge.'),
    spreadAllSelected: para.default('Every month of the period in which the population holds items has at least one item selected.'),
    spreadEmpty: para.default('The population holds no item in these months of the period: {{spreadMonthsEmpty}}.'),
    spreadApart: para.default('Population items dated outside the period ({{spreadOutsideCount}}) and with no readable date ({{spreadUndatedCount}}) are counted on their own rows.'),
    spreadCaption: para.default("Each month's share of the population's items beside its share of the sample's items."),
    spreadNoDates: para.default('The population is a list of document numbers, which carry no dates, so the memo cannot show how the sample spreads over the period.'),
    spreadNoDateColumn: para.default('No date column was named for the population, so the memo cannot show how the sample spreads over the period.'),
    spreadNoSelection: para.default('The population by month is recorded; the sample beside it is shown once the items are selected.'),
    // Added with the spread of a test in parts over the whole period.
    spreadParts: para.default('The test was done in parts, so the table covers the whole period: each month\'s population is the interim and the roll-forward populations added, and its sample the sample items of both selections added. The column Part says which part each month belongs to: the interim part runs from {{periodStart}} to {{interimDate}}, the roll-forward part from {{rollForwardStart}} to {{rollForwardEnd}}.'),
    spreadSplit: para.default('The interim date {{interimDate}} falls inside {{spreadSplitMonth}}, so that month belongs to both parts: its figures are the two parts\' added.'),
    spreadPartPending: para.default('The {{spreadPartsPending}} sample is not selected yet: the {{spreadPartsPending}} months show the population only (– in the sample columns), and none of them is named as a month with no item selected.'),
    spreadAllSelectedSoFar: para.default('Every month of the parts selected so far in which the population holds items has at least one item selected.'),
    spreadPartNoTally: para.default('The {{spreadPartsNoTally}} population\'s rows by month were not recorded (its file was written before they were): the population figures are the {{spreadPartsCounted}} part\'s alone (– where a month is only the {{spreadPartsNoTally}} part\'s), and the {{spreadPartsNoTally}} sample is counted by the dates of its items.'),
    spreadPartNoDates: para.default('The {{spreadPartsNoDates}} population carries no dates (a list of numbers, or no date column named), so the {{spreadPartsNoDates}} part is not in the table: its figures are the {{spreadPartsCounted}} part\'s alone.'),
    spreadPartNoPopulation: para.default('The {{spreadPartsNoPopulation}} population is not recorded yet: the {{spreadPartsNoPopulation}} months show nothing of it (– in the table).'),
    spreadCaptionParts: para.default('The months run over the whole period, both parts together; the interim part ends on {{interimDate}}.'),
    // Added with the roll-forward part (a test done at an interim date).
    interimPartNote: para.default('This test was done in two parts. The population and selection in this section are those of the interim part, from {{periodStart}} to {{interimDate}}; the roll-forward part, from {{rollForwardStart}} to {{rollForwardEnd}}, has its own section.'),
    rollForwardLead: para.default('The roll-forward part covers {{rollForwardStart}} to {{rollForwardEnd}}, the rest of the period after the interim date {{interimDate}}. It has its own population, agreed to the ledger and fingerprinted, its own sample size and its own selection with its own seed; its items were tested and recorded like the interim ones. The test\'s attributes, deviation definitions, confidence and tolerable rates apply to both parts.'),
    rollForwardSize: para.default('Sample size of the roll-forward part: **{{rollForwardSampleSize}}** items. {{rollForwardRationale}}'),
    resultsParts: para.default('The test was done in two parts: n and the deviations are those of both parts together, the upper deviation limit is the limit over both parts and the risk of overreliance the whole-period risk at the tolerable rate (the split of the deviations between the parts taken at its worst). Each part\'s own figures are in section {{wholePeriodSection}}.'),
    rollForwardMissing: para.default('The roll-forward part is not planned yet.'),
    rollForwardResultsMissing: para.default('No roll-forward results are recorded yet.'),
    wholePeriodLead: para.default('For each attribute, the figures of each part (its population N, the items tested n, the deviations k, the sample deviation rate and the part\'s own upper deviation limit at {{confidence}} confidence) and of the whole period. The whole-period upper deviation limit is computed exactly over both parts: it is the largest number of deviations in the whole population of {{wholePeriodPopulation}} items that is still consistent, at {{confidence}} confidence, with the results of both samples, whatever the split of those deviations between the interim and the roll-forward populations (the split least favourable to the control is taken). Beside it is the conservative bound: the two parts\' own limits, each at the higher confidence that keeps the overall confidence (Bonferroni), added together; it is always at least as wide.'),
    wholePeriodDecision: para.default('The whole-period decision compares the limit over both parts with the tolerable rate: the results support the planned reliance for the period when it is below the tolerable number of deviations in the whole population. Where the exact limit cannot be computed (the search is too large), the conservative bound is used for the decision and the table says so.'),
    wholePeriodJudgement: para.default('These figures are computed. Whether the interim results, the roll-forward results and the limit over the whole period support reliance on the control for the period is the practitioner\'s judgement, under the auditing standards and the firm\'s methodology that apply.'),
    wholePeriodMissing: para.default('The whole period is evaluated once both parts are recorded.'),
    appendixItemsRollForward: para.default('The items of the roll-forward part ({{rollForwardStart}} to {{rollForwardEnd}}), in draw order, each voided item followed by the spare that replaced it, with their results.'),
    appendixItemsInterim: para.default('Interim part, {{periodStart}} to {{interimDate}}:'),
    reperformRollForward: para.default('The roll-forward part is re-performed the same way: its population ({{rollForwardPopulationCount}} units, SHA-256 {{rollForwardSha256}}) is read again, its size recomputed by its rule, its selection drawn again from its own seed {{rollForwardSeed}}, and its results checked against its worklist; then each part\'s figures and the whole-period limit over both parts are recomputed from the recorded results. {{reperformCommand}} does all of it.'),
  }),
});

const Verdict = z.strictObject({ verdict: para, resultsSummary: para });
const Caveat = z.strictObject({ resultsNote: para, conclusionNote: para, figuresLabel: para });

export const OUTCOME_FILES = {
  supported: Verdict,
  'not-supported': Verdict,
  'non-statistical': Caveat.extend({ approachNote: para }),
  haphazard: Caveat.extend({ selectionNote: para }),
  draft: z.strictObject({ headerMark: para, banner: para, verdict: para, reasonsLead: para.default('Not final because:') }),
} as const;

export type MemoWording = z.infer<typeof MemoFile>;
export interface MemoTemplate {
  dir: string;
  memo: MemoWording;
  outcomes: {
    supported: z.infer<typeof Verdict>;
    'not-supported': z.infer<typeof Verdict>;
    'non-statistical': z.infer<(typeof OUTCOME_FILES)['non-statistical']>;
    haphazard: z.infer<(typeof OUTCOME_FILES)['haphazard']>;
    draft: z.infer<(typeof OUTCOME_FILES)['draft']>;
  };
  /** word/styles.xml of the firm's styles.docx, when the folder has one. */
  externalStyles?: string;
}

/** One problem found in a template. */
export interface TemplateProblem {
  file: string;
  key: string;
  message: string;
  /** The offending placeholder, when the problem is one. */
  placeholder?: string;
}

/** A memo template that cannot be used; `problems` lists every one found, file and key first. */
export class TemplateError extends TolrateInputError {
  readonly dir: string;
  readonly problems: TemplateProblem[];
  constructor(dir: string, problems: TemplateProblem[]) {
    const first = problems[0];
    super(
      problems.length === 1 && first
        ? `Memo template ${dir}: ${first.file}, ${first.key}: ${first.message}`
        : `Memo template ${dir} has ${problems.length} problems:`,
      'TEMPLATE',
      problems.length === 1 ? [] : problems.slice(0, 30).map((p) => `${p.file}, ${p.key}: ${p.message}`),
    );
    this.name = 'TemplateError';
    this.dir = dir;
    this.problems = problems;
  }
}

const PLACEHOLDER_RE = /\{\{([^{}]*)\}\}/g;

function keyPath(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? String(p) : `.${String(p)}`;
  return s || '(top level)';
}


function suggestion(name: string, known: readonly string[]): string {
  let best = '';
  let bestD = Infinity;
  for (const k of known) {
    const d = editDistance(name.toLowerCase(), k.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = k;
    }
  }
  return bestD <= Math.max(2, Math.floor(name.length / 3)) ? ` Did you mean {{${best}}}?` : '';
}

/** The placeholders used in a text, in order. */
export function placeholdersIn(text: string): string[] {
  return [...text.matchAll(PLACEHOLDER_RE)].map((m) => m[1]!.trim());
}

/** Check every placeholder of a parsed template file against the known lists. */
export function checkPlaceholders(file: string, data: unknown): TemplateProblem[] {
  const problems: TemplateProblem[] = [];
  const global = Object.keys(PLACEHOLDERS);
  const scoped = Object.keys(ATTRIBUTE_PLACEHOLDERS);
  const walk = (v: unknown, path: Array<string | number>) => {
    if (typeof v === 'string') {
      const key = keyPath(path);
      const topKey = keyPath(path.filter((p) => typeof p === 'string'));
      const attributeScope = ATTRIBUTE_SCOPED_KEYS.some(([f, k]) => f === file && k === topKey);
      const allowed = attributeScope ? [...global, ...scoped] : global;
      for (const name of placeholdersIn(v)) {
        if (allowed.includes(name)) continue;
        const why = scoped.includes(name)
          ? ` is known only in the per-attribute texts (${ATTRIBUTE_SCOPED_KEYS.filter(([f]) => f === 'memo.json').map(([, k]) => k).join(', ')}).`
          : ` is not a known placeholder.${suggestion(name, allowed)}`;
        problems.push({ file, key, placeholder: name, message: `{{${name}}}${why}` });
      }
      const rest = v.replace(PLACEHOLDER_RE, '');
      if (rest.includes('{{') || rest.includes('}}')) {
        problems.push({ file, key, message: 'has an unbalanced "{{" or "}}"; a placeholder is written {{name}}.' });
      }
    } else if (Array.isArray(v)) {
      v.forEach((x, i) => walk(x, [...path, i]));
    } else if (v && typeof v === 'object') {
      for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
    }
  };
  walk(data, []);
  return problems;
}

function readJson(dir: string, file: string, problems: TemplateProblem[]): unknown {
  const path = join(dir, file);
  let raw: string;
  try {
    raw = readRegularText(path, file);
  } catch (e) {
    const code = (e as { errno?: string }).errno;
    problems.push({ file, key: '(file)', message: code === 'ENOENT' ? 'is missing from the template folder (copy it from the default templates).' : `cannot be read: ${(e as Error).message}` });
    return undefined;
  }
  try {
    return JSON.parse(raw) as unknown;
  } catch (e) {
    problems.push({ file, key: '(file)', message: `is not valid JSON: ${jsonErrorWhere(e, raw)}.` });
    return undefined;
  }
}

function valueAt(data: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = data;
  for (const p of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[p];
  }
  return v;
}

function checkShape<T>(file: string, schema: z.ZodType<T>, data: unknown, problems: TemplateProblem[]): T | undefined {
  if (data === undefined) return undefined;
  const r = schema.safeParse(data);
  if (r.success) return r.data;
  for (const issue of r.error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const k of issue.keys) {
        problems.push({ file, key: keyPath([...issue.path, k]), message: 'is not a key the memo uses (misspelt, or from another version?).' });
      }
    } else if (issue.code === 'invalid_type' && valueAt(data, issue.path) === undefined) {
      problems.push({ file, key: keyPath(issue.path), message: 'is missing (copy it from the default templates).' });
    } else {
      problems.push({ file, key: keyPath(issue.path), message: issue.message });
    }
  }
  return undefined;
}

/** Read word/styles.xml out of a .docx (the firm's styles). */
async function readStylesDocx(path: string): Promise<string> {
  const { default: JSZip } = await import('jszip');
  let zip: Awaited<ReturnType<typeof JSZip.loadAsync>>;
  const data = readRegularFile(path, 'The styles file');
  try {
    zip = await JSZip.loadAsync(data);
  } catch {
    throw new FileInputError(path, `${path} is not a Word document (.docx): it is not a zip file. Save the styles from Word as a .docx.`);
  }
  const styles = zip.file('word/styles.xml');
  if (!styles) throw new FileInputError(path, `${path} has no styles (word/styles.xml is missing).`);
  let xml: string;
  try {
    xml = await styles.async('string');
  } catch {
    throw new FileInputError(path, `${path} is damaged: word/styles.xml cannot be unpacked. Save the styles from Word as a .docx again.`);
  }
  const problem = xmlProblem(xml, 'word/styles.xml');
  if (problem) throw new FileInputError(path, `${path} is damaged: ${problem}. Save the styles from Word as a .docx again.`);
  return xml;
}

const cache = new Map<string, MemoTemplate>();

/**
 * Load and validate a memo template folder (default: the templates shipped with tolrate).
 * Throws a TemplateError naming every problem (file, key, placeholder).
 */
export async function loadTemplate(dir: string = DEFAULT_TEMPLATE_DIR): Promise<MemoTemplate> {
  const abs = resolve(dir);
  if (abs === resolve(DEFAULT_TEMPLATE_DIR) && cache.has(abs)) return cache.get(abs)!;
  if (!existsSync(abs) || !statSync(abs).isDirectory()) {
    throw new FileInputError(abs, `No memo template folder at ${dir}. Copy templates/memo from tolrate and point --template at the copy.`);
  }
  const problems: TemplateProblem[] = [];
  const memoRaw = readJson(abs, 'memo.json', problems);
  const memo = checkShape('memo.json', MemoFile, memoRaw, problems);
  if (memoRaw !== undefined) problems.push(...checkPlaceholders('memo.json', memoRaw));
  const outcomes: Record<string, unknown> = {};
  for (const [name, schema] of Object.entries(OUTCOME_FILES)) {
    const file = `outcomes/${name}.json`;
    const raw = readJson(abs, file, problems);
    outcomes[name] = checkShape(file, schema as z.ZodType<unknown>, raw, problems);
    if (raw !== undefined) problems.push(...checkPlaceholders(file, raw));
  }
  if (problems.length > 0) throw new TemplateError(abs, problems);
  const t: MemoTemplate = { dir: abs, memo: memo!, outcomes: outcomes as unknown as MemoTemplate['outcomes'] };
  const stylesPath = join(abs, 'styles.docx');
  if (existsSync(stylesPath)) t.externalStyles = await readStylesDocx(stylesPath);
  if (abs === resolve(DEFAULT_TEMPLATE_DIR)) cache.set(abs, t);
  return t;
}

/** Fill the placeholders of a text. A placeholder without a value gets `missing`. */
export function fill(text: string, values: Readonly<Record<string, string | undefined>>, missing: string): string {
  return text.replace(PLACEHOLDER_RE, (_, name: string) => {
    const v = values[name.trim()];
    return v === undefined || v === '' ? missing : v;
  });
}
