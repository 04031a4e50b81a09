/**
 * The engagement folder file, its defaults in a new test, the firm library, and carrying a test
 * forward from last year's workpaper (what is copied, what is not, and where it came from).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseFolder, saveFolder, type EngagementFolderInput } from '../../src/engagement/folder.js';
import { loadLibrary, shippedLibraryDir } from '../../src/engagement/library.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { stateHash } from '../../src/workpaper/log.js';
import { TolrateInputError } from '../../src/errors.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

const FOLDER: EngagementFolderInput = {
  schemaVersion: 1,
  entity: 'Corrow Fittings Ltd',
  periodStart: '2025-01-01',
  periodEnd: '2025-12-31',
  reference: 'CF-2025',
  team: [
    { name: 'M. Manager', role: 'manager' },
    { name: 'T. Preparer', role: 'preparer' },
    { name: 'U. Second', role: 'preparer' },
  ],
  defaults: { confidence: 0.9 },
};

/** The plan answers without the engagement questions the folder file answers. */
function withoutEngagement(total: string): ScriptAnswers {
  const a = { ...planAnswers(total) };
  for (const k of ['plan.engagement.entity', 'plan.engagement.periodStart', 'plan.engagement.periodEnd']) delete a[k];
  a['plan.engagement.reviewer'] = 'M. Manager';
  return a;
}

function problemsOf(f: () => unknown): string[] {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(TolrateInputError);
    return (e as TolrateInputError).details;
  }
  throw new Error('expected a refusal');
}

