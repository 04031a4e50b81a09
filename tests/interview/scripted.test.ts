import { describe, expect, it } from 'vitest';
import { ScriptedAsker, ScriptError } from '../../src/interview/scripted.js';
import { isStop } from '../../src/interview/asker.js';
import { rate } from '../../src/interview/parse.js';

describe('the scripted answerer', () => {
  it('runs the question\'s own validation, shows the refusal and takes the next answer', async () => {
    const a = new ScriptedAsker({ tdr: ['six', '150', '6%'] });
    const v = await a.text({ id: 'tdr', message: 'Tolerable rate', parse: rate('Tolerable rate') });
    expect(v).toBe(0.06);
    expect(a.refusals.map((r) => r.answer)).toEqual(['six', '150']);
    expect(a.refusals[0]!.message).toMatch(/"six" is not a percentage/);
    expect(a.refusals[1]!.message).toMatch(/150% is out of range/);
    expect(a.ids).toEqual(['tdr', 'tdr', 'tdr']);
  });

  it('a single answer is reused, but a refused single answer is a script error, not a loop', async () => {
    const a = new ScriptedAsker({ x: 'y' });
    expect(await a.confirm({ id: 'x', message: 'ok?' })).toBe(true);
    expect(await a.confirm({ id: 'x', message: 'ok?' })).toBe(true);
    const b = new ScriptedAsker({ x: 'maybe' });
    await expect(b.confirm({ id: 'x', message: 'ok?' })).rejects.toBeInstanceOf(ScriptError);
  });

  it('an empty answer takes the default; a missing answer is an error unless defaults are allowed', async () => {
    const a = new ScriptedAsker({ c: '' });
    expect(await a.text({ id: 'c', message: 'Confidence', default: '95', parse: rate('Confidence') })).toBe(0.95);
    await expect(a.text({ id: 'missing', message: 'm', parse: (t) => t })).rejects.toThrow(/No scripted answer for question "missing"/);
    const d = new ScriptedAsker({}, { defaults: true });
    expect(await d.select({ id: 's', message: 'pick', choices: [{ value: 'a', name: 'A' }, { value: 'b', name: 'B' }], default: 'b' })).toBe('b');
  });

  it('select answers must be one of the choices', async () => {
    const a = new ScriptedAsker({ s: ['c', 'a'] });
    expect(await a.select({ id: 's', message: 'pick', choices: [{ value: 'a', name: 'A' }, { value: 'b', name: 'B' }] })).toBe('a');
    expect(a.refusals[0]!.message).toBe('"c" is not one of the choices: a, b.');
  });

  it('patterns answer families of questions; an exact id wins', async () => {
    const a = new ScriptedAsker({ 'record.item.*.A1.result': 'conforms', 'record.item.3.A1.result': 'deviation' });
    const q = (seq: number) => a.select({ id: `record.item.${seq}.A1.result`, message: 'r', choices: [{ value: 'conforms', name: 'C' }, { value: 'deviation', name: 'D' }] });
    expect([await q(1), await q(2), await q(3), await q(4)]).toEqual(['conforms', 'conforms', 'deviation', 'conforms']);
  });

  it('stops like Ctrl-C at the question asked for', async () => {
    const a = new ScriptedAsker({ a: 'x', b: 'y' }, { stopAt: 1 });
    await a.text({ id: 'a', message: 'a', parse: (t) => t });
    const e = await a.text({ id: 'b', message: 'b', parse: (t) => t }).catch((x: unknown) => x);
    expect(isStop(e)).toBe(true);
    expect((e as Error).name).toBe('ExitPromptError');
  });
});

describe('a rate below 1 typed without a % sign', () => {
  it('is confirmed before it is used; "no" asks the rate again', async () => {
    const { askRate } = await import('../../src/interview/rate-question.js');
    const a = new ScriptedAsker({ tdr: ['0.05', '5'], 'tdr.belowOnePercent': false });
    expect(await askRate(a, { id: 'tdr', message: 'Tolerable rate (%)', parse: rate('Tolerable rate') })).toBe(0.05);
    expect(a.ids).toEqual(['tdr', 'tdr.belowOnePercent', 'tdr']);
    expect(a.asked[1]!.message).toBe('0.05 is read as 0.05%, not 5%. Keep 0.05%?');
    const b = new ScriptedAsker({ edr: '0,5', 'edr.belowOnePercent': true });
    expect(await askRate(b, { id: 'edr', message: 'Expected rate (%)', parse: rate('Expected rate', { allowZero: true }) })).toBe(0.005);
    // a % sign, a rate of 1 or more, or Enter on the default is not asked again
    const c = new ScriptedAsker({ x: '0.5%', y: '6', z: '' });
    expect(await askRate(c, { id: 'x', message: 'm', parse: rate('R') })).toBe(0.005);
    expect(await askRate(c, { id: 'y', message: 'm', parse: rate('R') })).toBe(0.06);
    expect(await askRate(c, { id: 'z', message: 'm', default: '0.5', parse: rate('R') })).toBe(0.005);
    expect(c.ids).toEqual(['x', 'y', 'z']);
  });

  it('a confidence such as 0.95 is refused with the reading that was probably meant', async () => {
    const a = new ScriptedAsker({ c: ['0.95', '95'] });
    expect(await a.text({ id: 'c', message: 'Confidence', parse: rate('Confidence', { atLeast: 0.5 }) })).toBe(0.95);
    expect(a.refusals[0]!.message).toBe('Confidence: 0.95 is read as 0.95%; write 95 for 95%.');
  });
});
