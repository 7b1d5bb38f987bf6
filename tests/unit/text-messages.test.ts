import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { AppError } from '@/lib/errors';
import { sentence } from '@/lib/text';
import { runEntitiesSchema, runUploadQuerySchema } from '@/lib/runs/schema';

// Punctuation of messages shown to people: one full stop ends a sentence (common practice, no source).

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) return sources(p);
    return /\.(ts|tsx)$/.test(name) ? [p] : [];
  });
}

describe('sentence', () => {
  it('adds a full stop only when the text has none', () => {
    expect(sentence('The run was not found')).toBe('The run was not found.');
    expect(sentence('Enter the subject label (the part after "sub-").')).toBe('Enter the subject label (the part after "sub-").');
    expect(sentence('Is this right?')).toBe('Is this right?');
    expect(sentence('  two  spaces  ')).toBe('two spaces.');
  });
});

describe('validation messages built from schema messages', () => {
  it('never end in ".." although the schema messages end in a full stop', () => {
    const bad = runUploadQuerySchema.safeParse({ name: 'x.nii', sub: '' });
    expect(bad.success).toBe(false);
    const err = AppError.fromZod(bad.error!, 'The upload');
    expect(err.message).toMatch(/[^.]\.$/);
    expect(err.message).toContain('Enter the subject label');
    const label = runEntitiesSchema.safeParse({ sub: 'sub-01' });
    const err2 = AppError.fromZod(label.error!);
    expect(err2.message.endsWith('..')).toBe(false);
    expect(err2.message).not.toMatch(/ {2}/);
  });
});

describe('message sources', () => {
  const files = ['lib', 'app', 'components'].flatMap((d) => sources(join(process.cwd(), d)));
  // a string literal whose text ends in ".." (not an ellipsis "...", not a relative path "../")
  const DOUBLE_STOP = /[A-Za-z0-9)\]”]\.\.['"`]/;
  // a sentence inside a literal with two spaces between words ("word.  Next", "a  b"; an indent after \n is fine)
  const DOUBLE_SPACE = /['"`][^'"`\n]*(?<!\\)[A-Za-z.,;:]  [A-Za-z][^'"`\n]*['"`]/;
  // a placeholder that already ends a sentence, followed by another full stop: `${x.message}.`
  const STOP_AFTER_MESSAGE = /\$\{[^}]*message[^}]*\}\.[`]/i;

  it('were found (the scan looks at the real tree)', () => {
    expect(files.length).toBeGreaterThan(100);
  });

  it('hold no literal ending in "..", no doubled spaces in text, no full stop after an interpolated message', () => {
    const found: string[] = [];
    for (const f of files) {
      readFileSync(f, 'utf8')
        .split('\n')
        .forEach((line, i) => {
          const code = line.trim();
          if (code.startsWith('//') || code.startsWith('*') || code.startsWith('import ')) return;
          if (DOUBLE_STOP.test(line) || DOUBLE_SPACE.test(line) || STOP_AFTER_MESSAGE.test(line))
            found.push(`${f.replace(process.cwd() + '/', '')}:${i + 1}: ${code.slice(0, 120)}`);
        });
    }
    expect(found).toEqual([]);
  });
});
