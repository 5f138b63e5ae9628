#!/usr/bin/env node
// Entry point: runs the compiled JavaScript when it matches the sources, else the TypeScript
// sources through tsx (see entry.mjs), then hands over.
import { importLacuna } from './entry.mjs';

const { module } = await importLacuna('cli/main');
process.exitCode = await module.main(process.argv.slice(2));