describe('the engagement folder file', () => {
  it('names every problem of a bad file', () => {
    const details = problemsOf(() =>
      parseFolder({ schemaVersion: 1, entity: '', periodStart: '2025-12-31', periodEnd: '2025-01-01', reference: 'X', team: [{ name: 'A', role: 'boss' }, { name: 'a', role: 'manager' }], defaults: { confidence: 1.5 } }, 'f.json'),
    );
    expect(details).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^entity: must not be empty/),
        expect.stringMatching(/^team\[0\]\.role: must be one of partner, manager, reviewer, preparer/),
        expect.stringMatching(/^defaults\.confidence: must be below 1/),
      ]),
    );
    // The cross-field checks run once the fields themselves are valid.
    const more = problemsOf(() => parseFolder({ ...FOLDER, periodStart: '2026-01-01', team: [{ name: 'A', role: 'manager' }, { name: 'a', role: 'partner' }] }, 'f.json'));
    expect(more).toEqual(['periodEnd: the period must not end before it starts', 'team[1].name: a is named twice', 'team: the team needs at least one preparer']);
  });

  it('answers the entity and period of a new test and offers the team as preparer and reviewer; its confidence is the default', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    saveFolder(dir, FOLDER);
    const answers = withoutEngagement(total);
    delete answers['plan.approach.confidence'];
    answers['plan.engagement.preparer'] = ['R. Outsider', 'T. Preparer'];
    answers['plan.engagement.reviewer'] = 'M. Manager';
    const a = new ScriptedAsker(answers, { defaults: true });
    const ctx = captureContext(dir);
    expect(await plan(['t1'], ctx, a, { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(wp.engagement).toEqual({ entity: 'Corrow Fittings Ltd', periodStart: '2025-01-01', periodEnd: '2025-12-31', reference: 'C-3.1', preparer: 'T. Preparer', reviewer: 'M. Manager' });
    expect(a.ids).not.toContain('plan.engagement.entity');
    expect(a.ids).not.toContain('plan.engagement.periodStart');
    // A name not in the team is not one of the choices.
    expect(a.refusals.length).toBeGreaterThan(0);
    // The folder's confidence (90%) is the default taken.
    expect(wp.approach!.confidence).toBe(0.9);
    expect(ctx.text().replace(/\s+/g, ' ')).toContain('From the engagement folder file: Corrow Fittings Ltd, period 2025-01-01 to 2025-12-31, engagement CF-2025.');
  });

  it('takes the firm\'s sampling policy file named in the folder file as the policy of a new test', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const policy = JSON.parse(readFileSync(new URL('../../templates/sampling-policy.json', import.meta.url), 'utf8'));
    policy.name = 'Corrow audit firm policy (test copy)';
    mkdirSync(join(dir, 'firm'));
    writeFileSync(join(dir, 'firm', 'policy.json'), JSON.stringify(policy));
    saveFolder(dir, { ...FOLDER, defaults: { policy: 'firm/policy.json' } });
    const answers = withoutEngagement(total);
    answers['plan.approach.kind'] = 'non-statistical';
    const a = new ScriptedAsker(answers, { defaults: true });
    expect(await plan(['t1'], captureContext(dir), a, { now: fixedClock() })).toBe(0);
    expect(loadWorkpaper(join(dir, 't1.tolrate.json')).approach!.policy!.name).toBe('Corrow audit firm policy (test copy)');
  });

  it('is created from the start screen, which then shows the engagement and where every workpaper stands', async () => {
    const { runWith: start } = await import('../../src/commands/start/index.js');
    const dir = tempDir();
    const ctx = captureContext(dir);
    const a = new ScriptedAsker({
      'start.action': 'folder',
      'start.folder.entity': 'Corrow Fittings Ltd',
      'start.folder.periodStart': '2025-01-01',
      'start.folder.periodEnd': '2025-12-31',
      'start.folder.reference': 'CF-2025',
      'start.folder.team.1.name': 'M. Manager',
      'start.folder.team.1.role': 'manager',
      'start.folder.team.2.name': 'T. Preparer',
      'start.folder.team.2.role': 'preparer',
      'start.folder.team.more.2': false,
      'start.folder.confidence': '90',
      'start.folder.policy': '',
      'start.folder.memoTemplate': '',
      'start.folder.library': false,
    });
    expect(await start([], ctx, a, { now: fixedClock() })).toBe(0);
    expect(ctx.text()).toContain('This folder has no engagement file (tolrate-engagement.json) yet');
    // A team of one manager cannot stop there: the member's role question comes before "more?".
    expect(a.ids).not.toContain('start.folder.team.more.1');
    const saved = JSON.parse(readFileSync(join(dir, 'tolrate-engagement.json'), 'utf8'));
    expect(saved).toMatchObject({ entity: 'Corrow Fittings Ltd', reference: 'CF-2025', defaults: { confidence: 0.9 } });
    expect(saved.team).toEqual([{ name: 'M. Manager', role: 'manager' }, { name: 'T. Preparer', role: 'preparer' }]);
    writeFileSync(join(dir, 'odd.tolrate.json'), 'not json');
    const ctx2 = captureContext(dir);
    expect(await start([], ctx2, new ScriptedAsker({ 'start.action': 'quit' }), { now: fixedClock() })).toBe(0);
    expect(ctx2.text()).toContain('Engagement CF-2025: Corrow Fittings Ltd, 2025-01-01 to 2025-12-31');
    expect(ctx2.text()).toMatch(/odd\.tolrate\.json — cannot be read: /);
  });

  it('refuses a bad folder file with every problem when a test is planned in the folder', async () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'tolrate-engagement.json'), JSON.stringify({ schemaVersion: 1, entity: 'X', periodStart: '2025-01-01', periodEnd: '2025-12-31', reference: 'R', team: [] }));
    const err = await plan(['t1'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() }).then(
      () => undefined,
      (e: unknown) => e,
    );
    // A TolrateInputError is printed with its details and exits 2 (src/cli/main.ts).
    expect(err).toBeInstanceOf(TolrateInputError);
    expect((err as TolrateInputError).message).toMatch(/tolrate-engagement\.json is not a valid engagement folder file/);
    expect((err as TolrateInputError).details).toEqual(['team: name at least one member of the team', 'team: the team needs at least one preparer', 'team: the team needs at least one reviewer, manager or partner']);
  });
});

describe('the firm library', () => {
  it('loads the shipped library and names every problem of a bad one', () => {
    const lib = loadLibrary(shippedLibraryDir());
    expect(lib.map((c) => c.id)).toEqual(['TR-BANKREC', 'GL-JOURNALS', 'P2P-APPROVE']);
    const dir = tempDir();
    writeFileSync(join(dir, 'a.json'), JSON.stringify({ id: 'X', title: 'T', description: 'D', objective: 'O', owner: 'W', frequency: 'hourly', nature: 'manual', key: true, attributes: [] }));
    writeFileSync(join(dir, 'b.json'), '{ not json');
    const details = problemsOf(() => loadLibrary(dir));
    expect(details).toEqual([
      expect.stringMatching(/^a\.json: frequency: must be one of annual/),
      'a.json: attributes: give at least one attribute',
      expect.stringMatching(/^b\.json: not valid JSON/),
    ]);
  });

  it('offers a standard control when the folder names a library: its control and attributes become the answers', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    saveFolder(dir, { ...FOLDER, defaults: { library: shippedLibraryDir() } });
    const answers = withoutEngagement(total);
    for (const k of Object.keys(answers)) if (k.startsWith('plan.control.') || k.startsWith('plan.attributes.')) delete answers[k];
    answers['plan.control.library'] = 'TR-BANKREC';
    answers['plan.control.frequency'] = 'many-times-daily';
    const a = new ScriptedAsker(answers, { defaults: true });
    expect(await plan(['t1'], captureContext(dir), a, { now: fixedClock() })).toBe(0);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    const lib = loadLibrary(shippedLibraryDir()).find((c) => c.id === 'TR-BANKREC')!;
    expect(wp.control!.id).toBe('TR-BANKREC');
    expect(wp.control!.description).toBe(lib.description);
    expect(wp.attributes!.map((x) => x.deviationDefinition)).toEqual(lib.attributes.map((x) => x.deviationDefinition));
  });
});

