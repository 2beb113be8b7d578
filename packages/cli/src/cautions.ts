/**
 * Safety cautions printed with every `--help`, in the README and in reports. Bench work on motors
 * involves stored electrical energy and rotating parts; we state the usual cautions and defer to
 * local codes and licensed practice.
 */
export const CAUTIONS = [
  'Bench safety (read before recording):',
  '  - Locked-rotor tests heat the winding fast: keep each step short (typically well under a second',
  '    at rated voltage), let the motor cool between steps and watch the winding temperature.',
  '  - Rotating shafts, couplings and flywheels need guards; clamp the motor and keep hands, hair and',
  '    loose clothing clear while it can turn. A coast-down keeps turning after the supply opens.',
  '  - Bench supplies, drives and their capacitors hold dangerous energy; switch off and discharge',
  '    before changing wiring, and size fuses and wiring for the stall current.',
  '  - This tool only analyses recordings. Follow local electrical codes, your lab\'s safety rules and',
  '    licensed practice; they take precedence over anything printed here.',
].join('\n');
