/**
 * The engagement folder's answers in the interview: the engagement step taken from the folder
 * file (entity and period as given there, the preparer and the reviewer chosen from the team),
 * and a control picked from the firm library as the defaults of the control and attributes.
 */
import type { Engagement } from '../workpaper/schema.js';
import type { EngagementFolder, EngagementFolderInput } from '../engagement/folder.js';
import { folderPath, TEAM_ROLES } from '../engagement/folder.js';
import type { Asker } from './asker.js';
import { libraryAnswers, loadLibrary } from '../engagement/library.js';
import type { Session } from './session.js';
import { date, optionalText, rate, requiredText } from './parse.js';
import { wrap } from './show.js';

export async function engagementFromFolder(s: Session, f: EngagementFolder): Promise<Engagement> {
  const a = s.asker;
  const old = s.wp.engagement;
  s.print(...wrap(`From the engagement folder file: ${f.entity}, period ${f.periodStart} to ${f.periodEnd}, engagement ${f.reference}.`, 92, '  '));
  const reference = await a.text({
    id: 'plan.engagement.reference',
    message: 'Workpaper reference',
    help: `Your index for this workpaper within engagement ${f.reference}, e.g. C-4.2.`,
    ...(old ? { default: old.reference } : {}),
    parse: requiredText('The workpaper reference'),
  });
  const role = (n: string) => f.team.find((m) => m.name === n)?.role ?? '';
  const names = [...f.team].sort((x, y) => Number(y.role === 'preparer') - Number(x.role === 'preparer')).map((m) => m.name);
  const preparer = await a.select({
    id: 'plan.engagement.preparer',
    message: 'Preparer',
    choices: names.map((n) => ({ value: n, name: `${n} (${role(n)})` })),
    ...(old && names.includes(old.preparer) ? { default: old.preparer } : {}),
  });
  const others = [...f.team].filter((m) => m.name !== preparer).sort((x, y) => Number(x.role === 'preparer') - Number(y.role === 'preparer')).map((m) => m.name);
  const reviewer = await a.select({
    id: 'plan.engagement.reviewer',
    message: 'Reviewer',
    choices: others.map((n) => ({ value: n, name: `${n} (${role(n)})` })),
    ...(old && others.includes(old.reviewer) ? { default: old.reviewer } : {}),
  });
  return { entity: f.entity, periodStart: f.periodStart, periodEnd: f.periodEnd, reference, preparer, reviewer };
}

/** When the folder names a control library (and the test is not carried forward), offer its controls. */
export async function offerFromLibrary(s: Session): Promise<void> {
  const dir = s.folder?.defaults.library;
  if (!dir || s.wp.carriedForward) return;
  const lib = loadLibrary(folderPath(s.dir, dir));
  const NONE = '\u0000none';
  const pick = await s.asker.select({
    id: 'plan.control.library',
    message: 'Start from a standard control of the firm library?',
    choices: [{ value: NONE, name: 'No, type the control' }, ...lib.map((c) => ({ value: c.id, name: `${c.id}: ${c.title} (${c.attributes.length} attribute${c.attributes.length === 1 ? '' : 's'})` }))],
    default: NONE,
  });
  const c = lib.find((x) => x.id === pick);
  if (!c) return;
  s.offerDefaults(libraryAnswers(c));
  s.print(`  ${c.id} and its attributes are offered as the answers: press Enter to keep each, or type your own.`);
}

/** Ask the engagement folder file's contents (the start screen's "set up this folder"), with the file's answers as defaults. */
export async function askFolder(a: Asker, old: EngagementFolder | undefined, withLibrary: string): Promise<EngagementFolderInput> {
  const entity = await a.text({ id: 'start.folder.entity', message: 'Entity', ...(old ? { default: old.entity } : {}), parse: requiredText('The entity') });
  const periodStart = await a.text({ id: 'start.folder.periodStart', message: 'Period start (YYYY-MM-DD)', ...(old ? { default: old.periodStart } : {}), parse: date('Period start') });
  const periodEnd = await a.text({ id: 'start.folder.periodEnd', message: 'Period end (YYYY-MM-DD)', ...(old ? { default: old.periodEnd } : {}), parse: date('Period end', { notBefore: periodStart, notBeforeWhat: 'the period start' }) });
  const reference = await a.text({ id: 'start.folder.reference', message: 'Engagement reference', help: 'The engagement\'s own index, e.g. BK-2025 (each workpaper keeps its own reference too).', ...(old ? { default: old.reference } : {}), parse: requiredText('The engagement reference') });
  const team: EngagementFolderInput['team'] = [];
  for (let i = 1; ; i++) {
    const prev = old?.team[i - 1];
    const name = await a.text({ id: `start.folder.team.${i}.name`, message: `Team member ${i}: name`, help: 'The team needs at least one preparer and one reviewer, manager or partner.', ...(prev ? { default: prev.name } : {}), parse: requiredText('The name') });
    const role = await a.select({ id: `start.folder.team.${i}.role`, message: `${name}: role`, choices: TEAM_ROLES.map((r) => ({ value: r, name: r })), default: prev?.role ?? (i === 1 ? 'manager' : 'preparer') });
    team.push({ name, role });
    const hasBoth = team.some((m) => m.role === 'preparer') && team.some((m) => m.role !== 'preparer');
    if (!hasBoth) {
      continue;
    }
    const more = await a.confirm({ id: `start.folder.team.more.${i}`, message: 'Add another team member?', default: (old?.team.length ?? 0) > i });
    if (!more) break;
  }
  const confidence = await a.text({
    id: 'start.folder.confidence',
    message: 'Firm default confidence (%) for statistical tests',
    default: old?.defaults.confidence !== undefined ? `${Number((old.defaults.confidence * 100).toPrecision(10))}` : '95',
    parse: rate('Confidence', { atLeast: 0.5, atLeastWhat: '50%', example: '95' }),
  });
  const policy = await a.text({ id: 'start.folder.policy', message: 'Firm sampling policy file (blank = the one shipped with tolrate)', default: old?.defaults.policy ?? '', parse: optionalText });
  const memoTemplate = await a.text({ id: 'start.folder.memoTemplate', message: 'Firm memo template folder (blank = the one shipped with tolrate)', default: old?.defaults.memoTemplate ?? '', parse: optionalText });
  const useLibrary = await a.confirm({ id: 'start.folder.library', message: 'Offer the standard controls of the firm library when planning?', default: old ? old.defaults.library !== undefined : true });
  return {
    schemaVersion: 1,
    entity,
    periodStart,
    periodEnd,
    reference,
    team,
    defaults: { confidence, ...(policy ? { policy } : {}), ...(memoTemplate ? { memoTemplate } : {}), ...(useLibrary ? { library: old?.defaults.library ?? withLibrary } : {}) },
  };
}
