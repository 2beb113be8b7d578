import type { IngestFix } from '@motorprint/ingest';

/**
 * The command-line side of ingest's fixes: flags that carry out what an ingest error or issue
 * names. Kept apart from the file reader so that the error printer loads no library.
 */

/** The command-line spelling of an ingest role (`supplyVoltage` → `supply`). */
export function cliRole(role: string): string {
  if (role === 'supplyVoltage') return 'supply';
  if (role === 'commandVoltage') return 'command';
  return role;
}


function quoted(text: string): string {
  return /^[\w.°%/·-]+$/.test(text) ? text : `"${text.replace(/"/g, '\\"')}"`;
}

/**
 * The command-line flags that carry out the fixes an ingest error or issue names, e.g.
 * `--map speed="1st motor velocity" --map current="1st motor current"`; empty when no flag applies.
 */
export function fixFlags(fixes: readonly IngestFix[] | undefined): string {
  if (!fixes) return '';
  const out: string[] = [];
  for (const fix of fixes) {
    const entries = fix.entries;
    switch (fix.option) {
      case 'map':
        if (entries?.length) out.push(entries.map(([role, column]) => `--map ${cliRole(role)}=${quoted(column)}`).join(' '));
        else out.push('--map ROLE=COLUMN');
        break;
      case 'units':
        if (entries?.length) out.push(entries.map(([column, unit]) => `--unit ${quoted(`${column}=${unit}`)}`).join(' '));
        else out.push('--unit COLUMN=UNIT');
        break;
      case 'countsPerRevolution':
        out.push('--counts-per-rev N');
        break;
      case 'pwmMax':
        out.push('--pwm-max N');
        break;
      case 'supplyVoltage':
        out.push('--supply-voltage V');
        break;
      case 'driveGain':
        out.push('--drive-gain K');
        break;
      default:
        break;
    }
  }
  return out.join(', or ');
}
