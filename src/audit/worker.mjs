// Worker-thread bootstrap: tsx cannot load .ts files in a worker by itself, so register it here,
// then run the TypeScript worker body.
import { register } from 'tsx/esm/api';

register();
await import('./worker-body.ts');
