/**
 * The roll-forward part of a test done at an interim date: the interim date, the roll-forward's
 * population, its size (the firm policy pro rata to the months remaining, or statistically on the
 * roll-forward population, as the test's approach), its selection and fieldwork sheet, and its
 * results. The population, selection and recording questions are the plan's and record's own,
 * asked on the part's view of the workpaper (control-test/parts.ts) through `partSession`; their
 * ids carry the prefix `rollforward.` (`rollforward.plan.population.kind`,
 * `rollforward.record.item.3.A1.result`), so the two parts never share an answer.
 */
import { basename, extname } from 'node:path';
import type { Workpaper, RollForward } from '../workpaper/schema.js';
import { dayAfter, firstOpen, twoStageOf, monthsTouched, partPeriod, partView, PLAN_STEPS, proRataSize, STEP_LABELS, withPartView } from '../control-test/index.js';
import { TolrateInputError } from '../errors.js';
import { int, pctPlain, pctUp } from '../util/format.js';
import { PERIOD_FREQUENCIES } from '../population/index.js';
import { WORKPAPER_SUFFIX } from '../workpaper/file.js';
import type { Asker, ConfirmQuestion, SelectQuestion, TextQuestion } from './asker.js';
import { AnswerError } from './parse.js';
import { askPopulation } from './plan-population.js';
import { askSizeChoice, modelWords, sizesFor } from './plan-approach.js';
import { askSelection } from './plan-selection.js';
import type { Session } from './session.js';
import { table, wrap } from './show.js';

/** Every question asked through it gets the prefix, so the roll-forward's answers are its own. */
class PrefixedAsker implements Asker {
  constructor(private readonly inner: Asker, private readonly prefix: string) {}
  text<T>(q: TextQuestion<T>): Promise<T> {
    return this.inner.text({ ...q, id: `${this.prefix}${q.id}` });
  }
  select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    return this.inner.select({ ...q, id: `${this.prefix}${q.id}` });
  }
  confirm(q: ConfirmQuestion): Promise<boolean> {
    return this.inner.confirm({ ...q, id: `${this.prefix}${q.id}` });
  }
}

/**
 * The session seen through the roll-forward part: its `wp` is the part's view (reading) and puts
 * a changed view back into the workpaper (writing); saves, sign-off questions and the step in
 * progress are the session's own; questions carry the `rollforward.` prefix.
 */
export function partSession(s: Session): Session {
  const ps = Object.create(s) as Session;
  Object.defineProperties(ps, {
    wp: {
      get: () => partView(s.wp, 'roll-forward'),
      set: (v: Workpaper) => {
        s.wp = withPartView(s.wp, 'roll-forward', v);
      },
    },
    currentStep: { get: () => s.currentStep, set: (v: string | undefined) => { s.currentStep = v; } },
    focusItem: { get: () => s.focusItem, set: (v: string | undefined) => { s.focusItem = v; } },
    asker: { value: new PrefixedAsker(s.asker, 'rollforward.') },
    save: { value: (step: string, by?: string) => s.save(step.startsWith('rollforward.') ? step : `rollforward.${step}`, by) },
    beforeEdit: { value: (what: string) => s.beforeEdit(what) },
  });
  return ps;
}

/** The roll-forward's fieldwork sheet: `NAME.rollforward.fieldwork.csv` beside `NAME.tolrate.json`. */
export function rollForwardSheetName(workpaperPath: string): string {
  const b = basename(workpaperPath);
  const stem = b.endsWith(WORKPAPER_SUFFIX) ? b.slice(0, -WORKPAPER_SUFFIX.length) : b.slice(0, b.length - extname(b).length);
  return `${stem}.rollforward.fieldwork.csv`;
}

function lastDayOfMonth(y: number, m: number): string {
  return new Date(Date.UTC(y, m, 0)).toISOString().slice(0, 10);
}

/**
 * The interim date offered: the end of an interim periods population; else the end of the last
 * month in which the interim population holds items (its month tally); else the last day of the
 * month before the interim selection was made; else the last day of the period's ninth month
 * (interim testing is usually done about three months before the period end: common practice,
 * no single source). Always inside the period, before its last day.
 */
