/**
 * The calculator commands (size, limit, table) run through the CLI entry with a captured
 * context: human output, --json, bad flags (exit 2), --help (exit 0). Figures are checked
 * against the published tables (AICPA Audit Sampling guide, from memory), @stdlib's distribution
 * packages where noted, and --json against the library.
 */
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import type { CommandContext } from '../../src/commands/types.js';
import { planningTable, sampleSize, upperLimit } from '../../src/stats/index.js';
import { mpBetaQuantile } from '../fixtures/reference-table.js';

async function run(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const ctx: CommandContext = {
    stdout: { write: (t: string) => (out += t) },
    stderr: { write: (t: string) => (err += t) },
    isTTY: false,
    color: false,
    cwd: process.cwd(),
    env: {},
  };
  const code = await runCli(argv, ctx);
  return { code, out, err };
}

const ESC = String.fromCharCode(27);

describe('tolrate size', () => {
  it('95 / 6 / 1 → 78, with the model, k_e and achieved risk against β (AICPA Audit Sampling guide, 95% sample size table, from memory)', async () => {
    const r = await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1']);
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(r.out).toMatch(/^Sample size: 78$/m);
    expect(r.out).toMatch(/binomial/);
    expect(r.out).toMatch(/Expected deviations \(k_e\)\s+1 = ceil\(78 x 1%\)/);
    // BinomCDF(1; 78, 0.06) = 0.047927 (@stdlib/stats-base-dists-binomial-cdf), shown rounded up to 0.1%.
    expect(r.out).toMatch(/Achieved risk\s+4\.8% \(exact 4\.7927%\) .*allowable 5%/);
    expect(r.out).toMatch(/Why not 77/);
    expect(r.out).toMatch(/practitioner's judgements/);
    expect(r.out).not.toContain(ESC);
  });

  it('with --population: the exact hypergeometric size and the FPC labelled as the textbook approximation', async () => {
    const r = await run(['size', '--confidence', '95%', '--tolerable', '6%', '--expected', '1', '--population', '800']);
    expect(r.code).toBe(0);
    const lib = sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, populationSize: 800 });
    expect(r.out).toMatch(new RegExp(`^Sample size: ${lib.sampleSize}$`, 'm'));
    expect(r.out).toMatch(/hypergeometric/);
    expect(r.out).toMatch(/Textbook approximation, for comparison only \(finite population correction/);
    expect(r.out).toContain(`n' = ceil(78 / (1 + 78/800)) = ${lib.finitePopulationCorrection!.correctedSampleSize}`);
  });

  it('--json prints the library result', async () => {
    const r = await run(['size', '--confidence', '90', '--tolerable', '5', '--expected', '0', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toEqual(sampleSize({ confidence: 0.9, tolerableRate: 0.05, expectedRate: 0 }));
    expect(JSON.parse(r.out).sampleSize).toBe(45); // AICPA 90% table, 5% / 0%: 45(0), from memory
  });

  it('a decimal comma or a % sign below 1% is taken as typed: 6,5 = 6.5%, 0.5% = 0.5%', async () => {
    const comma = JSON.parse((await run(['size', '--confidence', '95', '--tolerable', '6,5', '--expected', '0,5%', '--json'])).out);
    const point = JSON.parse((await run(['size', '--confidence', '95', '--tolerable', '6.5', '--expected', '0.5%', '--json'])).out);
    expect(comma).toEqual(point);
    expect(point).toMatchObject({ tolerableRate: 0.065, expectedRate: 0.005 });
    // A list with a rate of 1 or more reads plainly as percentages (the README's table example).
    expect((await run(['table', '--confidence', '95', '--expected', '0,0.5,1'])).code).toBe(0);
  });

  it('--model poisson is honoured', async () => {
    const r = await run(['size', '--confidence', '95', '--tolerable', '5', '--expected', '0', '--model', 'poisson', '--json']);
    expect(JSON.parse(r.out)).toMatchObject({ model: 'poisson', sampleSize: 60 }); // ⌈3.00 / 5%⌉, common practice
  });

  it.each([
    [['size', '--confidence', '95', '--tolerable', '6'], /--expected is required/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '7'], /--expected \(7%\) must be below --tolerable \(6%\)/],
    [['size', '--confidence', 'high', '--tolerable', '6', '--expected', '1'], /--confidence: "high" is not a percentage/],
    [['size', '--confidence', '100', '--tolerable', '6', '--expected', '1'], /--confidence: 100% is out of range/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--model', 'binomal'], /Did you mean binomial\?/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--model', 'hypergeometric'], /needs --population/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--population', 'many'], /--population: "many" is not a whole number/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--tolerance', '5'], /unknown option --tolerance/],
    [['size', '--confidence', '95', '--tolerable', '2', '--expected', '1.9'], /No practical sample size/],
    // A rate below 1 without a % sign may be a fraction (0.05 meant as 5%): refused, never sized.
    [['size', '--confidence', '95', '--tolerable', '0.05', '--expected', '0'], /^--tolerable: 0\.05 is read as 0\.05%; write 5 for 5%, or 0\.05% if you mean 0\.05%\.$/m],
    [['size', '--confidence', '0.95', '--tolerable', '6', '--expected', '1'], /--confidence: 0\.95 is read as 0\.95%; write 95 for 95%/],
    [['size', '--confidence', '95', '--tolerable', '6', '--expected', '0,5'], /--expected: 0,5 is read as 0,5%; write 50 for 50%, or 0,5% if you mean 0,5%/],
    [['size', '--confidence', '95', '--tolerable', '1,000', '--expected', '0'], /--tolerable: "1,000" looks like a number with a thousands separator/],
    [['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--tolerable', '0.06'], /--tolerable: 0\.06 is read as 0\.06%; write 6 for 6%/],
  ])('bad input %j → exit 2 with a message, no stack trace', async (argv, message) => {
    const r = await run(argv);
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toMatch(message);
    expect(r.err).not.toMatch(/\n\s+at /);
  });

  it('--help → 0 with usage, every flag, an example and the caution', async () => {
    const r = await run(['size', '--help']);
    expect(r.code).toBe(0);
    for (const flag of ['--confidence', '--tolerable', '--expected', '--population', '--model', '--underreliance', '--two-stage', '--json', '--help']) expect(r.out).toContain(flag);
    expect(r.out).toMatch(/Usage: tolrate size/);
    expect(r.out).toMatch(/Example:\n\s+tolrate size --confidence 95 --tolerable 6 --expected 1/);
    expect(r.out).toMatch(/The tool computes/);
    expect((await run(['help', 'size'])).out).toBe(r.out);
  });
});

