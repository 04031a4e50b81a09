/**
 * The terminal answerer, over @inquirer/prompts. The library is imported on first use only, so
 * commands that never ask anything (and `tolrate --help`) do not load it.
 */
import type { Asker, ConfirmQuestion, SelectQuestion, TextQuestion } from './asker.js';
import { refusal } from './asker.js';
import { wrap } from './show.js';
import type { Output } from '../commands/types.js';
import { visible } from '../io/text.js';

type Prompts = typeof import('@inquirer/prompts');

export interface TerminalOptions {
  /** Where help lines are written (the same stream inquirer draws on). */
  out: Output;
  color: boolean;
}

export class TerminalAsker implements Asker {
  private prompts: Prompts | undefined;

  constructor(private readonly options: TerminalOptions) {}

  private async load(): Promise<Prompts> {
    this.prompts ??= await import('@inquirer/prompts');
    return this.prompts;
  }

  private help(text: string | undefined): void {
    if (!text) return;
    // Wrapped here so that a long help line does not break mid-word at the terminal's edge.
    // A blank line before it groups the help with the question below it, not the answer above.
    const lines = wrap(visible(text, { keepLines: true }), 94, '  ').join('\n');
    this.options.out.write(this.options.color ? `\n\x1b[2m${lines}\x1b[22m\n` : `\n${lines}\n`);
  }

  async text<T>(q: TextQuestion<T>): Promise<T> {
    const { input } = await this.load();
    this.help(q.help);
    const typed = await input({
      // Messages and choices may quote keys and values from files: their control characters are shown, not sent.
      message: visible(q.message),
      ...(q.default !== undefined && q.default !== '' ? { default: q.default } : {}),
      ...(q.editable && q.default ? { prefill: 'editable' as const } : {}),
      validate: (v: string) => {
        try {
          q.parse(v);
          return true;
        } catch (e) {
          return visible(refusal(e), { keepLines: true });
        }
      },
    });
    return q.parse(typed);
  }

  async select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    const { select } = await this.load();
    this.help(q.help);
    const value = await select<T>({
      message: visible(q.message),
      choices: q.choices.map((c) => ({ value: c.value, name: visible(c.name), ...(c.description ? { description: visible(c.description) } : {}) })),
      ...(q.default !== undefined ? { default: q.default } : {}),
      pageSize: Math.min(12, Math.max(q.choices.length, 3)),
    });
    return value;
  }

  async confirm(q: ConfirmQuestion): Promise<boolean> {
    const { confirm } = await this.load();
    this.help(q.help);
    return confirm({ message: visible(q.message), ...(q.default !== undefined ? { default: q.default } : {}) });
  }
}
