// Runs every benchmark in turn (`npm run bench`), or those named after `--`. Each bench module exports run(), which prints
// its figures; append new benches to the list.
import { run as traverse } from './traverse.bench.js';
import { run as simulate } from './simulate.bench.js';
import { run as ingest } from './ingest.bench.js';
import { run as tiles } from './tiles.bench.js';
import { run as changeDetection } from './change-detection.bench.js';
import { run as detect } from './detect.bench.js';
import { run as bundle } from './bundle.bench.js';
import { run as mapDiff } from './map-diff.bench.js';
import { run as backup } from './backup.bench.js';

const benches: [string, () => Promise<void>][] = [['traverse', traverse]];
benches.push(['simulate', simulate]);
benches.push(['ingest', ingest]);
benches.push(['tiles', tiles]);
benches.push(['change detection', changeDetection]);
benches.push(['detect', detect]);
benches.push(['bundle', bundle]);
benches.push(['map diff', mapDiff]);
benches.push(['backup', backup]);

// `npm run bench -- tiles bundle` runs only the benches whose names contain one of the words.
const only = process.argv.slice(2);
for (const [name, run] of benches) {
  if (only.length > 0 && !only.some((word) => name.includes(word))) continue;
  console.log(`\n== ${name} ==`);
  await run();
}