describe('tolrate limit', () => {
  it('2 in 78 at 95%: sample rate 2.6%, limit 7.9% rounded up; with 6% tolerable: not supported, extension shown (limit: mpmath table; risk: @stdlib, noted below)', async () => {
    const r = await run(['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--tolerable', '6']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Sample deviation rate\s+2\.6%/);
    expect(r.out).toMatch(/Upper deviation limit\s+7\.9% \(exact 7\.8521%/);
    // BetaInv(0.95; 3, 76) = 0.0785210890738215 (mpmath, committed table): 7.8521%.
    expect((mpBetaQuantile(0.95, 3, 76) * 100).toFixed(4)).toBe('7.8521');
    // BinomCDF(2; 78, 0.06) = 0.146006 (@stdlib/stats-base-dists-binomial-cdf), shown rounded up to 0.1%.
    expect(r.out).toMatch(/Risk of overreliance\s+14\.7% \(exact 14\.6006%\)/);
    expect(r.out).toMatch(/The results do not support the planned reliance/);
    // The single-stage figure 25 (BinomCDF(2; 103, 6%) = 4.95% ≤ 5% > BinomCDF(2; 102, 6%)) is shown only as a labelled figure ...
    expect(r.out).toMatch(/Extension figure\s+25 more items, none deviating \(total 103\): the number that would bring the risk to\s+5\.0% if the 103 items had been one\s+sample planned in advance/);
    // ... beside the exact risk of the procedure followed: 7.9285% (tests/reference/plan-risks.json, exact rational arithmetic).
    expect(r.out).toMatch(/Risk of extending\s+8\.0% \(exact 7\.9285%\), not the planned 5%/);
    expect(r.out).toMatch(/Extending again\s+36\.5% \(exact 36\.4289%\)/);
    expect(r.out).not.toMatch(/supports reliance only if/);
    expect(r.out).toMatch(/The tool computes/);
  });

  it('75 items, 2 deviations: the tabulated 8.2% (AICPA Audit Sampling guide, 95% upper limit table, from memory)', async () => {
    const r = await run(['limit', '--sample', '75', '--deviations', '2', '--confidence', '95']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^Upper deviation limit: 8\.2% at 95% confidence/m);
    expect(r.out).not.toMatch(/support/);
  });

  it('supported case wording and no extension', async () => {
    const r = await run(['limit', '--sample', '78', '--deviations', '1', '--confidence', '95', '--tolerable', '6']);
    expect(r.out).toMatch(/The results support the planned reliance/);
    expect(r.out).toMatch(/Extension\s+none needed/);
  });

  it('an extension that is not practical says so', async () => {
    const r = await run(['limit', '--sample', '100', '--deviations', '60', '--confidence', '95', '--tolerable', '0.5%']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Extension figure\s+none offered/);
    expect(r.out).not.toMatch(/Risk of extending/);
    const j = JSON.parse((await run(['limit', '--sample', '100', '--deviations', '60', '--confidence', '95', '--tolerable', '0.5%', '--json'])).out);
    expect(j.extensionSize).toBeNull();
    expect(j.extensionNote).toMatch(/No practical extension/);
  });

  it('--json without --tolerable is the library result; with it, the result plus risk, decision and extension', async () => {
    const a = await run(['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--json']);
    expect(JSON.parse(a.out)).toEqual(upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95 }));
    const b = JSON.parse((await run(['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--tolerable', '6', '--json'])).out);
    expect(b).toMatchObject({ ...upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95 }), tolerableRate: 0.06, extensionSize: 25 });
    expect(b.decision.supported).toBe(false);
    expect(b.overrelianceRisk).toBeGreaterThan(0.05);
  });

  it('with --population: the hypergeometric count limit', async () => {
    const r = await run(['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--population', '800', '--json']);
    const lib = upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95, populationSize: 800 });
    expect(JSON.parse(r.out)).toEqual(lib);
    const h = await run(['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--population', '800']);
    expect(h.out).toContain(`at most ${lib.deviationsInPopulation} of 800`);
  });

  it.each([
    [['limit', '--deviations', '2', '--confidence', '95'], /--sample is required/],
    [['limit', '--sample', '10', '--deviations', '11', '--confidence', '95'], /cannot exceed --sample/],
    [['limit', '--sample', '900', '--deviations', '1', '--confidence', '95', '--population', '800'], /cannot exceed --population/],
    [['limit', '--sample', '0', '--deviations', '0', '--confidence', '95'], /--sample: 0 is below the minimum of 1/],
    [['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', '--tolerable', '0'], /--tolerable: 0% is out of range/],
    [['limit', '--sample', '78', '--deviations', '2', '--confidence', '95', 'extra'], /unexpected argument/],
  ])('bad input %j → exit 2', async (argv, message) => {
    const r = await run(argv);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(message);
  });

  it('--help → 0 with every flag', async () => {
    const r = await run(['limit', '-h']);
    expect(r.code).toBe(0);
    for (const flag of ['--sample', '--deviations', '--confidence', '--tolerable', '--expected', '--population', '--model', '--json']) expect(r.out).toContain(flag);
    expect(r.out).toMatch(/Example:/);
    expect(r.out).toMatch(/The tool computes/);
  });
});

