// Worker-thread bootstrap for running the sources: tsx cannot load .ts files in a worker by
// itself, so register it here, then run the TypeScript body (compiled, compile-ahead.ts starts
// compile-worker.js directly and this file is not copied into dist/).
import { register } from 'tsx/esm/api';

register();
await import('./compile-worker.ts');
