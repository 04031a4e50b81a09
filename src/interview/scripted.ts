/**
 * A scripted answerer: answers questions by id from a table, running each question's own
 * validation exactly as the terminal does, and recording every question asked and every
 * refusal shown. Used by the tests and by `tolrate demo`.
 *
 * Answers table: `{ "plan.engagement.entity": "Brackenmoor Kilnworks Ltd", ... }`.
 * - A list (`["6.5x", "6"]`) is used one answer per asking, in order: a refused answer is
 *   followed by the next one, as a user would retype. Running out of a list is an error.
 * - A single value is used every time the question is asked.
 * - `""` or `null` presses Enter (takes the question's default).
 * - A key may contain `*` (any run of characters): `"record.item.*.A1.result": "conforms"`.
 *   An exact key wins over a pattern; patterns are tried in the order given.
 * - Confirm answers: true/false or "yes"/"no"/"y"/"n". Select answers: the choice's value.
 */
import type { Asker, ConfirmQuestion, Question, SelectQuestion, TextQuestion } from './asker.js';
import { InterviewStopped, refusal } from './asker.js';

export type ScriptValue = string | number | boolean | null;
export type ScriptAnswers = Record<string, ScriptValue | ScriptValue[]>;

export interface AskedRecord {
  /** 0-based order in which questions were asked. */
  index: number;
  id: string;
  message: string;
  /** The answer given, as text ("" = Enter). */
  answer: string;
  /** The refusal shown, when the answer was refused. */
  refused?: string;
}

export interface ScriptedOptions {
  /** Stop (as Ctrl-C does) when this question (0-based, counting every asking) comes up. */
  stopAt?: number;
  /** When a question has no scripted answer: take its default if it has one (else fail). */
  defaults?: boolean;
  /** Called with each question and answer, e.g. to print them as they are asked. */
  onAsk?: (record: AskedRecord) => void;
}

/** The script does not fit the interview (a test or demo bug, not a user error). */
export class ScriptError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ScriptError';
  }
}

function globToRegExp(glob: string): RegExp {
  const esc = glob.replace(/[.+?^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '.*');
  return new RegExp(`^${esc}$`);
}

export class ScriptedAsker implements Asker {
  /** Every asking, in order, including refused answers. */
  readonly asked: AskedRecord[] = [];
  private readonly cursor = new Map<string, number>();
  private readonly patterns: Array<{ key: string; re: RegExp }>;
  private count = 0;

  constructor(
    private readonly answers: ScriptAnswers,
    private readonly options: ScriptedOptions = {},
  ) {
    this.patterns = Object.keys(answers)
      .filter((k) => k.includes('*'))
      .map((key) => ({ key, re: globToRegExp(key) }));
  }

  /** The refusals shown, in order: what a user would have read after a wrong answer. */
  get refusals(): Array<{ id: string; answer: string; message: string }> {
    return this.asked.filter((a) => a.refused !== undefined).map((a) => ({ id: a.id, answer: a.answer, message: a.refused! }));
  }

  /** Ids of the questions asked, in order (each id once per asking). */
  get ids(): string[] {
    return this.asked.map((a) => a.id);
  }

  /** Number of questions asked so far. */
  get questionCount(): number {
    return this.count;
  }

  private keyFor(id: string): string | undefined {
    if (Object.prototype.hasOwnProperty.call(this.answers, id)) return id;
    return this.patterns.find((p) => p.re.test(id))?.key;
  }

  /** The next scripted answer for `q`, or undefined to take the default. */
  private next(q: Question, hasDefault: boolean): { value: ScriptValue; reusable: boolean } | undefined {
    if (this.options.stopAt !== undefined && this.count >= this.options.stopAt) {
      throw new InterviewStopped(`Stopped at question ${this.count} (${q.id}).`);
    }
    this.count++;
    const key = this.keyFor(q.id);
    if (key === undefined) {
      if (this.options.defaults && hasDefault) return undefined;
      throw new ScriptError(`No scripted answer for question "${q.id}" (${q.message}).`);
    }
    const v = this.answers[key]!;
    if (!Array.isArray(v)) return { value: v, reusable: true };
    const i = this.cursor.get(key) ?? 0;
    if (i >= v.length) throw new ScriptError(`The scripted answers for "${key}" ran out at question "${q.id}" (${q.message}).`);
    this.cursor.set(key, i + 1);
    return { value: v[i]!, reusable: false };
  }

  private record(q: Question, answer: string, refused?: string): void {
    const r: AskedRecord = { index: this.asked.length, id: q.id, message: q.message, answer, ...(refused !== undefined ? { refused } : {}) };
    this.asked.push(r);
    this.options.onAsk?.(r);
  }

  /** Retry loop shared by the three kinds: a reusable answer that is refused would loop for ever. */
  private async loop<T>(q: Question, hasDefault: boolean, attempt: (v: ScriptValue | undefined) => T): Promise<T> {
    for (;;) {
      const got = this.next(q, hasDefault);
      const shown = got === undefined || got.value === null ? '' : String(got.value);
      try {
        const value = attempt(got?.value ?? undefined);
        this.record(q, shown);
        return value;
      } catch (e) {
        if (e instanceof ScriptError || e instanceof InterviewStopped) throw e;
        const message = refusal(e);
        this.record(q, shown, message);
        if (!got || got.reusable) {
          throw new ScriptError(`The scripted answer "${shown}" for "${q.id}" is refused, and it is the only one: ${message}`);
        }
      }
    }
  }

  async text<T>(q: TextQuestion<T>): Promise<T> {
    return this.loop(q, q.default !== undefined, (v) => {
      const typed = v === undefined || v === null ? '' : String(v);
      return q.parse(typed === '' && q.default !== undefined ? q.default : typed);
    });
  }

  async select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    return this.loop(q, true, (v) => {
      if (v === undefined || v === null || v === '') {
        const d = q.default ?? q.choices[0]?.value;
        if (d === undefined) throw new ScriptError(`Question "${q.id}" has no choices.`);
        return d;
      }
      const found = q.choices.find((c) => c.value === String(v));
      if (!found) throw new Error(`"${String(v)}" is not one of the choices: ${q.choices.map((c) => c.value).join(', ')}.`);
      return found.value;
    });
  }

  async confirm(q: ConfirmQuestion): Promise<boolean> {
    return this.loop(q, q.default !== undefined, (v) => {
      if (v === undefined || v === null || v === '') {
        if (q.default === undefined) throw new Error('Answer yes or no.');
        return q.default;
      }
      if (typeof v === 'boolean') return v;
      const t = String(v).trim().toLowerCase();
      if (t === 'y' || t === 'yes' || t === 'true') return true;
      if (t === 'n' || t === 'no' || t === 'false') return false;
      throw new Error(`"${String(v)}": answer yes or no.`);
    });
  }
}
