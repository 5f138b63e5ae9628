#!/usr/bin/env -S node --max-semi-space-size=4
// Entry point: runs the compiled JavaScript when it matches the sources, else the TypeScript
// sources through tsx (see entry.mjs), then hands over.
//
// --max-semi-space-size=4 (MiB; V8's default here is 16) caps the young generation of the heap.
// On the 381 MiB benchmark it lowered the peak RSS of a whole build from about 200 to about
// 177 MiB (means of 4 runs; the peak is set by the render, not the data) with no measurable
// change in time (docs/benchmark.md). The npm scripts pass the same flag; scripts/bench.ts reads
// it from this line, so the benchmark measures what the command runs.
import { importLacuna } from './entry.mjs';

const { module } = await importLacuna('cli/main');
process.exitCode = await module.main(process.argv.slice(2));
