import type { CliIo } from './types.js';

/** A one-line progress display on stderr (see {@link createProgress}). */
export interface Progress {
  /**
   * Shows the current stage and the fraction of the whole job done.
   * @param stage - what is being done now, e.g. `fitting 2 recordings`
   * @param fraction - share of the whole job done before this point, 0…1
   */
  update: (stage: string, fraction: number) => void;
  /** The same io, except that text written to its stderr first clears the progress line and redraws it after. */
  io: CliIo;
  /** Clears the progress line; call once when the job ends (also on failure). */
  done: () => void;
}

/** Minimum interval between two redraws of the same stage [ms] (stage changes always redraw). */
const REDRAW_INTERVAL = 100;

/**
 * Creates the progress display of a long command: one line on stderr, rewritten in place with
 * `\r` and "erase line", naming the stage and the share of the job done (`motorprint fit: fitting
 * 1 recording — 35 %`). It draws only when stderr is a terminal (`io.stderrIsTty`); otherwise every
 * call is a no-op and `io` is returned unchanged, so pipes, log files, CI and `--json` runs whose
 * stderr is redirected get nothing extra. Stdout is never written.
 *
 * @param io - the command's io
 * @param label - prefix naming the command, e.g. `motorprint fit`
 * @param now - clock [ms] (for tests)
 * @returns the display; use its `io` for the command's own stderr messages
 * @example
 * const progress = createProgress(io, 'motorprint fit');
 * progress.update('reading step.csv', 0);
 * progress.update('fitting 1 recording', 0.2);
 * progress.done();
 */
export function createProgress(io: CliIo, label: string, now: () => number = () => performance.now()): Progress {
  if (io.stderrIsTty !== true) return { update: () => {}, io, done: () => {} };
  const width = Math.max(20, (io.stderrColumns ?? 80) - 1);
  let line = '';
  let lastStage = '';
  let lastDraw = -Infinity;
  let shown = false;
  const draw = (): void => {
    io.stderr(`\r\u001b[2K${line}`);
    shown = true;
  };
  const clear = (): void => {
    if (shown) io.stderr('\r\u001b[2K');
    shown = false;
  };
  return {
    update(stage, fraction) {
      const t = now();
      if (stage === lastStage && t - lastDraw < REDRAW_INTERVAL) return;
      const percent = Math.round(100 * Math.min(Math.max(Number.isFinite(fraction) ? fraction : 0, 0), 1));
      const text = `${label}: ${stage} — ${percent} %`;
      line = text.length > width ? `${text.slice(0, width - 1)}…` : text;
      lastStage = stage;
      lastDraw = t;
      draw();
    },
    io: {
      ...io,
      stderr: (text) => {
        const redraw = shown;
        clear();
        io.stderr(text);
        if (redraw && text.endsWith('\n')) draw();
      },
    },
    done: clear,
  };
}
