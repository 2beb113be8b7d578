import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { SUBCOMMANDS } from '../commands/index.js';

const src = resolve(dirname(fileURLToPath(import.meta.url)), '..');

/**
 * Every module reached from `file` through static value imports (`import … from`, `export … from`,
 * bare `import '…'`; not `import type` and not dynamic `import()`), as paths for our own modules
 * and specifiers for packages.
 */
function staticImports(file: string, seen = new Set<string>()): Set<string> {
  if (seen.has(file)) return seen;
  seen.add(file);
  const text = readFileSync(file, 'utf8');
  const pattern = /^\s*(?:import|export)\s+(?!type\s)(?:[^'";]*?\sfrom\s+)?['"]([^'"]+)['"]/gm;
  for (const m of text.matchAll(pattern)) {
    const spec = m[1]!;
    if (spec.startsWith('.')) staticImports(join(dirname(file), spec.replace(/\.js$/, '.ts')), seen);
    else seen.add(spec);
  }
  return seen;
}

describe('the command line loads a subcommand only when it runs', () => {
  it('reaches no library package and no subcommand module from the executable by static imports', () => {
    // The executable imports runCli only dynamically (after choosing between the bundle and the
    // modules, bundledCli.ts): the walk covers both.
    const main = readFileSync(join(src, 'main.ts'), 'utf8');
    expect(main).toMatch(/await import\('\.\/runCli\.js'\)/);
    const reached = [...staticImports(join(src, 'main.ts')), ...staticImports(join(src, 'runCli.ts'))];
    // The walk itself works: it finds the bundle loader and the help text's own modules.
    expect(reached).toContain(join(src, 'bundledCli.ts'));
    expect(reached).toContain(join(src, 'cautions.ts'));
    const packages = reached.filter((s) => !s.startsWith('/') && !s.startsWith('node:'));
    expect(packages, 'packages imported on the way to --help').toEqual([]);
    const commands = reached.filter((s) => s.startsWith(join(src, 'commands')) && !s.endsWith(join('commands', 'index.ts')));
    expect(commands, 'subcommand modules imported on the way to --help').toEqual([]);
  });
  it('lists each subcommand under the name and summary its module gives', async () => {
    expect(SUBCOMMANDS.map((c) => c.name)).toEqual(['fit', 'inspect', 'lot', 'plan', 'show', 'simulate']);
    for (const entry of SUBCOMMANDS) {
      const sub = await entry.load();
      expect(sub.name).toBe(entry.name);
      expect(sub.summary, `summary of ${entry.name}`).toBe(entry.summary);
      expect(sub.help).toContain(`motorprint ${entry.name}`);
    }
  });
});
