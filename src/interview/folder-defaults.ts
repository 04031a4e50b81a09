/**
 * The engagement folder's answers in the interview: the engagement step taken from the folder
 * file (entity and period as given there, the preparer and the reviewer chosen from the team),
 * and a control picked from the firm library as the defaults of the control and attributes.
 */
import type { Engagement } from '../workpaper/schema.js';
import type { EngagementFolder } from '../engagement/folder.js';
import { folderPath } from '../engagement/folder.js';
import { libraryAnswers, loadLibrary } from '../engagement/library.js';
import type { Session } from './session.js';
import { requiredText } from './parse.js';
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
