// `npm run build`: the front end into dist/app (Vite) and the server into dist/server (TypeScript's
// compiler, tsconfig.server.json: backend/, shared/ and db/ as JavaScript laid out as in the sources),
// so that `npm run serve` and `npm start` run it with plain node. `--server` builds the server only.
import fs from 'node:fs';
import path from 'node:path';
import { log, root, runSync, serverDir, tsc, vite } from './lib.mjs';

const serverOnly = process.argv.includes('--server');
if (!serverOnly) {
  log('building the front end…');
  runSync(vite, ['build', '--logLevel', 'warn']);
}
log('building the server…');
fs.rmSync(serverDir, { recursive: true, force: true });
runSync(tsc, ['-p', path.join(root, 'tsconfig.server.json')]);
