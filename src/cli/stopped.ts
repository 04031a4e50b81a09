/**
 * What the CLI says when an interview is stopped with Ctrl-C. The interview's stop carries the
 * workpaper it had open (only once that file holds something) and whether the answers of the
 * step in progress were kept, so the message can name the file and the command that continues it.
 */
export interface StopInfo {
  /** The workpaper file, when it was saved at least once. */
  workpaper?: string | undefined;
  /** The answers given in the step in progress were saved, to be offered again. */
  keptUnfinished?: boolean | undefined;
}

export function stoppedMessage(cwd: string, relativeTo: (from: string, to: string) => string, info: StopInfo = {}, invocation = 'tolrate'): string {
  if (!info.workpaper) return '\nStopped before any step was answered: nothing was saved.\n';
  const r = relativeTo(cwd, info.workpaper);
  const shown = r && !r.startsWith('..') ? r : info.workpaper;
  const q = /\s/.test(shown) ? `"${shown}"` : shown;
  const kept = info.keptUnfinished ? ' The answers given so far in the step you stopped in are kept and offered again.' : '';
  return `\nStopped. ${shown} holds every step answered before this question.${kept}\nContinue with: ${invocation} ${q}\n`;
}