/** Last year's complete test of the fixture population, in `dir/prior`. */
async function lastYear(): Promise<{ dir: string; last: string; total: string }> {
  const dir = tempDir();
  const prior = join(dir, 'prior');
  mkdirSync(prior);
  const { total } = writePopulation(prior);
  const { total: t2 } = writePopulation(dir);
  const answers = { ...planAnswers(total), 'plan.attributes.A2.tolerableRate': '8', 'plan.approach.expectedRate': '1.5' };
  expect(await plan(['last'], captureContext(prior), new ScriptedAsker(answers), { now: fixedClock('2025-01-20T09:00:00.000Z') })).toBe(0);
  // Two deviations on A1 (so last year's rate and a deficiency are there to show), the rest conform.
  const rec = new ScriptedAsker({ 'record.source': 'type', 'record.item.1.A1.result': 'deviation', 'record.item.2.A1.result': 'deviation', 'record.item.*.A1.found': 'No second signature', 'record.item.*.A1.cause': 'not-performed', 'record.item.*.A1.causeDetail': '', 'record.item.*.A1.intentional': 'no', 'record.item.*.A1.pattern': 'isolated', 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms', ...FIELDWORK_ANSWERS }, { defaults: true });
  expect(await record(['last.tolrate.json'], captureContext(prior), rec, { now: fixedClock('2025-01-21T09:00:00.000Z') })).toBe(0);
  expect(await conclude(['last.tolrate.json'], captureContext(prior), new ScriptedAsker(concludeAnswers(), { defaults: true }), { now: fixedClock('2025-01-22T09:00:00.000Z') })).toBe(0);
  return { dir, last: join(prior, 'last.tolrate.json'), total: t2 };
}

describe('carry forward (plan NEW --from LAST)', () => {
  it('copies the control, attributes and approach as defaults, not the population, selection, results or conclusion; records where it came from', async () => {
    const { dir, last, total } = await lastYear();
    const lastWp = loadWorkpaper(last);
    expect(lastWp.conclusion).toBeDefined();
    const answers = planAnswers(total);
    // Only what carry forward does not give: the engagement, the population and the selection.
    for (const k of Object.keys(answers)) if (k.startsWith('plan.control.') || k.startsWith('plan.attributes.') || (k.startsWith('plan.approach.') && k !== 'plan.approach.size.accept')) delete answers[k];
    answers['plan.engagement.periodStart'] = '2026-01-01';
    answers['plan.engagement.periodEnd'] = '2026-12-31';
    answers['plan.selection.seed'] = '9090';
    const a = new ScriptedAsker(answers, { defaults: true });
    const ctx = captureContext(dir);
    expect(await plan(['this-year', '--from', 'prior/last.tolrate.json'], ctx, a, { now: fixedClock('2026-01-20T09:00:00.000Z') })).toBe(0);
    const wp = loadWorkpaper(join(dir, 'this-year.tolrate.json'));
    // Copied (asked, with last year's answers as the defaults to confirm).
    expect(a.ids).toContain('plan.control.id');
    expect(wp.control).toEqual(lastWp.control);
    expect(wp.attributes).toEqual(lastWp.attributes);
    expect(wp.approach!.tolerableRate).toBe(lastWp.approach!.tolerableRate);
    expect(wp.approach!.expectedRate).toBe(0.015);
    expect(wp.approach!.model).toBe(lastWp.approach!.model);
    // Not copied.
    expect(wp.engagement!.periodEnd).toBe('2026-12-31');
    expect(wp.population!.source).toMatchObject({ path: 'vouchers.csv' });
    expect(wp.selection!.seed).toBe('9090');
    expect(wp.results).toBeUndefined();
    expect(wp.conclusion).toBeUndefined();
    // Provenance: last year's path as given and its state hash.
    expect(wp.carriedForward!.path).toBe('prior/last.tolrate.json');
    expect(wp.carriedForward!.stateHash).toBe(stateHash(lastWp));
    // Last year's figures at the expected rate, its follow-ups at the start.
    const out = ctx.text();
    const ev = lastWp.evaluation!.attributes[0]!;
    expect(ev.deviations).toBe(2);
    expect(out).toContain(`A1: 2 deviation(s) in ${ev.sampleSize} items, sample rate`);
    expect(out).toContain('deficiency last year: Deficiency');
    expect(out).toContain("Last year's follow-up actions");
    for (const f of lastWp.conclusion!.followUps) expect(out).toContain(f.description.slice(0, 40));
  });

  it('is a start-screen choice: last year\'s file, then the new file', async () => {
    const { runWith: start } = await import('../../src/commands/start/index.js');
    const { dir, last, total } = await lastYear();
    const answers = planAnswers(total);
    for (const k of Object.keys(answers)) if (k.startsWith('plan.control.') || k.startsWith('plan.attributes.')) delete answers[k];
    const a = new ScriptedAsker({ 'start.action': 'carry', 'start.carry.from': ['prior/nothing-here', 'prior/last'], 'start.file': 'again', ...answers, 'record.source': 'later' }, { defaults: true });
    expect(await start([], captureContext(dir), a, { now: fixedClock('2026-01-20T09:00:00.000Z') })).toBe(0);
    expect(a.refusals.map((r) => r.id)).toEqual(['start.carry.from']);
    const wp = loadWorkpaper(join(dir, 'again.tolrate.json'));
    expect(wp.carriedForward!.stateHash).toBe(stateHash(loadWorkpaper(last)));
    expect(wp.control).toEqual(loadWorkpaper(last).control);
  });

  it('refuses to carry forward onto an existing file', async () => {
    const { dir } = await lastYear();
    writeFileSync(join(dir, 'taken.tolrate.json'), '{}');
    await expect(plan(['taken', '--from', 'prior/last.tolrate.json'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() })).rejects.toThrow(/exists already/);
  });
});

describe('the folder\'s memo template folder', () => {
  it('is the default template of tolrate memo in the folder (without --template)', async () => {
    const { buildFixture } = await import('../memo/fixtures.js');
    const { DEFAULT_TEMPLATE_DIR } = await import('../../src/memo/index.js');
    const { readDocx } = await import('../memo/docx-text.js');
    const { cpSync } = await import('node:fs');
    const { runCli } = await import('../../src/cli/main.js');
    const f = buildFixture({ variant: 'supported' });
    const tpl = join(f.dir, 'firm-memo');
    cpSync(DEFAULT_TEMPLATE_DIR, tpl, { recursive: true });
    const memo = JSON.parse(readFileSync(join(tpl, 'memo.json'), 'utf8')) as { title: string };
    memo.title = 'Firm controls memorandum ({{reference}})';
    writeFileSync(join(tpl, 'memo.json'), JSON.stringify(memo));
    saveFolder(f.dir, { ...FOLDER, defaults: { memoTemplate: 'firm-memo' } });
    const ctx = captureContext(f.dir, false);
    expect(await runCli(['memo', 'C-310.tolrate.json'], ctx)).toBe(0);
    const doc = await readDocx(readFileSync(join(f.dir, 'C-310.memo.docx')));
    expect(doc.paragraphs[0]).toBe('Firm controls memorandum (C-310)');
    expect(loadWorkpaper(f.path).memos!.at(-1)!.template).toBeDefined();
  });
});

describe('a damaged engagement folder file or library file', () => {
  it('is refused with the place of the error, never its text; a named pipe is refused at once', async () => {
    const { loadFolder, folderFilePath } = await import('../../src/engagement/folder.js');
    const dir = tempDir();
    writeFileSync(folderFilePath(dir), '{"entity": "Secret client text here", oops}');
    let msg = '';
    try {
      loadFolder(dir);
    } catch (e) {
      msg = (e as Error).message;
    }
    expect(msg).toMatch(/is not valid JSON: .*line 1/);
    expect(msg).not.toContain('Secret client text');
    const pipeDir = tempDir();
    const { execFileSync } = await import('node:child_process');
    execFileSync('mkfifo', [folderFilePath(pipeDir)]);
    expect(() => loadFolder(pipeDir)).toThrow(/named pipe|not a regular file/);
    const lib = tempDir();
    writeFileSync(join(lib, 'broken.json'), '{"controls": [ "Confidential wording" oops ]}');
    let libMsg = '';
    try {
      loadLibrary(lib);
    } catch (e) {
      libMsg = [(e as Error).message, ...((e as { details?: string[] }).details ?? [])].join(' ');
    }
    expect(libMsg).toMatch(/broken\.json: not valid JSON/);
    expect(libMsg).not.toContain('Confidential wording');
  });
});