export function defaultInterimDate(wp: Workpaper): string {
  const e = wp.engagement!;
  const inside = (d: string) => d >= e.periodStart && d < e.periodEnd;
  const src = wp.population?.source;
  if (src?.kind === 'periods' && inside(src.end)) return src.end;
  // A file with a date column: the end of the last month in which the interim population holds items.
  const held = (wp.population?.fingerprint.monthTally?.months ?? []).filter((x) => x.count > 0).map((x) => x.month).sort();
  const lastHeld = held[held.length - 1];
  if (lastHeld) {
    const [y, m] = lastHeld.split('-').map(Number) as [number, number];
    const d = lastDayOfMonth(y, m);
    if (inside(d)) return d;
  }
  const sel = wp.selection?.selectedAt;
  if (sel) {
    const [y, m] = sel.slice(0, 7).split('-').map(Number) as [number, number];
    const d = lastDayOfMonth(y, m - 1);
    if (inside(d)) return d;
  }
  const [y, m] = e.periodStart.split('-').map(Number) as [number, number];
  const ninth = lastDayOfMonth(y, m + 8);
  if (inside(ninth)) return ninth;
  // A short period: the day before its last.
  return new Date(Date.parse(`${e.periodEnd}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
}

/** Why a date cannot be the interim date of this test, or undefined when it can. */
export function interimDateProblem(wp: Workpaper, date: string): string | undefined {
  const e = wp.engagement!;
  if (date < e.periodStart || date > e.periodEnd) return `${date} is outside the period ${e.periodStart} to ${e.periodEnd}. The interim date is the last day of the interim part, inside the period.`;
  if (date === e.periodEnd) return `${date} is the period end: nothing would be left to roll forward. Give the last day of the interim part, before ${e.periodEnd}.`;
  const src = wp.population?.source;
  // The interim population's own months (counted when it was read): none may lie after the interim date's month.
  const tally = wp.population?.fingerprint.monthTally;
  if (tally && src?.kind !== 'periods') {
    const after = tally.months.filter((x) => x.count > 0 && x.month > date.slice(0, 7));
    if (after.length > 0) {
      const n = after.reduce((t, x) => t + x.count, 0);
      const last = after[after.length - 1]!.month;
      return `the interim population holds ${n.toLocaleString('en-US')} item(s) dated after ${date.slice(0, 7)} (column ${tally.dateColumn}, up to ${last}), counted when it was read: they would belong to the roll-forward part too. The interim date is the last day the interim population covers: give a date in ${last} or later, or plan the interim population again for the interim dates.`;
    }
  }
  // The interim sample's own dates, when the population has a date column: none may fall after the interim date.
  if ((src?.kind === 'csv' || src?.kind === 'xlsx') && src.dateColumn) {
    const dates = (wp.selection?.items ?? []).map((i) => i.values[src.dateColumn!] ?? '').filter((d) => /^\d{4}-\d{2}-\d{2}$/.test(d)).sort();
    const last = dates[dates.length - 1];
    if (last && last > date) {
      return `the interim sample has items dated up to ${last} (column ${src.dateColumn}), after ${date}. The interim date is the last day the interim population covers: give ${last} or later, or plan the interim population again for the interim dates.`;
    }
  }
  if (src?.kind === 'periods' && src.end !== date) {
    return (
      `the interim population is the ${src.frequency} occurrences from ${src.start} to ${src.end}, so the interim part ends on ${src.end}. ` +
      `Give ${src.end}${src.end === e.periodEnd ? ' (not possible: it is the period end)' : ''}, or plan the interim population again for the interim dates (\`tolrate plan FILE\`, change: Population) after setting the interim date.`
    );
  }
  return undefined;
}

/** The dates step: the interim date (the last day of the interim part), and from it the roll-forward's dates. */
export async function askRollForwardPeriod(s: Session): Promise<Pick<RollForward, 'interimDate' | 'periodStart' | 'periodEnd'>> {
  const e = s.wp.engagement;
  if (!e) throw new TolrateInputError('The engagement and its period are not planned yet: start with `tolrate plan FILE`.', 'PLAN_INCOMPLETE');
  const old = s.wp.rollForward;
  s.heading('Interim date and roll-forward');
  s.print(
    ...wrap(
      `The test is done in two parts: the interim part, from ${e.periodStart} to the interim date (the population, selection and results planned so far), ` +
        `and the roll-forward part, from the day after the interim date to the period end ${e.periodEnd}, with its own population, sample and results. ` +
        'Each part is evaluated on its own, and the whole period with a limit over both parts. The tool computes; whether the interim results and the roll-forward support reliance for the period is your judgement under the standards and methodology that apply.',
      92,
      '  ',
    ),
  );
  const interimDate = await s.asker.text({
    id: 'rollforward.interimDate',
    message: 'Interim date: the last day of the interim part (YYYY-MM-DD)',
    help: `A date inside the period ${e.periodStart} to ${e.periodEnd}, before its last day.`,
    default: old?.interimDate ?? defaultInterimDate(s.wp),
    parse: (t) => {
      const v = t.trim();
      const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(v);
      const at = Date.parse(`${v}T00:00:00Z`);
      if (!m || Number.isNaN(at) || new Date(at).toISOString().slice(0, 10) !== v) throw new AnswerError(`"${v}" is not a date written YYYY-MM-DD (e.g. ${defaultInterimDate(s.wp)}).`);
      const why = interimDateProblem(s.wp, v);
      if (why) throw new AnswerError(`The interim date: ${why}`);
      return v;
    },
  });
  const periodStart = dayAfter(interimDate);
  s.print(`  Interim part ${e.periodStart} to ${interimDate}; roll-forward part ${periodStart} to ${e.periodEnd} (${monthsTouched(periodStart, e.periodEnd)} month(s)).`);
  return { interimDate, periodStart, periodEnd: e.periodEnd };
}

/** The roll-forward's population: the plan's population questions, on the roll-forward's dates. */
export async function askRollForwardPopulation(s: Session): Promise<NonNullable<RollForward['population']>> {
  const ps = partSession(s);
  const interimKind = s.wp.population?.source.kind;
  const freq = s.wp.control?.frequency;
  const periodic = freq !== undefined && (PERIOD_FREQUENCIES as readonly string[]).includes(freq);
  const period = partPeriod(ps.wp, 'interim')!;
  // The interim part's answers that usually hold for the roll-forward too are offered as its defaults.
  const ip = s.wp.population;
  if (ip && !s.wp.rollForward?.population) {
    const src = ip.source;
    s.offerDefaults({
      'rollforward.plan.population.samplingUnit': ip.samplingUnit,
      ...(src.kind === 'csv' || src.kind === 'xlsx'
        ? { 'rollforward.plan.population.keyColumn': src.keyColumn, ...(src.amountColumn ? { 'rollforward.plan.population.amountColumn': src.amountColumn } : {}), ...(src.dateColumn ? { 'rollforward.plan.population.dateColumn': src.dateColumn } : {}) }
        : {}),
      ...(src.kind === 'periods' ? { 'rollforward.plan.population.frequency': src.frequency } : {}),
    });
  }
  ps.print('', `  The roll-forward population: every sampling unit from ${period.start} to ${period.end}${periodic ? ` (for a ${freq} control, its occurrences in those dates are the natural population)` : ''}.`);
  return askPopulation(ps, { defaultKind: periodic && interimKind !== 'csv' && interimKind !== 'xlsx' ? 'periods' : (interimKind ?? 'csv'), heading: 'Roll-forward population' });
}

/**
 * The roll-forward's size, as the test's approach: statistical — the test's confidence, rates
 * and model on the roll-forward population; non-statistical — the policy's size for the period
 * pro rata to the months remaining, rounded up (common practice, no single source). The
 * practitioner accepts it or enters another size with a reason.
 */
export async function askRollForwardSize(s: Session): Promise<Pick<RollForward, 'sampleSize' | 'rationale' | 'sizing'>> {
  const ap = s.wp.approach;
  const rf = s.wp.rollForward!;
  const pop = rf.population;
  if (!ap || !pop || !s.wp.attributes) throw new TolrateInputError('Plan the approach and the roll-forward population first.', 'PLAN_INCOMPLETE');
  const ps = partSession(s);
  const N = pop.fingerprint.rowCount;
  const old = ps.wp.approach && rf.sampleSize !== undefined ? { ...ap, sampleSize: rf.sampleSize } : undefined;
  ps.heading('Roll-forward sample size');
  if (ap.kind === 'statistical') {
    const plan = { confidence: ap.confidence, tolerableRate: ap.tolerableRate, expectedRate: ap.expectedRate, model: ap.model, populationSize: N };
    const sizes = sizesFor(s.wp.attributes, plan);
    const top = sizes.reduce((m, x) => (x.result.sampleSize > m.result.sampleSize ? x : m), sizes[0]!);
    const n = Math.min(top.result.sampleSize, N);
    ps.print(...table(['Attribute', 'Tolerable', 'Size', 'k_e', 'Risk at k_e'], sizes.map((x) => [x.attribute.id, pctPlain(x.tolerableRate), int(x.result.sampleSize), String(x.result.expectedDeviations), pctUp(x.result.achievedRisk)])));
    const why =
      `Statistical sample for the roll-forward part, sized with the test's own parameters on the roll-forward population: ` +
      `${int(top.result.sampleSize)} is the smallest sample for which finding k_e = ${top.result.expectedDeviations} deviation(s) leaves the risk of overreliance at ${pctUp(top.result.achievedRisk)}, ` +
      `within the ${pctPlain(1 - ap.confidence)} allowed at ${pctPlain(ap.confidence)} confidence against a tolerable rate of ${pctPlain(top.tolerableRate)} (${modelWords(ap.model, N)}).` +
      (n < top.result.sampleSize ? ` The roll-forward population has only ${int(N)} items: every item is tested.` : '');
    ps.print('', ...wrap(why, 92, '  '), '');
    const chosen = await sizeChoice(ps, n, N, 'computation', old, "The roll-forward uses the test's own parameters; to change them, change the approach of the test (`tolrate plan FILE`, change: Approach and sample size), which clears the roll-forward's size.");
    const rationale = why + (chosen.size !== n ? ` The practitioner adopted ${int(chosen.size)} items instead of ${int(n)}: ${chosen.reason ?? ''}.` : '');
    return { sampleSize: chosen.size, rationale, sizing: { kind: 'statistical', computed: n, ...(chosen.reason ? { reason: chosen.reason } : {}) } };
  }
  const e = s.wp.engagement!;
  const policySize = ap.policy?.size ?? ap.sampleSize;
  const periodMonths = monthsTouched(e.periodStart, e.periodEnd);
  const rfMonths = monthsTouched(rf.periodStart, rf.periodEnd);
  const n = proRataSize(policySize, periodMonths, rfMonths, N);
  const why =
    `Non-statistical sample for the roll-forward part: the ${ap.policy ? `policy's ("${ap.policy.name}")` : "interim part's"} ${int(policySize)} items for the period, ` +
    `pro rata to the ${rfMonths} month(s) remaining of ${periodMonths}: ⌈${int(policySize)} × ${rfMonths} / ${periodMonths}⌉ = ${int(n)}` +
    `${n === N ? ` (the roll-forward population has ${int(N)} items)` : ''}, rounded up so that the roll-forward is not under-tested. ` +
    'Sampling risk is not quantified for a non-statistical sample; any deviation found usually means the control cannot be relied on as planned without a larger sample.';
  ps.print(...wrap(why, 92, '  '), '');
  const chosen = await sizeChoice(ps, n, N, 'firm policy', old, "The roll-forward follows the test's policy and reliance; to change them, change the approach of the test (`tolrate plan FILE`, change: Approach and sample size), which clears the roll-forward's size.");
  const rationale = why + (chosen.size !== n ? ` The practitioner adopted ${int(chosen.size)} items: ${chosen.reason ?? ''}.` : '');
  return {
    sampleSize: chosen.size,
    rationale,
    sizing: { kind: 'policy-pro-rata', computed: n, policySize, periodMonths, rollForwardMonths: rfMonths, ...(chosen.reason ? { reason: chosen.reason } : {}) },
  };
}

/** The size question; "change the parameters" is answered by saying where they are changed, then asked again. */
async function sizeChoice(ps: Session, n: number, N: number, what: string, old: Parameters<typeof askSizeChoice>[4], where: string): Promise<{ size: number; reason?: string }> {
  for (;;) {
    const chosen = await askSizeChoice(ps, n, N, what, old);
    if (chosen.size > 0) return chosen;
    ps.print(...wrap(where, 92, '  '));
  }
}

/** The roll-forward's selection: seeded, with its own seed and its own fieldwork sheet. */
export async function askRollForwardSelection(s: Session): Promise<NonNullable<RollForward['selection']>> {
  const ps = partSession(s);
  return askSelection(ps, { defaultSheet: rollForwardSheetName(s.path), sheetTitle: 'roll-forward fieldwork sheet', heading: 'Roll-forward selection' });
}

/** Why a roll-forward cannot be started on this test yet, or undefined. */
export function rollForwardBlocked(wp: Workpaper): string | undefined {
  if (!wp.engagement) return 'the engagement and its period are not planned yet';
  if (twoStageOf(wp)) return 'the test uses a two-stage sampling plan, whose decision rule covers one sample drawn in two stages; tolrate does not combine it with a roll-forward part (plan the test as one sample to test it in parts)';
  return undefined;
}

/** The first open planning step of the interim part, in words, or undefined when it is planned. */
export function interimPlanOpen(wp: Workpaper): string | undefined {
  const st = firstOpen(wp, PLAN_STEPS);
  return st ? STEP_LABELS[st] : undefined;
}
