/**
 * Stopping at any question leaves the last answered step on file, and continuing the workpaper
 * finishes the test with the same result as a run that was never stopped. Every question is
 * tried; the questions are shared out over the files tests/interview/interrupt-N.test.ts (N =
 * 1..PARTS, question i in part i mod PARTS) so that vitest runs the parts side by side.
 */
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { wholeInterview } from '../../src/interview/stages.js';
import { isStop } from '../../src/interview/asker.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

function script(total: string): ScriptAnswers {
  return {
    ...planAnswers(total),
    'plan.attributes.A2.tolerableRate': '',
    'plan.approach.tolerableRate': ['0', '15'],
    'plan.approach.expectedRate': '0',
    'plan.selection.spares': '2',
    'record.source': 'type', ...FIELDWORK_ANSWERS,
    'record.item.*.A1.result': 'conforms',
    'record.item.*.A2.result': 'conforms',
    'record.item.2.A1.result': 'void',
    'record.item.2.void': 'Cancelled voucher',
    'record.item.5.A2.result': 'deviation',
    'record.item.5.A2.found': 'No invoice attached',
    'record.item.5.A2.cause': 'evidence-missing',
    'record.item.5.A2.intent': 'no',
    'record.item.5.A2.pattern': 'isolated',
    ...concludeAnswers(),
  };
}

/** The workpaper without what differs between runs by design: id, times and the log. */
function comparable(wp: Workpaper): unknown {
  const x = JSON.parse(JSON.stringify(wp)) as Record<string, any>;
  for (const k of ['id', 'createdAt', 'updatedAt', 'log']) delete x[k];
  delete x.population?.scannedAt;
  delete x.selection?.selectedAt;
  delete x.results?.recordedAt;
  delete x.evaluation?.evaluatedAt;
  delete x.conclusion?.concludedAt;
  return x;
}

async function run(dir: string, answers: ScriptAnswers, stopAt?: number): Promise<ScriptedAsker> {
  const asker = new ScriptedAsker(answers, stopAt !== undefined ? { stopAt } : {});
  await wholeInterview(captureContext(dir), asker, { file: 't.tolrate.json', now: fixedClock() });
  return asker;
}

export const PARTS = 3;

/** The test of the questions i with i mod PARTS = part. */
export function interruptPart(part: number): void {
  describe(`interruption at every question (part ${part + 1} of ${PARTS})`, () => {
    it('resuming after a stop at question i gives the same workpaper as an uninterrupted run, for every i of this part', async () => {
      const base = tempDir();
      const { total } = writePopulation(base);
      const answers = script(total);
      const whole = await run(base, answers);
      const reference = loadWorkpaper(join(base, 't.tolrate.json'));
      expect(reference.signoffs?.preparer).toBeDefined();
      const count = whole.questionCount;
      expect(count).toBeGreaterThan(60);
      let tried = 0;
      for (let i = part; i < count; i += PARTS) {
        tried++;
        const dir = tempDir();
        writePopulation(dir);
        const stopped = await run(dir, answers, i).then(
          () => undefined,
          (e: unknown) => e,
        );
        expect(isStop(stopped), `question ${i} (${whole.ids[i]})`).toBe(true);
        const path = join(dir, 't.tolrate.json');
        if (existsSync(path)) expect(verifyLog(loadWorkpaper(path)), `log after a stop at ${i}`).toEqual([]);
        await run(dir, answers);
        const wp = loadWorkpaper(path);
        expect(verifyLog(wp)).toEqual([]);
        expect(comparable(wp), `resumed after a stop at question ${i} (${whole.ids[i]})`).toEqual(comparable(reference));
      }
      expect(tried).toBeGreaterThan(count / PARTS - 1);
      // Every part has its file, so together they try every question.
      for (let k = 1; k <= PARTS; k++) expect(existsSync(join(__dirname, `interrupt-${k}.test.ts`)), `interrupt-${k}.test.ts`).toBe(true);
    }, 180_000);
  });
}
