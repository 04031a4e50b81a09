/**
 * What every command receives. Commands never touch process.* directly, so each one runs in
 * tests with captured output and injected prompts.
 */
export interface Output {
  write(text: string): unknown;
}

export interface CommandContext {
  stdout: Output;
  stderr: Output;
  /** True when stdout and stdin are a terminal (interviews need it; progress bars use it). */
  isTTY: boolean;
  /** False when NO_COLOR is set or stdout is not a terminal. */
  color: boolean;
  cwd: string;
  env: Record<string, string | undefined>;
  /** How tolrate was started (`tolrate`, `npx tolrate`, `node dist/cli.js`), for the commands it prints. Default `tolrate`. */
  invocation?: string;
}

/** A command module (src/commands/NAME/index.ts) exports `run` with this signature. */
export type CommandRun = (args: string[], ctx: CommandContext) => Promise<number>;
