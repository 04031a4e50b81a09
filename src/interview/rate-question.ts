/**
 * A rate question that makes sure a number below 1 typed without a % sign was meant as a
 * percentage: "0.05" is read as 0.05%, but whoever typed it may have meant the fraction 0.05,
 * that is 5%. The interview then asks to confirm; "no" asks the rate again.
 */
import type { Asker, TextQuestion } from './asker.js';
import { isBareFraction } from '../util/percent.js';

export async function askRate<T extends number | undefined>(a: Asker, q: TextQuestion<T>): Promise<T> {
  for (;;) {
    let typed = '';
    const value = await a.text({
      ...q,
      parse: (t) => {
        typed = t;
        return q.parse(t);
      },
    });
    const text = typed.trim();
    // Enter on the default keeps an answer already given (and confirmed) or proposed by the tool.
    if (text === '' || text === q.default || !isBareFraction(text)) return value;
    const asPercent = String(Number((Number(text.replace(',', '.')) * 100).toPrecision(12)));
    const keep = await a.confirm({
      id: `${q.id}.belowOnePercent`,
      message: `${text} is read as ${text}%, not ${asPercent}%. Keep ${text}%?`,
      help: `Answer no to type the rate again (e.g. ${asPercent} for ${asPercent}%).`,
      default: false,
    });
    if (keep) return value;
  }
}
