// Preloaded (node --import) into a sheaf child process by test/out-folder-safety.test.ts:
// holds every rename of a staging folder (.sheaf-tmp-*) into place for good, so the
// test can signal the process while it is certainly staging. Test helper only.
import { createRequire, syncBuiltinESMExports } from 'node:module';
import path from 'node:path';

const require = createRequire(import.meta.url);
const fsp = require('node:fs/promises');
const rename = fsp.rename;
// A timer keeps the event loop alive meanwhile (a bare pending promise would let node exit with code 13).
const forever = () => new Promise(() => setInterval(() => {}, 60_000));
fsp.rename = (from, to) => (path.basename(String(from)).startsWith('.sheaf-tmp-') ? forever() : rename(from, to));
syncBuiltinESMExports();