describe('tolrate table', () => {
  it('the default 95% table: aligned rows, "size (k_e)" cells, dashes where not practical', async () => {
    const r = await run(['table', '--confidence', '95']);
    expect(r.code).toBe(0);
    const lines = r.out.split('\n');
    const header = lines.find((l) => l.startsWith('Expected'))!;
    expect(header.split(/\s+/).slice(1)).toEqual(['2%', '3%', '4%', '5%', '6%', '7%', '8%', '9%', '10%', '15%', '20%']);
    const zero = lines.find((l) => l.startsWith('0% '))!;
    // AICPA 95% table, 0% expected (from memory)
    expect(zero.match(/\d+ \(\d+\)/g)).toEqual(['149 (0)', '99 (0)', '74 (0)', '59 (0)', '49 (0)', '42 (0)', '36 (0)', '32 (0)', '29 (0)', '19 (0)', '14 (0)']);
    const one = lines.find((l) => l.startsWith('1% '))!;
    expect(one).toContain('78 (1)');
    const seven = lines.find((l) => l.startsWith('7% '))!;
    expect(seven.split(/\s{2,}/).filter((c) => c === '-')).toHaveLength(6);
    // Every table row has the header's width (aligned columns).
    const rows = lines.filter((l) => /^\d/.test(l));
    expect(rows).toHaveLength(20);
    for (const row of rows) expect(row.length).toBeLessThanOrEqual(header.length);
    expect(rows.some((row) => row.length === header.length)).toBe(true);
    expect(r.out).toMatch(/The tool computes/);
  });

  it('custom grids, a population, and --json equal to the library table', async () => {
    const argv = ['table', '--confidence', '90', '--tolerable', '5,6,10', '--expected', '0,1,2', '--population', '2500', '--json'];
    const r = await run(argv);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toEqual(
      planningTable({ confidence: 0.9, tolerableRates: [0.05, 0.06, 0.1], expectedRates: [0, 0.01, 0.02], populationSize: 2500 }),
    );
    const h = await run(argv.slice(0, -1));
    expect(h.out).toMatch(/hypergeometric/);
    expect(h.out).toMatch(/population 2,500/);
  });

  it.each([
    [['table'], /--confidence is required/],
    [['table', '--confidence', '95', '--tolerable', '5,,6'], /--tolerable needs percentages separated by commas/],
    [['table', '--confidence', '95', '--expected', '0,x'], /--expected: "x" is not a percentage/],
    [['table', '--confidence', '95', '--model', 'hyper'], /Did you mean hypergeometric\?/],
    [['table', '--confidence', '95', '--tolerable', '0.02,0.05'], /--tolerable: 0\.02, 0\.05 are read as 0\.02%, 0\.05%; write 2,5 for 2%, 5%/],
  ])('bad input %j → exit 2', async (argv, message) => {
    const r = await run(argv);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(message);
  });

  it('--help → 0 with every flag and the default grids', async () => {
    const r = await run(['table', '--help']);
    expect(r.code).toBe(0);
    for (const flag of ['--confidence', '--tolerable', '--expected', '--population', '--model', '--json']) expect(r.out).toContain(flag);
    expect(r.out).toContain('2,3,4,5,6,7,8,9,10,15,20');
    expect(r.out).toContain('0,0.25,0.5,0.75,1,1.25,1.5,1.75,2,2.25,2.5,2.75,3,3.25,3.5,3.75,4,5,6,7');
    expect(r.out).toMatch(/The tool computes/);
  });
});

