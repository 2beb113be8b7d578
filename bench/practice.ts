/**
 * `pnpm bench practice`: motorprint on the practice set of invented recordings from an
 * independent simulator (../shared/reference/bench-practice), scored against each case's truth.
 * Pass case ids after `--` style arguments through MOTORPRINT_PRACTICE_CASES (comma-separated) to
 * run a few.
 */
import { formatPractice, practiceCases, practiceSetDir, scoreCase, type CaseScore } from './lib/practiceSet.js';

export default async function practice(): Promise<void> {
  const dir = practiceSetDir();
  if (dir === null) {
    console.log('skipped: the practice set (../shared/reference/bench-practice or $MOTORPRINT_PRACTICE_DIR) is not here');
    return;
  }
  const only = process.env.MOTORPRINT_PRACTICE_CASES?.split(',').filter(Boolean);
  const ids = practiceCases(dir).filter((id) => !only || only.includes(id));
  const scores: CaseScore[] = [];
  for (const id of ids) {
    scores.push(await scoreCase(dir, id));
    if (process.env.MOTORPRINT_PRACTICE_VERBOSE) {
      const c = scores.at(-1)!;
      console.log(id, c.status, c.seconds.toFixed(2), 's', c.constants.map((k) => `${k.key}=${k.value?.toPrecision(5)} (${k.errorInTolerances?.toFixed(2)}×tol${k.covered === false ? ', not covered' : ''})`).join(' '));
    }
  }
  console.log(formatPractice(scores));
  const total = scores.reduce((a, c) => a + c.seconds, 0);
  console.log(`total fit time ${total.toFixed(1)} s`);
}
