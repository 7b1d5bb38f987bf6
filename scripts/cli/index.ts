// Registry of CLI commands. Each command lives in its own file and exports a CliCommand.
import { header } from './header';
import { agreement } from './agreement';
import { decompose } from './decompose';
import { denoise } from './denoise';
import { importRun } from './import';
export type CliCommand = {
  summary: string;
  /** The command's usage line(s), printed for --help. */
  usage: string;
  /** Runs the command with its arguments; returns the process exit code. */
  run: (args: string[]) => Promise<number>;
};

export const commands: Record<string, CliCommand> = {
  header,
  agreement,
  decompose,
  denoise,
  import: importRun,
};
