/**
 * Planning, the selection: random (seeded) or systematic (random starts) from the population,
 * with spares; or a haphazard list the practitioner enters. The items are stored in the
 * workpaper and the fieldwork sheet is written beside it.
 */
import { existsSync } from 'node:fs';
import { basename, extname, isAbsolute, relative, resolve, sep } from 'node:path';
import { findKeys, readRowsAt } from '../population/index.js';
import {
  HAPHAZARD_NOTE,
  normaliseSeed,
  recordHaphazard,
  selectRandom,
  selectSystematic,
  writeFieldworkSheet,
  roleText,
  stageOfDraw,
  type Selection as Drawn,
} from '../selection/index.js';
import { twoStageOf } from '../control-test/index.js';
import { TolrateInputError } from '../errors.js';
import { WORKPAPER_SUFFIX } from '../workpaper/file.js';
import type { SelectedItem, Selection } from '../workpaper/schema.js';
import { int } from '../util/format.js';
import type { Session } from './session.js';
import { AnswerError, count, requiredText } from './parse.js';
import { readSource } from './plan-population.js';
import { FIELDWORK_COLUMNS, pickLists, resultColumns, SHEET_CONVENTIONS } from './sheet-results.js';
import { table, wrap } from './show.js';

/** The default fieldwork sheet for a workpaper: `NAME.fieldwork.csv` beside `NAME.tolrate.json`. */
export function defaultSheetName(workpaperPath: string): string {
  const b = basename(workpaperPath);
  const stem = b.endsWith(WORKPAPER_SUFFIX) ? b.slice(0, -WORKPAPER_SUFFIX.length) : b.slice(0, b.length - extname(b).length);
  return `${stem}.fieldwork.csv`;
}

function seedParse(t: string): string | undefined {
  if (t.trim() === '') return undefined;
  try {
    return normaliseSeed(t);
  } catch (e) {
    throw new AnswerError((e as Error).message);
  }
}

function splitKeys(t: string): string[] {
  return t
    .split(/[\s,;]+/)
    .map((k) => k.trim())
    .filter(Boolean);
}

async function draw(s: Session, n: number, N: number): Promise<Drawn> {
  const a = s.asker;
  const old = s.wp.selection;
  const two = twoStageOf(s.wp);
  if (two) {
    s.print(
      ...wrap(
        `Two-stage plan: both stages are drawn now, at random from the seed: the first ${int(two.firstSampleSize)} items drawn are the first stage, ` +
          `the next ${int(two.secondSampleSize)} the second (tested only when the first stage is inconclusive), then the spares. ` +
          'Only random selection is offered: with systematic or haphazard selection the first items would not be a random sample of their own.',
        92,
        '  ',
      ),
    );
  }
  const method = await a.select({
    id: 'plan.selection.method',
    message: 'Selection method',
    choices: [
      { value: 'random', name: 'Random (seeded: anyone can draw the same items again)' },
      ...(two
        ? []
        : [
            { value: 'systematic' as const, name: 'Systematic (every k-th item from a random start)' },
            { value: 'haphazard' as const, name: 'Haphazard (items chosen by a person; cannot support a statistical conclusion)' },
          ]),
    ],
    default: two ? 'random' : (old?.method ?? 'random'),
  });
  if (method === 'haphazard') return haphazard(s, n);
  const maxSpares = N - n;
  const spares = await a.text({
    id: 'plan.selection.spares',
    message: `Spares (replace voided items; at most ${int(maxSpares)})`,
    default: String(old?.spares ?? Math.min(maxSpares, Math.max(1, Math.ceil(n / 15)))),
    parse: count('Spares', { max: maxSpares, maxWhat: 'the items left in the population' }),
  });
  const starts =
    method === 'systematic'
      ? await a.text({
          id: 'plan.selection.starts',
          message: 'Number of random starts',
          help: `Each start gives the same number of items, so ${int(n)} must be a multiple of it.`,
          default: String(old?.starts?.length ?? 1),
          parse: (t) => {
            const r = count('Random starts', { min: 1, max: n, maxWhat: 'the sample size' })(t);
            if (n % r !== 0) throw new AnswerError(`Random starts: ${int(n)} is not a multiple of ${r}.`);
            return r;
          },
        })
      : undefined;
  const seed = await a.text({
    id: 'plan.selection.seed',
    message: 'Seed (blank = draw one)',
    help: 'Any text or number. It is recorded, so the selection can be drawn again by a reviewer.',
    default: old?.seed ?? '',
    parse: seedParse,
  });
  const input = { populationSize: N, sampleSize: n, spares, ...(seed !== undefined ? { seed } : {}) };
  const got = method === 'random' ? selectRandom(input) : selectSystematic({ ...input, starts: starts! });
  s.print(`  Seed ${got.seed}${got.seedDrawn ? ' (drawn by tolrate; recorded in the workpaper)' : ''}`);
  s.print(...systematicLines(got));
  return got;
}

