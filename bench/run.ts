/**
 * Benchmark runner: `pnpm bench` runs every bench/<area>.ts; `pnpm bench ingest model` runs those.
 * Each area module exports a default async function that prints its own table.
 * Timings belong here, never in tests.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const available = readdirSync(here)
  .filter((f) => f.endsWith('.ts') && f !== 'run.ts')
  .map((f) => f.slice(0, -3))
  .sort();
const asked = process.argv.slice(2).filter((a) => !a.startsWith('-'));
const unknown = asked.filter((a) => !available.includes(a));
if (unknown.length > 0) {
  console.error(`bench: unknown area(s) ${unknown.join(', ')}; available: ${available.join(', ')}`);
  process.exit(2);
}
const areas = asked.length > 0 ? asked : available;
console.log(`motorprint bench — node ${process.version}, ${new Date().toISOString()}`);
for (const area of areas) {
  console.log(`\n## ${area}\n`);
  const mod = (await import(pathToFileURL(join(here, `${area}.ts`)).href)) as { default: () => Promise<void> };
  await mod.default();
}
