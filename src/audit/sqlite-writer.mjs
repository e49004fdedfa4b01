// Entry of the SQLite audit writer thread. Worker threads do not inherit tsx's loader from the main thread, so
// this file (plain JavaScript) registers it and then loads the TypeScript writer next to it.
import { register } from 'tsx/esm/api';

register();
await import('./sqlite-writer.ts');
