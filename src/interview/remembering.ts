/**
 * An answerer that remembers the answers given since the last save, so that a step stopped
 * half-way (Ctrl-C) can keep them, and that offers answers kept from such a step as the
 * defaults when the same questions are asked again.
 */
import type { Asker, ConfirmQuestion, SelectQuestion, TextQuestion } from './asker.js';

export class RememberingAsker implements Asker {
  private answers: Record<string, string | boolean> = {};

  constructor(
    private readonly inner: Asker,
    /** Answers kept from a step that was stopped, by question id. */
    private offered: Record<string, string | boolean>,
  ) {}

  /** The answers given since the last save, by question id. */
  given(): Record<string, string | boolean> {
    return { ...this.answers };
  }

  /** Offer more answers as defaults (they replace earlier offers for the same questions). */
  offer(answers: Record<string, string | boolean>): void {
    Object.assign(this.offered, answers);
  }

  /** Everything answered so far is saved. */
  forget(): void {
    this.answers = {};
  }

  async text<T>(q: TextQuestion<T>): Promise<T> {
    const kept = this.offered[q.id];
    const typedText: { value?: string } = {};
    const got = await this.inner.text({
      ...q,
      ...(typeof kept === 'string' ? { default: kept } : {}),
      parse: (t: string) => {
        typedText.value = t;
        return q.parse(t);
      },
    });
    delete this.offered[q.id];
    const remembered = typeof got === 'string' || typeof got === 'number' ? String(got) : typedText.value;
    if (remembered !== undefined) this.answers[q.id] = remembered;
    return got;
  }

  async select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    const kept = this.offered[q.id];
    const keep = typeof kept === 'string' && q.choices.some((c) => c.value === kept);
    const got = await this.inner.select({ ...q, ...(keep ? { default: kept as T } : {}) });
    delete this.offered[q.id];
    this.answers[q.id] = got;
    return got;
  }

  async confirm(q: ConfirmQuestion): Promise<boolean> {
    const kept = this.offered[q.id];
    const got = await this.inner.confirm({ ...q, ...(typeof kept === 'boolean' ? { default: kept } : {}) });
    delete this.offered[q.id];
    this.answers[q.id] = got;
    return got;
  }
}