/** A systematic selection's interval and random starts, as `tolrate select` shows them (nothing for other methods). */
export function systematicLines(sel: Drawn): string[] {
  if (sel.interval === undefined || !sel.starts) return [];
  const exact = sel.intervalExact ?? String(sel.interval);
  const starts = sel.starts.map((st, i) => `${sel.startsExact?.[i] ?? st} (${Number(st.toFixed(4))})`);
  return [
    `  Interval ${exact} rows${exact.includes('/') ? ` (${Number(sel.interval.toFixed(4))})` : ''}`,
    `  Random start${starts.length === 1 ? '' : 's'} ${starts.join(', ')}`,
  ];
}

async function haphazard(s: Session, n: number): Promise<Drawn> {
  const a = s.asker;
  s.print('', ...wrap(`Warning: ${HAPHAZARD_NOTE}`, 92, '  '));
  if (s.wp.approach?.kind === 'statistical') {
    s.print(...wrap('The approach is statistical: with a haphazard selection its figures become illustrative only.', 92, '  '));
  }
  const old = s.wp.selection?.haphazard;
  const selectedBy = await a.text({ id: 'plan.selection.haphazard.by', message: 'Who chose the items?', ...(old ? { default: old.selectedBy } : {}), parse: requiredText('Who chose them') });
  const how = await a.text({
    id: 'plan.selection.haphazard.how',
    message: 'How were they chosen?',
    help: 'E.g. "picked across every month from the printed listing, avoiding any pattern".',
    ...(old ? { default: old.how } : {}),
    parse: requiredText('How they were chosen'),
  });
  // After a list is refused, it is offered again for editing: only the wrong keys need retyping.
  let typed = '';
  for (;;) {
    const keys = await a.text({
      id: 'plan.selection.haphazard.keys',
      message: `Keys of the items, in order (the first ${int(n)} are the sample, any more are spares)`,
      help: 'Separated by commas or spaces.',
      ...(typed ? { default: typed, editable: true } : {}),
      parse: (t) => {
        typed = t.trim() || typed;
        const ks = splitKeys(t);
        if (ks.length < n) throw new AnswerError(`The planned sample is ${int(n)} items; ${ks.length} key(s) were listed.`);
        return ks;
      },
    });
    const lookup = await findKeys(readSource(s.wp.population!.source, s.dir), keys, { progress: s.out });
    let rec: ReturnType<typeof recordHaphazard>;
    try {
      rec = recordHaphazard({ lookup, selectedBy, how, sampleSize: Math.min(n, lookup.found.length) });
    } catch (e) {
      if (e instanceof TolrateInputError) {
        s.print(`  ${e.message}`);
        continue;
      }
      throw e;
    }
    if (rec.ok && lookup.found.length >= n) return rec.selection;
    for (const p of rec.problems) s.print(...wrap(p, 92, '  - '));
    if (lookup.found.length < n) s.print(`  Only ${lookup.found.length} of the listed keys are usable; the sample needs ${int(n)}.`);
    s.print('  List the keys again.');
  }
}

