#!/usr/bin/env node
/**
 * `pnpm pack:all [DIR]`: builds every package (scripts/build.mjs: tsc --build, only what changed) and writes a tarball of
 * every public package (not `"private": true`) into DIR, default out/packages/. Tarballs left there by
 * an earlier run are removed first. `pnpm pack` turns the `workspace:*` and `catalog:` ranges into
 * versions, so the tarballs installed together in one `npm install` resolve each other and take
 * third-party packages from the registry.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const dest = resolve(process.argv[2] ?? join(root, 'out', 'packages'));
const rootManifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));

/** How to run pnpm: the one running this script when there is one, else pnpm on PATH, else npx. */
function pnpmCommand() {
  const execPath = process.env.npm_execpath ?? '';
  if (/pnpm/i.test(execPath)) return /\.[cm]?js$/.test(execPath) ? [process.execPath, execPath] : [execPath];
  try {
    execFileSync('pnpm', ['--version'], { stdio: 'ignore' });
    return ['pnpm'];
  } catch {
    return ['npx', '-y', rootManifest.packageManager ?? 'pnpm'];
  }
}

// The workspace build: tsc --build, then the bundled vendor modules (scripts/build.mjs).
execFileSync(process.execPath, [join(root, 'scripts', 'build.mjs')], { cwd: root, stdio: 'inherit' });

mkdirSync(dest, { recursive: true });
for (const f of readdirSync(dest)) if (f.endsWith('.tgz')) rmSync(join(dest, f));

const [cmd, ...pre] = pnpmCommand();
const written = [];
for (const dir of readdirSync(join(root, 'packages')).sort()) {
  const pkgDir = join(root, 'packages', dir);
  let manifest;
  try {
    manifest = JSON.parse(readFileSync(join(pkgDir, 'package.json'), 'utf8'));
  } catch {
    continue;
  }
  if (manifest.private === true) continue;
  execFileSync(cmd, [...pre, 'pack', '--pack-destination', dest], { cwd: pkgDir, stdio: ['ignore', 'ignore', 'inherit'] });
  written.push(manifest.name);
}
const tarballs = readdirSync(dest).filter((f) => f.endsWith('.tgz')).sort();
for (const f of tarballs) console.log(`${join(dest, f)}  ${(statSync(join(dest, f)).size / 1024).toFixed(0)} KiB`);
if (tarballs.length !== written.length) {
  console.error(`pack:all: packed ${written.length} packages (${written.join(', ')}) but found ${tarballs.length} tarballs in ${dest}`);
  process.exit(1);
}
