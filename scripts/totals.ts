/**
 * Print the closing line `N passed, N failed` of the last `npm test` from its reports in
 * test-results/ (see lib/totals.ts); exits 1 when anything failed. `.ci/run` ends with it.
 */
import path from 'node:path';
import { ROOT } from './lib/mariadb';
import { closingLine, countRuns } from './lib/totals';

const count = countRuns(path.join(ROOT, 'test-results'));
for (const p of count.problems) console.log(`Failed: ${p}`);
console.log(closingLine(count));
process.exit(count.failed > 0 ? 1 : 0);
