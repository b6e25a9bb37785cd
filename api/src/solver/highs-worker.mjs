// Worker threads cannot load .ts under tsx directly; register the loader, then import the body.
import { register } from 'tsx/esm/api';

register();
await import('./highs-worker-main.ts');
