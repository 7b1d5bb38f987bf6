/**
 * The batch script of one cluster job, from a template with {{placeholders}}:
 *
 *   {{job_name}} {{partition}} {{account}} {{time}} {{cpus}} {{mem}} {{stdout}} {{stderr}}
 *   {{workdir}} {{quorum_home}} {{setup}} (the setup lines) {{command}} (the quoted CLI command)
 *
 * A line whose placeholder has no value (no partition, no account) is left out, so one template
 * serves clusters with and without those. Values are checked words or quoted for the shell.
 */
import { readFile } from 'node:fs/promises';

export const DEFAULT_TEMPLATE = `#!/bin/bash
#SBATCH --job-name={{job_name}}
#SBATCH --partition={{partition}}
#SBATCH --account={{account}}
#SBATCH --time={{time}}
#SBATCH --nodes=1
#SBATCH --ntasks=1
#SBATCH --cpus-per-task={{cpus}}
#SBATCH --mem={{mem}}
#SBATCH --output={{stdout}}
#SBATCH --error={{stderr}}
set -euo pipefail
{{setup}}
cd {{quorum_home}}
{{command}}
`;

/** Quotes one word for a POSIX shell ('…' with embedded quotes closed and reopened). */
export function shellQuote(word: string): string {
  return /^[\w@%+=:,./-]+$/.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}

export type ScriptValues = Record<string, string | null>;

/** Fills the template; an unknown placeholder is an error naming it. */
export function renderBatchScript(template: string, values: ScriptValues): string {
  const out: string[] = [];
  for (const line of template.split('\n')) {
    let drop = false;
    const filled = line.replace(/\{\{(\w+)\}\}/g, (_, name: string) => {
      if (!(name in values))
        throw new Error(
          `The batch script template uses {{${name}}}, which Quorum does not know; use ${Object.keys(values)
            .map((k) => `{{${k}}}`)
            .join(', ')}.`,
        );
      const v = values[name];
      if (v === null || v === '') drop = true;
      return v ?? '';
    });
    if (!drop || !line.trim().startsWith('#SBATCH')) out.push(filled);
  }
  return out.join('\n');
}

export async function loadTemplate(path: string | null): Promise<string> {
  if (!path) return DEFAULT_TEMPLATE;
  try {
    return await readFile(path, 'utf8');
  } catch {
    throw new Error(`The batch script template ${path} (QUORUM_SLURM_TEMPLATE) cannot be read.`);
  }
}
