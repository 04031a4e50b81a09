/**
 * What the CLI says when an interview is stopped with Ctrl-C: the interview records here which
 * workpaper it has open, so the message can name the file and the command that continues it.
 */
let openWorkpaper: string | undefined;

export function setOpenWorkpaper(path: string | undefined): void {
  openWorkpaper = path;
}

export function stoppedMessage(cwd: string, relativeTo: (from: string, to: string) => string): string {
  if (!openWorkpaper) return '\nStopped before any step was answered: nothing was saved.\n';
  const r = relativeTo(cwd, openWorkpaper);
  const shown = r && !r.startsWith('..') ? r : openWorkpaper;
  const q = /\s/.test(shown) ? `"${shown}"` : shown;
  return `\nStopped. ${shown} holds every step answered before this question.\nContinue with: tolrate ${q}\n`;
}
