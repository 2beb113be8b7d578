/**
 * Ingest benchmark: papaparse's typed parse vs motorprint's `readRecording` on one generated file.
 *
 *   pnpm bench ingest
 *   node --conditions=@motorprint/source --import tsx bench/ingest.ts [rows]
 *
 * Writes a rows × 5 CSV (time, voltage, current, speed, temperature with bench-like decimals) to a
 * temp dir, then measures each reader in its own child processes (so peak RSS belongs to one
 * reader), alternating three times so that load on the machine hits both: a warm-up on the first
 * tenth of the file, then the timed full read twice; the best time is reported.
 * (a) papaparse: `Papa.parse(contents, { header: true, dynamicTyping: true })` on the file contents
 *     already in memory (file read not timed);
 * (b) motorprint: `readRecording(path)` — opening, streaming, SHA-256, parsing, checks, all timed.
 * Prints a table; the goal is motorprint ≥ 5× faster than papaparse.
 */
import { execFileSync } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, readFileSync, readSync, rmSync, statSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import Papa from 'papaparse';
import { ingestText, readRecording } from '../packages/ingest/src/index.js'; // the root has no workspace link to the package

interface Measurement {
  ms: number;
  maxRssMiB: number;
  /** RSS after loading and warm-up, before the timed runs. */
  baseRssMiB: number;
  heapDeltaMiB: number;
  rows: number;
  columns: number;
}

/** Timed runs per child process, and child processes per reader (alternating, so load changes hit both). */
const REPEATS = 2;
const ROUNDS = 3;

function writeCsv(path: string, rows: number): void {
  const fd = openSync(path, 'w');
  writeSync(fd, 'time [s],voltage [V],current [A],speed [rad/s],temperature [°C]\n');
  let block: string[] = [];
  let seed = 12345;
  const rand = (): number => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed / 2147483648 - 0.5;
  };
  for (let k = 0; k < rows; k++) {
    const t = k * 1e-4;
    const v = k < rows / 10 ? 0 : 12;
    const w = v === 0 ? 0 : 238.1 * (1 - Math.exp(-(t - rows * 1e-5) / 0.016));
    const i = v === 0 ? 0 : (v - 0.05 * w) / 2;
    block.push(
      `${t.toFixed(4)},${(v + 0.01 * rand()).toFixed(3)},${(i + 0.002 * rand()).toFixed(4)},${(w + 0.1 * rand()).toFixed(3)},${(25 + (5 * k) / rows).toFixed(2)}`,
    );
    if (block.length === 10000) {
      writeSync(fd, block.join('\n') + '\n');
      block = [];
    }
  }
  if (block.length) writeSync(fd, block.join('\n') + '\n');
  closeSync(fd);
}

function gc(): void {
  (globalThis as { gc?: () => void }).gc?.();
}

async function measure(which: 'papaparse' | 'motorprint', path: string): Promise<Measurement> {
  const contents = which === 'papaparse' ? readFileSync(path, 'utf8') : '';
  // Warm-up on the first tenth of the file (read on its own, so motorprint's peak RSS does not
  // include a copy of the whole file).
  const fd = openSync(path, 'r');
  const buffer = Buffer.alloc(Math.floor(statSync(path).size / 10));
  readSync(fd, buffer, 0, buffer.length, 0);
  closeSync(fd);
  let head = buffer.toString('utf8');
  head = head.slice(0, head.lastIndexOf('\n') + 1);
  if (which === 'papaparse') Papa.parse(head, { header: true, dynamicTyping: true });
  else ingestText(head);
  head = '';
  gc();
  const baselineRss = process.memoryUsage().rss;
  let best = Number.POSITIVE_INFINITY;
  let rows = 0;
  let columns = 0;
  let heapDelta = 0;
  for (let r = 0; r < REPEATS; r++) {
    gc();
    const before = process.memoryUsage().heapUsed;
    const t0 = performance.now();
    if (which === 'papaparse') {
      const parsed = Papa.parse<Record<string, number>>(contents, { header: true, dynamicTyping: true, skipEmptyLines: true });
      const ms = performance.now() - t0;
      rows = parsed.data.length;
      columns = parsed.meta.fields?.length ?? 0;
      heapDelta = process.memoryUsage().heapUsed - before;
      best = Math.min(best, ms);
    } else {
      const { recording } = await readRecording(path);
      const ms = performance.now() - t0;
      rows = recording.time.length;
      columns = 1 + Object.keys(recording.channels).length + recording.extra.length;
      // Float64Arrays live outside the JS heap: count them as external memory.
      heapDelta = process.memoryUsage().heapUsed + process.memoryUsage().arrayBuffers - before;
      best = Math.min(best, ms);
    }
  }
  return { ms: best, maxRssMiB: process.resourceUsage().maxRSS / 1024, baseRssMiB: baselineRss / 2 ** 20, heapDeltaMiB: heapDelta / 2 ** 20, rows, columns };
}

/** Generates the file, measures both readers in child processes and prints the table. */
export default async function run(rows = 1_000_000): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'motorprint-bench-'));
  const path = join(dir, 'bench.csv');
  try {
    writeCsv(path, rows);
    const bytes = statSync(path).size;
    const self = fileURLToPath(import.meta.url);
    const measureIn = (which: string): Measurement =>
      JSON.parse(
        execFileSync(process.execPath, ['--expose-gc', '--conditions=@motorprint/source', '--import', 'tsx', self, '--measure', which, path], {
          encoding: 'utf8',
          maxBuffer: 1 << 20,
        }),
      ) as Measurement;
    const best = (a: Measurement, b: Measurement): Measurement => ({
      ...a,
      ms: Math.min(a.ms, b.ms),
      maxRssMiB: Math.max(a.maxRssMiB, b.maxRssMiB),
      baseRssMiB: Math.min(a.baseRssMiB, b.baseRssMiB),
    });
    let pp = measureIn('papaparse');
    let mp = measureIn('motorprint');
    for (let round = 1; round < ROUNDS; round++) {
      pp = best(pp, measureIn('papaparse'));
      mp = best(mp, measureIn('motorprint'));
    }
    const f = (x: number, d = 0): string => x.toFixed(d);
    console.log(
      [
        '| rows | columns | bytes | papaparse ms | motorprint ms | speed-up | papaparse peak RSS (base) / heap Δ | motorprint peak RSS (base) / heap+buffers Δ |',
        '|---:|---:|---:|---:|---:|---:|---:|---:|',
        `| ${mp.rows} | ${mp.columns} | ${bytes} | ${f(pp.ms)} | ${f(mp.ms)} | ${f(pp.ms / mp.ms, 1)}× | ${f(pp.maxRssMiB)} (${f(pp.baseRssMiB)}) / ${f(pp.heapDeltaMiB)} MiB | ${f(mp.maxRssMiB)} (${f(mp.baseRssMiB)}) / ${f(mp.heapDeltaMiB)} MiB |`,
      ].join('\n'),
    );
    if (pp.rows !== mp.rows) console.log(`note: papaparse gave ${pp.rows} rows, motorprint ${mp.rows}`);
    console.log(
      `Best of ${ROUNDS} alternating child processes × ${REPEATS} runs after a warm-up; papaparse timed on the contents already in memory, ` +
        'motorprint on the file (read + SHA-256 + parse + checks). Goal: speed-up ≥ 5×.',
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === '--measure') {
  process.stdout.write(JSON.stringify(await measure(process.argv[3] as 'papaparse' | 'motorprint', process.argv[4]!)));
} else if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await run(process.argv[2] ? Number(process.argv[2]) : undefined);
}
