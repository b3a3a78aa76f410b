/**
 * The demo forecast's bands in a fresh process (`npm run bench -- bands` runs this file, alternating):
 * 51 years × 5 states = 255 columns of 4,000 Beta-distributed shares, summarised as simulate.ts does —
 * a year's 5 columns at a time — by the JavaScript bucket counting (`js`, scripts/bands-reference.ts)
 * or the WebAssembly band kernel (`wasm`, src/engine/band-kernel.ts). What counts here is the first
 * use: the JavaScript runs mostly before V8 has optimised it, the kernel is compiled before it runs.
 * Prints the milliseconds of CPU (user + system) of the bands alone, module compiling included.
 */
import { bandsInto } from '../../src/engine/band-kernel.js';
import { randomStreams } from '../../src/uncertainty/random.js';
import { bandOfReference } from '../bands-reference.js';

const D = 4000;
const K = 5;
const YEARS = 51;
const random = randomStreams(5).stream('bench-bands-cold');
const years = Array.from({ length: YEARS }, (_, y) => Float64Array.from({ length: K * D }, (_, i) => {
  const a = 0.5 + ((y + Math.floor(i / D)) % 16) * 2;
  const x = random.gamma(a);
  return x / (x + random.gamma(60 - a));
}));
const out = new Float64Array(4 * K);
const which = process.argv[2];
const t = process.cpuUsage();
for (const year of years) {
  if (which === 'wasm') bandsInto(year, D, 0.9, out);
  else {
    for (let s = 0; s < K; s++) {
      const b = bandOfReference(year.subarray(s * D, (s + 1) * D), 0.9);
      out.set([b.median, b.low, b.high, b.mean], 4 * s);
    }
  }
}
const used = process.cpuUsage(t);
process.stdout.write(String((used.user + used.system) / 1000));
