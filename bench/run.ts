/**
 * `npm run bench`: every benchmark of the project, one after the other, printing as it goes —
 * the simulator (`bench/simulate.ts`) and batch quantification and watching (`bench/batch.ts`).
 * Figures depend on the machine and on what else it runs; the batch benchmark prints the machine,
 * the date and the load average beside its table.
 */
import { run as batch } from './batch.js';
import { run as simulate } from './simulate.js';

const started = performance.now();
console.log('## Simulator');
for (const line of simulate()) console.log(line);
console.log('');
console.log('## Batch quantification');
await batch((line) => console.log(line));
console.log('');
console.log(`benchmarks done in ${((performance.now() - started) / 1000).toFixed(0)} s`);
