/** Levenshtein edit distance, for "did you mean" suggestions (commands, flags, columns, placeholders). */
export function editDistance(a: string, b: string): number {
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) {
      cur[j] = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
    prev = cur;
  }
  return prev[b.length]!;
}

/**
 * Wrap text at `width` columns without splitting words. Each line of the input is a paragraph
 * of its own; `indent` is put before every output line (and counts towards the width).
 */
export function wrap(text: string, width = 92, indent = ''): string[] {
  const out: string[] = [];
  for (const para of text.split('\n')) {
    let line = '';
    for (const w of para.split(/\s+/).filter(Boolean)) {
      if (line && line.length + 1 + w.length > width - indent.length) {
        out.push(indent + line);
        line = w;
      } else line = line ? `${line} ${w}` : w;
    }
    out.push(indent + line);
  }
  return out;
}

function commonPrefix(a: string, b: string): number {
  let i = 0;
  while (i < a.length && i < b.length && a[i] === b[i]) i++;
  return i;
}

/** The closest candidate to `word`, or undefined when nothing is reasonably close. */
export function nearest(word: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  for (const c of candidates) {
    const d = c.startsWith(word) || word.startsWith(c) ? Math.min(1, editDistance(word, c)) : editDistance(word, c);
    // On a tie, prefer the longer common prefix (--sede -> --seed, not --size).
    if (d < bestD || (d === bestD && best !== undefined && commonPrefix(c, word) > commonPrefix(best, word))) {
      bestD = d;
      best = c;
    }
  }
  const limit = Math.max(2, Math.floor(word.length / 3));
  return bestD <= limit ? best : undefined;
}