/** The selection step. `defaultSheet`: the fieldwork sheet offered (the roll-forward part has its own). */
export async function askSelection(s: Session, o: { defaultSheet?: string; sheetTitle?: string; heading?: string } = {}): Promise<Selection> {
  const a = s.asker;
  const pop = s.wp.population;
  const approach = s.wp.approach;
  if (!pop || !approach || !s.wp.attributes) throw new AnswerError('plan the population and the approach first');
  const N = pop.fingerprint.rowCount;
  const n = approach.sampleSize;
  s.heading(o.heading ?? 'Selection');
  s.print(`  ${int(n)} items to select from ${int(N)}.`);
  let drawn: Drawn;
  for (;;) {
    try {
      drawn = await draw(s, n, N);
      break;
    } catch (e) {
      if (e instanceof TolrateInputError && !(e instanceof AnswerError)) {
        s.print(`  ${e.message}`);
        continue;
      }
      throw e;
    }
  }
  const source = readSource(pop.source, s.dir);
  // A progress bar is drawn only when the output is a terminal and reading takes a while.
  const rows = await readRowsAt(source, drawn.positions, pop.source.kind === 'ranges' ? {} : { expectSha256: pop.fingerprint.sha256, progress: s.out });
  const two = twoStageOf(s.wp);
  const items: SelectedItem[] = rows.map((r, i) => ({
    seq: i + 1,
    role: i < drawn.sampleSize ? 'sample' : 'spare',
    position: r.position,
    row: r.row,
    key: r.key,
    values: r.values,
    ...(two && i < drawn.sampleSize ? { stage: stageOfDraw(i, two.firstSampleSize) } : {}),
  }));
  const shown = items.slice(0, 12).map((it) => [String(it.seq), roleText(it), it.key, int(it.row)]);
  s.print(`  Selected ${int(drawn.sampleSize)} items${drawn.spares ? ` and ${int(drawn.spares)} spare${drawn.spares === 1 ? '' : 's'}` : ''} (${drawn.algorithm.split(':')[0]}):`);
  s.print(...table(['Seq', 'Role', 'Key', 'Row'], shown));
  if (items.length > 12) s.print(`  ... and ${int(items.length - 12)} more (all on the fieldwork sheet)`);

  const suggested = s.wp.selection?.fieldworkSheet ?? o.defaultSheet ?? defaultSheetName(s.path);
  const sheetParse = (t: string): string => {
    const v = requiredText('The sheet')(t);
    const ext = extname(v).toLowerCase();
    if (ext !== '.csv' && ext !== '.xlsx') throw new AnswerError(`The sheet must end in .csv or .xlsx; "${v}" does not.`);
    return isAbsolute(v) ? v : resolve(s.dir, v);
  };
  let sheetAbs = await a.text({
    id: 'plan.selection.sheet',
    message: 'Fieldwork sheet to write (CSV, or XLSX)',
    help: 'Written beside the workpaper unless you give a path.',
    default: suggested,
    parse: sheetParse,
  });
  if (existsSync(sheetAbs)) {
    const replace = await a.confirm({
      id: 'plan.selection.sheetReplace',
      message: `${relative(s.dir, sheetAbs) || sheetAbs} exists (it may hold results already). Replace it with the new sheet?`,
      default: false,
    });
    if (!replace) {
      sheetAbs = await a.text({
        id: 'plan.selection.sheetOther',
        message: 'Write the fieldwork sheet to',
        parse: (t) => {
          const abs = sheetParse(t);
          if (existsSync(abs)) throw new AnswerError(`${t.trim()} exists too; give a new name.`);
          return abs;
        },
      });
    }
  }
  const columns = pop.fingerprint.columns;
  await writeFieldworkSheet(sheetAbs, {
    columns,
    items,
    resultColumns: [...resultColumns(s.wp.attributes), ...FIELDWORK_COLUMNS],
    pickLists: pickLists(s.wp.attributes),
    notes: [
      `${s.wp.engagement?.entity ?? ''} ${s.wp.control?.id ?? ''}: ${o.sheetTitle ?? 'fieldwork sheet'}`,
      `Selection ${drawn.algorithm}`,
      ...(drawn.seed ? [`Seed ${drawn.seed}`] : []),
      ...(two ? [`Two-stage plan: test the ${two.firstSampleSize} stage-1 items first; test the ${two.secondSampleSize} stage-2 items only when the first stage is inconclusive (the interview says so, and for which attributes).`] : []),
      `Population SHA-256 ${pop.fingerprint.sha256}, ${N} rows`,
      ...SHEET_CONVENTIONS,
    ],
  });
  const rel = relative(s.dir, sheetAbs).split(sep).join('/') || sheetAbs;
  s.print(`  Fieldwork sheet written: ${rel}`, ...SHEET_CONVENTIONS.flatMap((l) => wrap(l, 92, '    ')));
  if (two) s.print(...wrap(`Test the ${int(two.firstSampleSize)} stage-1 items first and record them; the stage-2 items (${int(two.secondSampleSize)}) are tested only if the first stage is inconclusive, for the attributes that need it.`, 92, '    '));
  return {
    method: drawn.method,
    algorithm: drawn.algorithm,
    ...(drawn.seed !== undefined ? { seed: drawn.seed } : {}),
    ...(drawn.interval !== undefined ? { interval: drawn.interval } : {}),
    ...(drawn.starts !== undefined ? { starts: drawn.starts } : {}),
    sampleSize: drawn.sampleSize,
    spares: drawn.spares,
    ...(drawn.haphazard ? { haphazard: drawn.haphazard } : {}),
    items,
    fieldworkSheet: rel,
    selectedAt: s.now().toISOString(),
  };
}