describe('calculators: both risks, two stages, honest extensions, wording by the model rule', () => {
  it('limit 88/1 at 95% with N = 1,000 and 5% tolerable: limit 50/1,000 = 5.0000% equals the tolerable count, so "not below", not supported', async () => {
    // M* = 50 = ⌈5% × 1,000⌉: P(X ≤ 1 | 1000, 50, 88) = 0.053924 > 5% (@stdlib hypergeometric CDF agrees; see stats-stdlib tests).
    const r = await run(['limit', '--sample', '88', '--deviations', '1', '--confidence', '95', '--tolerable', '5', '--population', '1000']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Upper deviation limit\s+5\.0% \(exact 5\.0000%/);
    expect(r.out).toMatch(/is not below the tolerable rate \(it equals it, 5%\)/);
    expect(r.out).not.toMatch(/exceeds the tolerable rate/);
    const j = JSON.parse((await run(['limit', '--sample', '88', '--deviations', '1', '--confidence', '95', '--tolerable', '5', '--population', '1000', '--json'])).out);
    expect(j.limitDecision).toMatchObject({ supported: false, rule: 'below', relation: 'equal' });
  });

  it('limit with k = n offers no extension (no "1,400 more items")', async () => {
    const r = await run(['limit', '--sample', '59', '--deviations', '59', '--confidence', '95', '--tolerable', '5']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Extension figure\s+none offered/);
    expect(r.out).toMatch(/every item tested deviated/);
    expect(r.out).not.toMatch(/1,400/);
  });

  it('limit with a known population never extends beyond the untested remainder, whatever the model', async () => {
    const j = JSON.parse((await run(['limit', '--sample', '80', '--deviations', '2', '--confidence', '95', '--tolerable', '6', '--population', '100', '--model', 'binomial', '--json'])).out);
    expect(j.extensionSize).toBeNull();
    expect(j.extensionNote).toMatch(/even testing all 100 units \(20 untested\)/);
  });

  it('limit --expected adds the risk of underreliance in plain words', async () => {
    // 1 − BinomCDF(1; 78, 1%) = 0.183637 (tests/reference/plan-risks.json, exact rational arithmetic).
    const r = await run(['limit', '--sample', '78', '--deviations', '1', '--confidence', '95', '--tolerable', '6', '--expected', '1']);
    expect(r.out).toMatch(/Risk of underreliance\s+18\.4% \(exact 18\.3637%\): the chance that 78 items show more than 1\s+deviation/);
    const bad = await run(['limit', '--sample', '78', '--deviations', '1', '--confidence', '95', '--expected', '1']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--expected needs --tolerable/);
  });

  it('size shows the acceptance number and the risk of underreliance', async () => {
    const r = await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1']);
    expect(r.out).toMatch(/Acceptance number\s+1: the results support reliance with at most 1 deviation in 78/);
    expect(r.out).toMatch(/Risk of underreliance\s+18\.4% \(exact 18\.3637%\)/);
    expect(r.out).not.toMatch(/Remark:/);
  });

  it('size --underreliance 10 plans for both risks: 103 items, at most 2 deviations', async () => {
    // 103/2: BinomCDF(2; 103, 6%) = 4.9455% ≤ 5%; 1 − BinomCDF(2; 103, 1%) = 8.4974% ≤ 10%; no smaller n meets both
    // (tests/reference/plan-risks.json, exact rational arithmetic).
    const r = await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--underreliance', '10']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^Sample size: 103 \(planned for both risks\)$/m);
    expect(r.out).toMatch(/Risk of underreliance\s+8\.5% \(exact 8\.4974%\)/);
    const j = JSON.parse((await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--underreliance', '10', '--json'])).out);
    expect(j).toMatchObject({ sampleSize: 103, acceptanceNumber: 2 });
  });

  it('size --two-stage prints the plan, its exact risks over both stages and the single stage beside it', async () => {
    const r = await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--two-stage']);
    expect(r.code).toBe(0);
    const j = JSON.parse((await run(['size', '--confidence', '95', '--tolerable', '6', '--expected', '1', '--two-stage', '--json'])).out);
    expect(j.overrelianceRisk).toBeLessThanOrEqual(0.05);
    expect(j.averageSampleNumber).toBeLessThan(78);
    expect(r.out).toMatch(new RegExp(`^Two-stage plan: ${j.plan.firstSampleSize} items, then ${j.plan.secondSampleSize} more if needed$`, 'm'));
    expect(r.out).toMatch(/One stage instead\s+78 items, at most 1 deviation/);
    expect(r.out).toMatch(/a second stage added\s+after the first results are seen is an extension/);
  });

  it('sizes above 200 get a remark labelled as common practice (size and table)', async () => {
    const r = await run(['size', '--confidence', '95', '--tolerable', '4', '--expected', '2']);
    expect(r.out).toMatch(/^Sample size: 294$/m); // AICPA 95% table, 4% / 2%: 294 (6), from memory
    expect(r.out).toMatch(/Remark: 294 items is far more than tests of controls usually use \(common practice/);
    const t = await run(['table', '--confidence', '95', '--tolerable', '4', '--expected', '2']);
    expect(t.out).toMatch(/294 \(6\)\*/);
    expect(t.out).toMatch(/\*\s+more than 200 items/);
  });
});
