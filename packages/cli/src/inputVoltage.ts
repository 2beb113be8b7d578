import type { Recording } from '@motorprint/ingest';

/** Which logged voltage a recording offers as the model's input, and the view that carries it. */
export interface InputVoltage {
  /**
   * `terminal`: the motor's terminal voltage (preferred); `command`: what the drive was told to put
   * on the motor (a command column times the drive gain, or duty × supply); `supply`: the supply
   * voltage, with any source resistance then lumped into R; `none`: no voltage at all.
   */
  source: 'terminal' | 'command' | 'supply' | 'none';
  /** The recording with `channels.voltage` set to that input (the same object when it is the terminal voltage). */
  recording: Recording;
  /** Plain words for the output, empty for the terminal voltage. */
  note: string;
}

/**
 * Picks the voltage the model is driven by: the terminal voltage when logged; else the command
 * (the drive's output is then taken to follow its command); else the supply voltage (R then
 * includes the source resistance). Kept as one small function so the estimator can take this over.
 *
 * @param recording - an ingested recording
 * @returns the source and a view whose `channels.voltage` is that input
 */
export function inputVoltage(recording: Recording): InputVoltage {
  const c = recording.channels;
  if (c.voltage) return { source: 'terminal', recording, note: '' };
  const view = (voltage: Float64Array): Recording => ({ ...recording, channels: { ...c, voltage } });
  if (c.commandVoltage) {
    const gain = recording.meta.driveGain;
    return {
      source: 'command',
      recording: view(c.commandVoltage),
      note: `no terminal voltage logged: the command${gain !== 1 ? ` × drive gain ${gain}` : ''} is used as the motor's input (a drive that saturates or limits current makes it differ from the terminal voltage)`,
    };
  }
  if (c.supplyVoltage) {
    return {
      source: 'supply',
      recording: view(c.supplyVoltage),
      note: 'no terminal voltage logged: the supply voltage is used as the input, so R includes any source resistance',
    };
  }
  return { source: 'none', recording, note: 'no voltage channel' };
}
