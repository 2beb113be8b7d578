#!/usr/bin/env node
/**
 * Assembles every WebAssembly text file `packages/<pkg>/src/**\/NAME.wat` into `NAME.wasm.ts` beside it
 * (`export const wasm = '<base64>'`, read with `createKernel` from `@motorprint/model/kernels`), with
 * wabt's wat2wasm (SIMD enabled). Run by `pnpm build` before tsc; a file is written only when it
 * changes. `--check` writes nothing and exits 1 when a `.wasm.ts` is missing or differs from its
 * `.wat` (the test `kernelsAssembled.test.ts` runs the same comparison).
 *
 * The `.wasm.ts` files are committed, so the packages build and the tests run from the sources
 * alone; where wabt is not installed this script says so and leaves them as they are.
 */
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const check = process.argv.includes('--check');

/** Every `.wat` under packages/<pkg>/src (tests excluded). */
export function kernelSources(base = root) {
  const found = [];
  const walk = (dir) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      if (entry.name === '__tests__' || entry.name === 'node_modules') continue;
      const path = join(dir, entry.name);
      if (entry.isDirectory()) walk(path);
      else if (entry.name.endsWith('.wat')) found.push(path);
    }
  };
  for (const pkg of readdirSync(join(base, 'packages'))) {
    const src = join(base, 'packages', pkg, 'src');
    if (existsSync(src)) walk(src);
  }
  return found.sort();
}

/** The `.wasm.ts` text for a `.wat` file (wabt's factory passed in). */
export function assembledText(wabt, watPath, base = root) {
  const module = wabt.parseWat(watPath, readFileSync(watPath, 'utf8'), { simd: true });
  try {
    module.resolveNames();
    module.validate();
    const { buffer } = module.toBinary({ log: false, write_debug_names: false });
    const name = relative(base, watPath).split('\\').join('/');
    return `// motorprint: assembled by scripts/assemble-kernels.mjs from ${name.split('/').pop()} (do not edit; edit the .wat and run pnpm build)\n`
      + `/** The WebAssembly binary of ${name}, base64. */\nexport const wasm =\n  '${Buffer.from(buffer).toString('base64')}';\n`;
  } finally {
    module.destroy();
  }
}

const isMain = process.argv[1] !== undefined && resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const sources = kernelSources();
  let wabtFactory = null;
  try {
    wabtFactory = (await import(createRequire(join(root, 'package.json')).resolve('wabt'))).default;
  } catch {
    console.error('assemble-kernels: wabt is not installed; the committed .wasm.ts files are used as they are');
  }
  if (wabtFactory !== null && sources.length > 0) {
    const wabt = await wabtFactory();
    let stale = 0;
    for (const wat of sources) {
      const target = wat.replace(/\.wat$/, '.wasm.ts');
      const text = assembledText(wabt, wat);
      const current = existsSync(target) ? readFileSync(target, 'utf8') : null;
      if (current === text) continue;
      if (check) {
        console.error(`assemble-kernels: ${relative(root, target)} is ${current === null ? 'missing' : 'out of date'}; run pnpm build`);
        stale++;
      } else {
        writeFileSync(target, text);
        console.error(`assemble-kernels: wrote ${relative(root, target)}`);
      }
    }
    if (stale > 0) process.exit(1);
  }
}
