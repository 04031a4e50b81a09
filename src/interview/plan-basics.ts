/**
 * Planning, first three steps: the engagement, the control, the attributes.
 */
import { FREQUENCIES, NATURES, type Attribute, type Control, type Engagement, type Frequency } from '../workpaper/schema.js';
import { pctPlain } from '../util/format.js';
import type { Session } from './session.js';
import { wrap } from './show.js';
import { date, NONE_ANSWER, optionalRate, requiredText } from './parse.js';
import { askRate } from './rate-question.js';

export const FREQUENCY_LABELS: Record<Frequency, string> = {
  annual: 'Annual',
  quarterly: 'Quarterly',
  monthly: 'Monthly',
  weekly: 'Weekly',
  daily: 'Daily',
  'many-times-daily': 'Many times a day (recurring transactions)',
};

export const NATURE_LABELS: Record<(typeof NATURES)[number], string> = {
  manual: 'Manual',
  automated: 'Automated',
  'it-dependent-manual': 'IT-dependent manual',
};

export const AUTOMATED_NOTE =
  'Note: an automated control is usually tested by examining one operation of it together with the IT general ' +
  'controls over it, rather than by a sample; whether sampling is the right test is your judgement under the ' +
  "firm's methodology.";

export async function askEngagement(s: Session): Promise<Engagement> {
  const a = s.asker;
  const old = s.wp.engagement;
  s.heading('Engagement');
  const entity = await a.text({ id: 'plan.engagement.entity', message: 'Entity', ...(old ? { default: old.entity } : {}), parse: requiredText('The entity') });
  const periodStart = await a.text({
    id: 'plan.engagement.periodStart',
    message: 'Period start (YYYY-MM-DD)',
    ...(old ? { default: old.periodStart } : {}),
    parse: date('Period start'),
  });
  const periodEnd = await a.text({
    id: 'plan.engagement.periodEnd',
    message: 'Period end (YYYY-MM-DD)',
    ...(old ? { default: old.periodEnd } : {}),
    parse: date('Period end', { notBefore: periodStart, notBeforeWhat: 'the period start' }),
  });
  const reference = await a.text({
    id: 'plan.engagement.reference',
    message: 'Workpaper reference',
    help: 'Your index for this workpaper, e.g. C-4.2.',
    ...(old ? { default: old.reference } : {}),
    parse: requiredText('The workpaper reference'),
  });
  const preparer = await a.text({ id: 'plan.engagement.preparer', message: 'Preparer', ...(old ? { default: old.preparer } : {}), parse: requiredText('The preparer') });
  const reviewer = await a.text({ id: 'plan.engagement.reviewer', message: 'Reviewer', ...(old ? { default: old.reviewer } : {}), parse: requiredText('The reviewer') });
  return { entity, periodStart, periodEnd, reference, preparer, reviewer };
}

export async function askControl(s: Session): Promise<Control> {
  const a = s.asker;
  const old = s.wp.control;
  s.heading('Control');
  const id = await a.text({ id: 'plan.control.id', message: 'Control identifier', help: 'As in the entity\'s control matrix, e.g. P2P-03.', ...(old ? { default: old.id } : {}), parse: requiredText('The control identifier') });
  const description = await a.text({
    id: 'plan.control.description',
    message: 'What the control does',
    help: 'Who does what, when, with what evidence.',
    ...(old ? { default: old.description } : {}),
    parse: requiredText('The description'),
  });
  const objective = await a.text({
    id: 'plan.control.objective',
    message: 'Control objective (the risk it addresses)',
    ...(old ? { default: old.objective } : {}),
    parse: requiredText('The objective'),
  });
  const owner = await a.text({ id: 'plan.control.owner', message: 'Control owner', ...(old ? { default: old.owner } : {}), parse: requiredText('The control owner') });
  const frequency = await a.select({
    id: 'plan.control.frequency',
    message: 'How often the control operates',
    choices: FREQUENCIES.map((f) => ({ value: f, name: FREQUENCY_LABELS[f] })),
    ...(old ? { default: old.frequency } : {}),
  });
  const nature = await a.select({
    id: 'plan.control.nature',
    message: 'Nature of the control',
    choices: NATURES.map((n) => ({ value: n, name: NATURE_LABELS[n] })),
    ...(old ? { default: old.nature } : {}),
  });
  if (nature === 'automated') {
    // Common practice, no single source: an automated control is usually tested by one
    // operation plus the IT general controls over it, rather than by attribute sampling.
    s.print(...wrap(AUTOMATED_NOTE, 92, '  '));
  }
  const key = await a.confirm({ id: 'plan.control.key', message: 'Is it a key control?', default: old?.key ?? true });
  return { id, description, objective, owner, frequency, nature, key };
}

export async function askAttributes(s: Session): Promise<Attribute[]> {
  const a = s.asker;
  const old = s.wp.attributes ?? [];
  s.heading('Attributes');
  s.print(
    'An attribute is one thing checked on every item; a deviation is an item where it is not met.',
    'A document that cannot be found counts as a deviation.',
  );
  const out: Attribute[] = [];
  for (let i = 1; ; i++) {
    const id = `A${i}`;
    const prev = old[i - 1];
    const description = await a.text({
      id: `plan.attributes.${id}.description`,
      message: `${id}: what is checked on each item`,
      ...(prev ? { default: prev.description } : {}),
      parse: requiredText(`${id} description`),
    });
    const deviationDefinition = await a.text({
      id: `plan.attributes.${id}.deviation`,
      message: `${id}: what counts as a deviation`,
      ...(prev ? { default: prev.deviationDefinition } : {}),
      parse: requiredText(`${id} deviation definition`),
    });
    const tolerableRate = await askRate(a, {
      id: `plan.attributes.${id}.tolerableRate`,
      message: `${id}: its own tolerable deviation rate, if it differs from the test's (blank = the test's)`,
      help:
        'A percentage such as 6 or 6%. Leave blank to use the rate set for the whole test at the approach step.' +
        (prev?.tolerableRate !== undefined ? `\nType ${NONE_ANSWER} to drop its own rate of ${pctPlain(prev.tolerableRate)} and use the test's.` : ''),
      default: prev?.tolerableRate !== undefined ? pctPlain(prev.tolerableRate) : '',
      parse: optionalRate(`${id} tolerable rate`, { below: 0.5, belowWhat: '50%' }),
    });
    out.push({ id, description, deviationDefinition, ...(tolerableRate !== undefined ? { tolerableRate } : {}) });
    const more = await a.confirm({ id: `plan.attributes.more.${id}`, message: 'Add another attribute?', default: old.length > i });
    if (!more) break;
  }
  return out;
}
