/**
 * The questions the interview asks, independent of how they are answered.
 *
 * Every question has a stable `id` (e.g. "plan.engagement.entity", "record.item.12.A1.result")
 * so that a scripted answerer can answer it by name. Two implementations exist: the terminal
 * one (terminal.ts, over @inquirer/prompts, imported lazily) and the scripted one (scripted.ts,
 * used by the tests and by `tolrate demo`). Both run the same `parse` function, so a typed
 * answer and a scripted answer are validated the same way: a parse that throws shows its
 * message and asks again.
 */

export interface Question {
  /** Stable identifier, dot-separated: stage.section.field (item numbers and attribute ids where needed). */
  id: string;
  /** The question as shown. */
  message: string;
  /** One or two lines shown under the question (what is expected, what counts as what). */
  help?: string;
}

export interface TextQuestion<T> extends Question {
  /** Shown as the default; an empty answer takes it. */
  default?: string;
  /** On a terminal, put the default in the line for editing (for long texts the user may reword). */
  editable?: boolean;
  /**
   * Turn the typed text into the answer. Throw an Error (any kind) to refuse it: its message is
   * shown and the question is asked again.
   */
  parse: (text: string) => T;
}

export interface Choice<T extends string> {
  value: T;
  name: string;
  description?: string;
}

export interface SelectQuestion<T extends string> extends Question {
  choices: readonly Choice<T>[];
  default?: T;
}

export interface ConfirmQuestion extends Question {
  default?: boolean;
}

export interface Asker {
  text<T>(q: TextQuestion<T>): Promise<T>;
  select<T extends string>(q: SelectQuestion<T>): Promise<T>;
  confirm(q: ConfirmQuestion): Promise<boolean>;
}

/** The message of whatever a parse function threw. */
export function refusal(e: unknown): string {
  if (e instanceof Error) {
    const details = (e as { details?: unknown }).details;
    const extra = Array.isArray(details) && details.length > 0 ? ` ${details.join('; ')}` : '';
    return `${e.message}${extra}`;
  }
  return String(e);
}

/** Raised by an answerer when the user stops the interview (Ctrl-C); same name as inquirer's. */
export class InterviewStopped extends Error {
  /** The workpaper file, once it holds something (the stop message names it). */
  workpaper?: string;
  /** The answers given in the step in progress were kept in the workpaper. */
  keptUnfinished?: boolean;
  /** Said instead of the usual stop message: a save had just failed, so the last answer is not on disk. */
  stopNote?: string;
  constructor(message = 'The interview was stopped.') {
    super(message);
    this.name = 'ExitPromptError';
  }
}

/** True for a stop request from either answerer (inquirer's ExitPromptError or ours). */
export function isStop(e: unknown): boolean {
  return e instanceof Error && (e.name === 'ExitPromptError' || e.name === 'AbortPromptError');
}
